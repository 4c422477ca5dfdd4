import { siteRoute } from "@/lib/server/http/route.ts";
import { parseWith } from "@/lib/server/auth/schemas.ts";
import { AlertListQuery } from "@/lib/server/schemas/alerts.ts";
import { alertJson, listAlerts } from "@/lib/server/alerts/alerts.ts";

export const dynamic = "force-dynamic";

/** ?state=open|watch|cleared|all (default open: every uncleared alert, watches included) &level=review|alert|limit (at least). */
export const GET = siteRoute("read", async ({ req, site }) => {
  const q = parseWith(AlertListQuery, Object.fromEntries(new URL(req.url).searchParams));
  const alerts = await listAlerts(site.id, q);
  return Response.json({ alerts: alerts.map((a) => alertJson(a)) }, { headers: { "Cache-Control": "no-store" } });
});
