import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { parseWith } from "@/lib/server/auth/schemas.ts";
import { AppError } from "@/lib/server/errors.ts";
import { AcknowledgeBody } from "@/lib/server/schemas/alerts.ts";
import { acknowledgeAlert, alertJson } from "@/lib/server/alerts/alerts.ts";

export const dynamic = "force-dynamic";

/** {comment} (required): acknowledged by the signed-in person; stops further mails for this alert. */
export const POST = siteRoute<{ slug: string; id: string }>("acknowledge", async ({ req, params, site, actor }) => {
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw new AppError("not_found", `No alert ${params.id}.`);
  const body = parseWith(AcknowledgeBody, await readJsonBody(req));
  const { alert, events } = await acknowledgeAlert(site.id, id, body.comment, actor);
  return Response.json({ alert: alertJson(alert, events) }, { headers: { "Cache-Control": "no-store" } });
});
