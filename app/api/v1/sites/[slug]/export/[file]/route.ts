/**
 * GET /api/v1/sites/{slug}/export/{file}?from=&to=  — data exports of a period (default: the 7 days
 * up to the latest epoch). {file} is one of
 *   observations.csv      observations (time_utc, point, east_m, north_m, height_m, sigma_*_m)
 *   observations.geojson  the same as RFC 7946 Point features (WGS84 when the site has an origin)
 *   results.csv           computed strains in µε with σ and significance
 *   elements.geojson      triangles (Polygon), baselines (LineString), groups (MultiPoint)
 * Formats: lib/formats/export-csv.ts, lib/formats/export-geojson.ts. The audit log: /api/v1/audit.csv?site=slug.
 */
import { siteRoute } from "@/lib/server/http/route.ts";
import { AppError } from "@/lib/server/errors.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { buildExport, EXPORT_KINDS, type ExportKind } from "@/lib/server/reports/exports.ts";
import { parsePeriod } from "@/lib/server/schemas/reports.ts";
import { latestEpochMs } from "@/lib/server/reports/period.ts";

export const dynamic = "force-dynamic";

export const GET = siteRoute<{ slug: string; file: string }>("read", async ({ req, params, site }) => {
  const kind = params.file as ExportKind;
  if (!EXPORT_KINDS.includes(kind)) throw new AppError("not_found", `No export "${params.file}"; there are ${EXPORT_KINDS.join(", ")}.`);
  const db = getDb();
  const period = parsePeriod(new URL(req.url).searchParams, { timeZone: site.timeZone, latestEpochMs: await latestEpochMs(site.id, db), nowMs: Date.now() });
  const out = await buildExport(site, kind, period, db);
  return new Response(out.body, { headers: { "Content-Type": out.type, "Content-Disposition": `attachment; filename="${out.filename}"`, "Cache-Control": "no-store" } });
});
