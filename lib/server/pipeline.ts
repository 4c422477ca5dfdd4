/**
 * What happens after epochs are committed. The ingest service calls `afterEpochsCommitted` once per
 * request, after its transaction has committed (never inside it: a listener must not see, or act on,
 * data that could still roll back). Alert evaluation and the live feed register listeners here:
 *
 *   onEpochsCommitted(async ({ siteId, epochIds }) => { ... });
 *
 * Listeners run one after another in registration order and are awaited; one that throws is logged
 * and does not stop the others, nor undo the stored epochs.
 */

import type { PhaseTimer } from "./timing.ts";

/**
 * `timer`: the request's phase timer when there is one (listeners may lap their own phases on it).
 * `afterResponse`: when the epochs came in an HTTP request, runs a task after its response has been
 * sent (false when it cannot); a listener whose work need not hold up the response may use it.
 */
export type EpochsCommitted = { siteId: number; epochIds: number[]; timer?: PhaseTimer; afterResponse?: AfterResponse };

/** Runs `task` after the HTTP response has been sent (the route's next/server `after`); false when it cannot (then the caller runs it now). */
export type AfterResponse = (task: () => Promise<void>) => boolean;
export type EpochsCommittedListener = (event: EpochsCommitted) => void | Promise<void>;

// Kept on globalThis so that every copy of this module (Next.js bundles, hot reloads) shares one registry.
const key = Symbol.for("epochal.pipeline.epochsCommitted");
type Holder = { [key]?: Set<EpochsCommittedListener> };

function listeners(): Set<EpochsCommittedListener> {
  const h = globalThis as Holder;
  h[key] ??= new Set();
  return h[key];
}

/** Registers a listener; returns a function that removes it. Registering the same function twice keeps one. */
export function onEpochsCommitted(listener: EpochsCommittedListener): () => void {
  listeners().add(listener);
  return () => {
    listeners().delete(listener);
  };
}

export async function afterEpochsCommitted(siteId: number, epochIds: number[], timer?: PhaseTimer, afterResponse?: AfterResponse): Promise<void> {
  if (epochIds.length === 0) return;
  for (const l of [...listeners()]) {
    try {
      const e: EpochsCommitted = { siteId, epochIds: [...epochIds] };
      if (timer) e.timer = timer;
      if (afterResponse) e.afterResponse = afterResponse;
      await l(e);
    } catch (err) {
      console.error(`epochal: an epochs-committed listener failed for site ${siteId}`, err);
    }
  }
}
