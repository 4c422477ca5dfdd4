/**
 * When alerts are evaluated, and how none is lost.
 *
 * Every stored epoch gets a row in "AlertBacklog" in the transaction that stores it (ingest service).
 * The evaluation deletes the rows of the epochs it evaluates in the transaction that writes their
 * alerts, under the site's alert lock (evaluate.ts), so an epoch is evaluated once whoever gets there
 * first. Over HTTP the evaluation runs after the response has been sent (the route's after-response
 * hook): a post answers once its epochs are committed and computed, and its alerts follow in this
 * process moments later. Evaluations of one site run one after another in commit order. Reads of
 * alerts in this process first wait for the site's pending evaluations (`alertsSettled`, pending.ts),
 * so a client that posts and then asks for alerts sees them. Rows a stopped process left (killed between commit
 * and evaluation) are evaluated by the sweep, a job of the queue (register.ts) every minute, and at
 * every start.
 */
import { pgQuery } from "../ingest/pg-tx.ts";
import { intArray } from "../ingest/sql-arrays.ts";
import { runAlerting } from "./evaluate.ts";
import type { AfterResponse } from "../pipeline.ts";
import { pendingEvaluations as pending } from "./pending.ts";

/** A gate that opens by itself after this long if the after-response hook never ran its task. */
const GATE_MS = 5_000;

/**
 * Evaluates the site's new epochs after the response (`afterResponse`), or now when that is not
 * available, always after the site's evaluations already waiting in this process. `done` resolves when
 * this evaluation has run (a failure is logged: its backlog rows stay for the sweep); `deferred` says
 * whether it waits for the response.
 */
export function evaluateAfterResponse(siteId: number, epochIds: readonly number[], afterResponse?: AfterResponse): { done: Promise<void>; deferred: boolean } {
  let open!: () => void;
  const gate = new Promise<void>((resolve) => (open = resolve));
  const m = pending();
  const before = m.get(siteId) ?? Promise.resolve();
  const task: Promise<void> = before
    .then(() => gate)
    .then(() => runAlerting(siteId, epochIds, undefined, { onlyQueued: true }))
    .then(
      () => undefined,
      (err) => console.error(`epochal: alert evaluation of site ${siteId} failed; its epochs stay in the backlog for the sweep`, err),
    )
    .finally(() => {
      if (m.get(siteId) === task) m.delete(siteId);
    });
  m.set(siteId, task);
  let deferred = false;
  if (afterResponse) {
    try {
      deferred = afterResponse(() => {
        open();
        return task;
      });
    } catch {
      deferred = false;
    }
  }
  if (deferred) setTimeout(open, GATE_MS).unref();
  else open();
  return { done: task, deferred };
}

/**
 * Evaluates the backlog's epochs queued more than `olderThanMs` ago (of `siteIds` only, when given),
 * site by site, oldest first; an epoch another process evaluates meanwhile is skipped (evaluation
 * takes only rows still there).
 */
export async function sweepAlertBacklog(opts: { olderThanMs?: number; siteIds?: readonly number[] } = {}): Promise<{ sites: number; epochs: number }> {
  const olderThanMs = opts.olderThanMs ?? 30_000;
  const rows = await pgQuery<{ siteId: number; epochIds: number[] }>(
    `SELECT "siteId", array_agg("epochId" ORDER BY "epochId") AS "epochIds" FROM "AlertBacklog"
      WHERE "queuedAt" <= now() - make_interval(secs => $1::double precision / 1000) AND ($2::int[] IS NULL OR "siteId" = ANY($2::int[]))
      GROUP BY "siteId" ORDER BY min("queuedAt")`,
    [olderThanMs, opts.siteIds ? intArray([...opts.siteIds]) : null],
  );
  let epochs = 0;
  for (const r of rows) {
    const report = await runAlerting(r.siteId, r.epochIds, undefined, { onlyQueued: true });
    epochs += report.evaluatedEpochs;
  }
  return { sites: rows.length, epochs };
}
