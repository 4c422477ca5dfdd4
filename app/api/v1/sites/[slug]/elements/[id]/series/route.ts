import { siteRoute } from "@/lib/server/http/route.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { parseElementId } from "@/lib/server/elements.ts";
import { elementSeries } from "@/lib/server/series.ts";
import { ElementSeriesQuerySchema, parseOrThrow, searchParamsObject } from "@/lib/server/schemas/elements.ts";

export const dynamic = "force-dynamic";

/** ?quantity=&from=&to=&maxPoints=&mode=cumulative|incremental|rate */
export const GET = siteRoute<{ slug: string; id: string }>("read", async ({ req, params, site }) => {
  const query = parseOrThrow(ElementSeriesQuerySchema, searchParamsObject(req.url), "series query");
  return Response.json(await elementSeries(getDb(), site, parseElementId(params.id), query));
});
