import { siteRoute } from "@/lib/server/http/route.ts";
import { AppError } from "@/lib/server/errors.ts";
import { alertJson, getAlert } from "@/lib/server/alerts/alerts.ts";

export const dynamic = "force-dynamic";

/** One alert with its whole event history. */
export const GET = siteRoute<{ slug: string; id: string }>("read", async ({ params, site }) => {
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw new AppError("not_found", `No alert ${params.id}.`);
  const { alert, events } = await getAlert(site.id, id);
  return Response.json({ alert: alertJson(alert, events) }, { headers: { "Cache-Control": "no-store" } });
});
