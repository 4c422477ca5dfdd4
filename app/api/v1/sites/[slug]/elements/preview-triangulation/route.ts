import { siteRoute } from "@/lib/server/http/route.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { previewTriangulation } from "@/lib/server/elements.ts";
import { parseOrThrow, readJsonBody, TriangulationOptionsSchema } from "@/lib/server/schemas/elements.ts";

export const dynamic = "force-dynamic";

/**
 * The triangulation that POST /elements {generate} would save, with the dropped triangles and their
 * reasons and the quality figure; writes nothing. An empty body means the default options.
 */
export const POST = siteRoute<{ slug: string }>("manage-elements", async ({ req, site }) => {
  const opts = parseOrThrow(TriangulationOptionsSchema, await readJsonBody(req, {}), "triangulation options");
  return Response.json(await previewTriangulation(getDb(), site, opts));
});
