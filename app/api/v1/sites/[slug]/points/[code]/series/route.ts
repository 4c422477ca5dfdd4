import { siteRoute } from "@/lib/server/http/route.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { pointSeries } from "@/lib/server/series.ts";
import { parseOrThrow, PointSeriesQuerySchema, searchParamsObject } from "@/lib/server/schemas/elements.ts";

export const dynamic = "force-dynamic";

/** ?component=dE|dN|dH|d2D|d3D&from=&to=&maxPoints=&mode=cumulative|incremental|rate */
export const GET = siteRoute<{ slug: string; code: string }>("read", async ({ req, params, site }) => {
  const query = parseOrThrow(PointSeriesQuerySchema, searchParamsObject(req.url), "series query");
  return Response.json(await pointSeries(getDb(), site, safeDecode(params.code), query));
});

function safeDecode(s: string): string {
  try {
    return decodeURIComponent(s);
  } catch {
    return s;
  }
}
