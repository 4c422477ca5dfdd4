/**
 * PATCH /api/v1/sites/{slug}/points/{code} — {isReference?, group?, kind?, sigmaHM?, sigmaVM?, note?}
 * (σ in metres, null = the site's default). 200 { point } · 404 unknown code · 422 { errors }.
 */
import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { updatePoint } from "@/lib/server/points.ts";
import { parseOrThrow, pointPatchSchema } from "@/lib/server/dashboard/schemas.ts";

export const dynamic = "force-dynamic";

export const PATCH = siteRoute<{ slug: string; code: string }>("manage-points", async ({ req, params, site, actor }) => {
  const patch = parseOrThrow(pointPatchSchema, await readJsonBody(req), "point change");
  const point = await updatePoint(site, params.code, patch, actor);
  return Response.json({ point }, { headers: { "Cache-Control": "no-store" } });
});
