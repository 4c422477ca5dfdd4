/**
 * GET /api/v1/sites/{slug}/points — every point with its latest displacement (metres) from the
 * reference epoch (Site.referenceEpochId, else the site's first epoch): dE, dN, dH, dHorizontal, d3D.
 */
import { siteRoute } from "@/lib/server/http/route.ts";
import { AppError } from "@/lib/server/errors.ts";
import { listPoints } from "@/lib/server/ingest/read.ts";
import { pointListQuerySchema, queryIssues } from "@/lib/server/schemas/ingest.ts";

export const dynamic = "force-dynamic";

export const GET = siteRoute("read", async ({ req, site }) => {
  const q = pointListQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!q.success) throw new AppError("invalid", "Bad query parameters.", { errors: queryIssues(q.error) });
  return Response.json(await listPoints(site.id), { headers: { "Cache-Control": "no-store" } });
});
