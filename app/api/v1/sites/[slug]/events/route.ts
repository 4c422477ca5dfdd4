/**
 * GET /api/v1/sites/{slug}/events — server-sent events for the dashboard (permission "read").
 *   event: ready  {"site"}                     when the stream opens
 *   event: epoch  {"epochIds":[…],"time"}      after each commit of new epochs (HTTP, MQTT, CLI in this process)
 *   ": heartbeat" comment every 15 s
 * ?maxS=N closes the stream after N seconds (default 1800, 0 = send `ready` and close); EventSource
 * reconnects by itself. Format: lib/server/live/events.ts.
 */
import { siteRoute } from "@/lib/server/http/route.ts";
import { AppError } from "@/lib/server/errors.ts";
import { DEFAULT_MAX_STREAM_S, siteEventStream } from "@/lib/server/live/events.ts";
import { eventsQuerySchema } from "@/lib/server/live/schemas.ts";
import { queryIssues } from "@/lib/server/schemas/ingest.ts";

export const dynamic = "force-dynamic";

export const GET = siteRoute("read", async ({ req, site }) => {
  const q = eventsQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!q.success) throw new AppError("invalid", "Bad query parameters.", { errors: queryIssues(q.error) });
  const body = siteEventStream({ siteId: site.id, slug: site.slug, maxS: q.data.maxS ?? DEFAULT_MAX_STREAM_S, signal: req.signal });
  return new Response(body, {
    headers: {
      "Content-Type": "text/event-stream; charset=utf-8",
      "Cache-Control": "no-store, no-transform",
      // Tells nginx-style proxies not to buffer the stream.
      "X-Accel-Buffering": "no",
    },
  });
});
