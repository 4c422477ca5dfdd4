import { siteRoute } from "@/lib/server/http/route.ts";
import { parseWith } from "@/lib/server/auth/schemas.ts";
import { OutboxQuery } from "@/lib/server/schemas/alerts.ts";
import { listMails, mailJson } from "@/lib/server/mail/list.ts";

export const dynamic = "force-dynamic";

/** Mails kept without a mail server (?status=outbox, the default), or the delivery record (queued|sent|failed|all). */
export const GET = siteRoute("read", async ({ req, site }) => {
  const q = parseWith(OutboxQuery, Object.fromEntries(new URL(req.url).searchParams));
  const mails = await listMails(site.id, q);
  return Response.json({ mails: mails.map(mailJson) }, { headers: { "Cache-Control": "no-store" } });
});
