/**
 * Wires alerting into the ingest pipeline, once per process: `registerAlerting()` adds the
 * epochs-committed listener and starts the job queue and mail worker in the background. Call it from
 * any server module that stores epochs (the ingest routes); calling it again does nothing.
 * During `next build` (NEXT_PHASE=phase-production-build) route modules are loaded to collect page
 * data: the worker is not started then; it starts at the first committed epochs instead.
 */
import { onEpochsCommitted, type EpochsCommitted } from "../pipeline.ts";
import { runAlerting } from "./evaluate.ts";
import { startMailWorker } from "../mail/queue.ts";

const KEY = Symbol.for("epochal.alerting.registered");
type Holder = { [KEY]?: boolean };

async function onCommitted(e: EpochsCommitted): Promise<void> {
  await runAlerting(e.siteId, e.epochIds, e.timer);
}

export function registerAlerting(opts: { startWorker?: boolean } = {}): void {
  const h = globalThis as Holder;
  if (h[KEY]) return;
  h[KEY] = true;
  onEpochsCommitted(onCommitted);
  const building = process.env.NEXT_PHASE === "phase-production-build";
  if (opts.startWorker ?? !building)
    startMailWorker().catch((err) => console.error("epochal: the mail worker did not start (it is retried at the next ingest)", err));
}
