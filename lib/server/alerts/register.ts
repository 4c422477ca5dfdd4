/**
 * Wires alerting into the ingest pipeline, once per process: `registerAlerting()` adds the
 * epochs-committed listener and starts the job queue in the background, with the mail worker and the
 * alert backlog's sweep (backlog.ts). Call it from any server module that stores epochs (the ingest
 * routes); calling it again does nothing.
 * During `next build` (NEXT_PHASE=phase-production-build) route modules are loaded to collect page
 * data: the worker is not started then; it starts at the first committed epochs instead.
 */
import { onEpochsCommitted, type EpochsCommitted } from "../pipeline.ts";
import { startMailWorker } from "../mail/queue.ts";
import { evaluateAfterResponse, sweepAlertBacklog } from "./backlog.ts";

const KEY = Symbol.for("epochal.alerting.registered");
const SWEEP_KEY = Symbol.for("epochal.alerting.sweep");
type Holder = { [KEY]?: boolean; [SWEEP_KEY]?: Promise<void> };

/** The job (pg-boss queue) that evaluates what is left in the alert backlog: every minute, and once at start. */
export const BACKLOG_QUEUE = "epochal-alert-backlog";

/** Over HTTP the evaluation follows the response; elsewhere (command line, MQTT) it is awaited here. */
async function onCommitted(e: EpochsCommitted): Promise<void> {
  const { done, deferred } = evaluateAfterResponse(e.siteId, e.epochIds, e.afterResponse);
  if (!deferred) await done;
}

/** Schedules the backlog sweep on the job queue (once per process; one sweep runs at a time across processes). */
export function startBacklogSweep(): Promise<void> {
  const h = globalThis as Holder;
  h[SWEEP_KEY] ??= (async () => {
    const { boss } = await startMailWorker();
    await boss.createQueue(BACKLOG_QUEUE, { name: BACKLOG_QUEUE, policy: "singleton", retryLimit: 0 });
    // Jobs come once a minute: polling every 30 s is soon enough and keeps an idle server's queries few.
    await boss.work(BACKLOG_QUEUE, { batchSize: 1, pollingIntervalSeconds: 30 }, async () => {
      const r = await sweepAlertBacklog();
      if (r.epochs > 0) console.log(`epochal: evaluated ${r.epochs} epoch(s) of ${r.sites} site(s) left in the alert backlog`);
    });
    await boss.schedule(BACKLOG_QUEUE, "* * * * *");
    await boss.send(BACKLOG_QUEUE, {});
  })().catch((err) => {
    h[SWEEP_KEY] = undefined;
    console.error("epochal: the alert backlog sweep did not start (it is retried at the next ingest)", err);
  });
  return h[SWEEP_KEY];
}

export function registerAlerting(opts: { startWorker?: boolean } = {}): void {
  const h = globalThis as Holder;
  if (h[KEY]) return;
  h[KEY] = true;
  onEpochsCommitted(onCommitted);
  const building = process.env.NEXT_PHASE === "phase-production-build";
  if (opts.startWorker ?? !building) void startBacklogSweep();
}
