/**
 * GET /api/v1/sites/{slug}/field?epoch=ID[&from=ID]: the plan's strain field at one epoch (see
 * lib/server/dashboard/field.ts), packed one array per column (PackedField in lib/plan/field.ts).
 */
import { siteRoute } from "@/lib/server/http/route.ts";
import { getStrainField } from "@/lib/server/dashboard/field.ts";
import { fieldQuerySchema, parseOrThrow } from "@/lib/server/dashboard/schemas.ts";
import { packField } from "@/lib/plan/field.ts";

export const dynamic = "force-dynamic";

export const GET = siteRoute<{ slug: string }>("read", async ({ req, site }) => {
  const q = parseOrThrow(fieldQuerySchema, Object.fromEntries(new URL(req.url).searchParams), "field query");
  const field = await getStrainField(site.id, { epochId: q.epoch, fromEpochId: q.from ?? null, k: q.k });
  return Response.json(packField(field), { headers: { "Cache-Control": "private, max-age=60" } });
});
