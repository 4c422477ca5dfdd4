import { siteRoute } from "@/lib/server/http/route.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { parseElementId } from "@/lib/server/elements.ts";
import { elementTrend } from "@/lib/server/trends.ts";
import { parseOrThrow, searchParamsObject, TrendQuerySchema } from "@/lib/server/schemas/elements.ts";

export const dynamic = "force-dynamic";

/** ?quantity=&window=P30D&levels=a,b,c&smoothWindow=5 */
export const GET = siteRoute<{ slug: string; id: string }>("read", async ({ req, params, site }) => {
  const query = parseOrThrow(TrendQuerySchema, searchParamsObject(req.url), "trend query");
  return Response.json(await elementTrend(getDb(), site, parseElementId(params.id), query));
});
