/**
 * In-process fan-out of "new epochs on site N" to the dashboard's server-sent event streams.
 *
 * One epochs-committed listener (lib/server/pipeline.ts) feeds every open stream of the site; it is
 * registered once per process, on the first subscription or by `startLiveFeed`. Everything lives on
 * globalThis, because Next.js may load this module more than once (instrumentation bundle, route
 * bundles) and all copies must share one hub. Streams only reach browsers connected to this
 * process: with several server processes, each has its own hub (each process also ingests, so each
 * sees its own commits; epochs stored by another process are not pushed).
 *
 * Wire format (text/event-stream):
 *   retry: 5000                               reconnect delay for EventSource
 *   event: ready   data: {"site":"slug"}      once, when the stream opens
 *   event: epoch   data: {"epochIds":[…],"time":"…Z"}   `time` is the latest epoch time of the commit
 *   : heartbeat                               a comment every 15 s (keeps proxies from closing it)
 */
import { getDb } from "../db/client.ts";
import { onEpochsCommitted, type EpochsCommitted } from "../pipeline.ts";

export type EpochEvent = { epochIds: number[]; time: string | null };
export type SiteEventListener = (e: EpochEvent) => void;

const KEY = Symbol.for("epochal.live.events");
type Hub = { bySite: Map<number, Set<SiteEventListener>>; registered: boolean };
type Holder = { [KEY]?: Hub };

function hub(): Hub {
  const h = globalThis as Holder;
  h[KEY] ??= { bySite: new Map(), registered: false };
  return h[KEY];
}

async function onCommitted(e: EpochsCommitted): Promise<void> {
  const subs = hub().bySite.get(e.siteId);
  if (!subs || subs.size === 0) return;
  let time: string | null = null;
  try {
    const rows = await getDb().$queryRawUnsafe<{ t: Date | null }[]>(`SELECT max("time") AS t FROM "Epoch" WHERE id = ANY($1::int[])`, e.epochIds);
    time = rows[0]?.t ? rows[0].t.toISOString() : null;
  } catch {
    /* the event still goes out; the page reloads its data anyway */
  }
  for (const l of [...subs]) {
    try {
      l({ epochIds: [...e.epochIds], time });
    } catch (err) {
      console.error("epochal: a live event listener failed", err);
    }
  }
}

/** Registers the pipeline listener once per process. */
export function registerLiveEvents(): void {
  const h = hub();
  if (h.registered) return;
  h.registered = true;
  onEpochsCommitted(onCommitted);
}

/** Calls `listener` for each commit of epochs on the site; returns the unsubscribe function. */
export function subscribeSiteEvents(siteId: number, listener: SiteEventListener): () => void {
  registerLiveEvents();
  const h = hub();
  let set = h.bySite.get(siteId);
  if (!set) h.bySite.set(siteId, (set = new Set()));
  set.add(listener);
  return () => {
    set.delete(listener);
    if (set.size === 0 && h.bySite.get(siteId) === set) h.bySite.delete(siteId);
  };
}

/** Open streams, all sites (for tests and health). */
export function openEventStreams(): number {
  let n = 0;
  for (const s of hub().bySite.values()) n += s.size;
  return n;
}

export const HEARTBEAT_MS = 15_000;
/** Streams close after this long; EventSource reconnects by itself (bounds a forgotten tab's cost). */
export const DEFAULT_MAX_STREAM_S = 30 * 60;

export interface EventStreamOptions {
  siteId: number;
  slug: string;
  heartbeatMs?: number;
  /** Close the stream after this many seconds (0: send `ready` and close). */
  maxS?: number;
  /** The request's abort signal: the stream ends when the client goes away. */
  signal?: AbortSignal;
}

/** The text/event-stream body for one dashboard tab. */
export function siteEventStream(o: EventStreamOptions): ReadableStream<Uint8Array> {
  const enc = new TextEncoder();
  let cleanup = (): void => undefined;
  return new ReadableStream<Uint8Array>({
    start(controller) {
      let closed = false;
      const send = (text: string): void => {
        if (closed) return;
        try {
          controller.enqueue(enc.encode(text));
        } catch {
          close();
        }
      };
      const unsubscribe = subscribeSiteEvents(o.siteId, (e) => send(`event: epoch\ndata: ${JSON.stringify(e)}\n\n`));
      const beat = setInterval(() => send(`: heartbeat ${new Date().toISOString()}\n\n`), o.heartbeatMs ?? HEARTBEAT_MS);
      const maxS = o.maxS ?? DEFAULT_MAX_STREAM_S;
      const end = setTimeout(() => close(), maxS * 1000);
      const onAbort = (): void => close();
      function close(): void {
        if (closed) return;
        closed = true;
        clearInterval(beat);
        clearTimeout(end);
        unsubscribe();
        o.signal?.removeEventListener("abort", onAbort);
        try {
          controller.close();
        } catch {
          /* already closed by the reader */
        }
      }
      cleanup = close;
      send(`retry: 5000\nevent: ready\ndata: ${JSON.stringify({ site: o.slug })}\n\n`);
      if (o.signal?.aborted || maxS <= 0) close();
      else o.signal?.addEventListener("abort", onAbort);
    },
    cancel() {
      cleanup();
    },
  });
}
