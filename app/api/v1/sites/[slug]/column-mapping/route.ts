/**
 * The site's remembered column mapping for other people's CSV files (lib/formats/mapped-csv.ts).
 *   GET  → 200 { mapping: ColumnMapping | null }                       (read)
 *   PUT  ColumnMapping as JSON → 200 { mapping } ; 422 naming the field (ingest; audited)
 */
import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { getColumnMapping, saveColumnMapping } from "@/lib/server/reports/column-mapping.ts";
import { parseColumnMapping } from "@/lib/server/schemas/reports.ts";

export const dynamic = "force-dynamic";

export const GET = siteRoute("read", async ({ site }) => Response.json({ mapping: await getColumnMapping(site.id) }, { headers: { "Cache-Control": "no-store" } }));

export const PUT = siteRoute("ingest", async ({ req, site, actor }) => {
  const mapping = parseColumnMapping(await readJsonBody(req));
  return Response.json({ mapping: await saveColumnMapping(site, actor, mapping) }, { headers: { "Cache-Control": "no-store" } });
});
