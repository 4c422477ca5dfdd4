import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { parseWith } from "@/lib/server/auth/schemas.ts";
import { RecipientCreateBody } from "@/lib/server/schemas/recipients.ts";
import { addRecipient, listRecipients, recipientJson } from "@/lib/server/mail/recipients.ts";

export const dynamic = "force-dynamic";

/** The site's mail recipients. Addresses are personal data: the role that edits trigger rules only. */
export const GET = siteRoute("manage-rules", async ({ site }) => {
  const recipients = await listRecipients(site.id);
  return Response.json({ recipients: recipients.map(recipientJson) }, { headers: { "Cache-Control": "no-store" } });
});

/** Adds a recipient: {email, minLevel?: review|alert|limit (default review), digest?: boolean} → 201; 409 when the address is already there. */
export const POST = siteRoute("manage-rules", async ({ req, site, actor }) => {
  const body = parseWith(RecipientCreateBody, await readJsonBody(req));
  const r = await addRecipient(site.id, body, actor);
  return Response.json({ recipient: recipientJson(r) }, { status: 201, headers: { "Cache-Control": "no-store" } });
});
