/**
 * POST /api/v1/sites/{slug}/epochs — store epochs (text/csv, application/json, application/geo+json).
 *   201 { epochs: [{ id, time, observations, revision, outcome }], newPoints }   something stored
 *   200 same shape                                                              all already stored (same content)
 *   409 an epoch at that time holds different coordinates (send ?revise=true)
 *   413 too large · 415 unsupported type · 422 { errors: [{ line, field, message }] } nothing stored
 * The response is sent once the epochs are committed and their element results computed and stored;
 * their alert evaluation follows it in this process (lib/server/alerts/backlog.ts).
 * GET /api/v1/sites/{slug}/epochs?from&to&limit&cursor&observations=false&revisions=all
 */
import { after } from "next/server";
import { siteRoute } from "@/lib/server/http/route.ts";
import { AppError } from "@/lib/server/errors.ts";
import { parseIngestRequest } from "@/lib/server/ingest/request.ts";
import { ingestEpochs } from "@/lib/server/ingest/service.ts";
import { listEpochs } from "@/lib/server/ingest/read.ts";
import { epochListQuerySchema, queryIssues } from "@/lib/server/schemas/ingest.ts";

export const dynamic = "force-dynamic";

/** Work that follows the response (the alert evaluation, lib/server/alerts/backlog.ts); false outside a request scope (direct calls in tests). */
function afterResponse(task: () => Promise<void>): boolean {
  try {
    after(task);
    return true;
  } catch {
    return false;
  }
}

export const POST = siteRoute("ingest", async ({ req, site, actor, timer }) => {
  const parsed = await parseIngestRequest(req, site.id);
  timer.lap("parse");
  const r = await ingestEpochs(parsed.epochs, { siteId: site.id, actor: actor.label, revise: parsed.revise, source: "api", timer, afterResponse });
  const body = {
    epochs: r.epochs.map((e) => ({ id: e.id, time: e.time, observations: e.observations, revision: e.revision, outcome: e.outcome, contentHash: e.contentHash })),
    newPoints: r.newPoints,
  };
  return Response.json(body, { status: r.stored ? 201 : 200, headers: { "Cache-Control": "no-store", "Server-Timing": timer.header() } });
});

export const GET = siteRoute("read", async ({ req, site }) => {
  const q = epochListQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!q.success) throw new AppError("invalid", "Bad query parameters.", { errors: queryIssues(q.error) });
  return Response.json(await listEpochs(site.id, q.data), { headers: { "Cache-Control": "no-store" } });
});
