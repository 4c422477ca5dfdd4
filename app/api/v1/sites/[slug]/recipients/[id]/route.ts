import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { parseWith } from "@/lib/server/auth/schemas.ts";
import { AppError } from "@/lib/server/errors.ts";
import { RecipientPatchBody } from "@/lib/server/schemas/recipients.ts";
import { recipientJson, removeRecipient, updateRecipient } from "@/lib/server/mail/recipients.ts";

export const dynamic = "force-dynamic";

function recipientId(raw: string): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw new AppError("not_found", `No mail recipient ${raw}.`);
  return id;
}

/** Changes the minimum level and/or the digest flag: {minLevel?, digest?}. */
export const PATCH = siteRoute<{ slug: string; id: string }>("manage-rules", async ({ req, params, site, actor }) => {
  const body = parseWith(RecipientPatchBody, await readJsonBody(req));
  const r = await updateRecipient(site.id, recipientId(params.id), body, actor);
  return Response.json({ recipient: recipientJson(r) }, { headers: { "Cache-Control": "no-store" } });
});

/** Removes a recipient; answers with the removed row. */
export const DELETE = siteRoute<{ slug: string; id: string }>("manage-rules", async ({ params, site, actor }) => {
  const r = await removeRecipient(site.id, recipientId(params.id), actor);
  return Response.json({ recipient: recipientJson(r) }, { headers: { "Cache-Control": "no-store" } });
});
