/**
 * The ingest service: epochs in (from any parser, see lib/formats/epoch-json.ts), stored atomically
 * and idempotently.
 *
 * One request is one transaction, serialised per site by a transaction-level advisory lock
 * (`pg_advisory_xact_lock(INGEST_LOCK_NAMESPACE, siteId)`): two posts of the same epoch cannot both
 * see "not stored yet"; posts to different sites do not wait for each other. Inside it:
 *   1. unknown point codes are registered (or refused, Site.refuseUnknownPoints); known ones come
 *      from an in-memory map checked against Site.pointsStamp (point-ids.ts);
 *   2. each epoch is compared with the current revision at its time by content hash (content-hash.ts):
 *      same hash → unchanged (its id is returned); different → conflict (409), or with `revise` a new
 *      revision (the old one stays, marked not current); none → created;
 *   3. observations are written with binary COPY (observations.ts; while the server stores them this process hashes
 *      the new epochs and, for a live request whose site reference is already known, computes their
 *      element results); then the Epoch rows (bulk INSERT … SELECT FROM unnest(…));
 *   4. one audit row and one alert-backlog row per stored epoch; the element result rows
 *      (lib/server/results), streamed to the server by binary COPY slice by slice;
 * then, after commit, `afterEpochsCommitted` (lib/server/pipeline.ts). Any failure rolls everything back.
 * Ingest never updates coordinates and never deletes; the only update is the isCurrent flag of a
 * revised epoch.
 */
import type { Db } from "../db/client.ts";
import { AppError } from "../errors.ts";
import { auditSafe } from "../audit.ts";
import { checkEpochBounds } from "../schemas/ingest.ts";
import { computeResultsForEpochs, planResults, storeResults, type EpochToCompute, type ResultsPlan } from "../results/compute.ts";
import type { ResultColumns } from "../results/columns.ts";
import { STREAM_ROWS } from "../results/store.ts";
import { afterEpochsCommitted, type AfterResponse } from "../pipeline.ts";
import { intArray, textArray } from "./sql-arrays.ts";
import { withPgTransaction, type Sql } from "./pg-tx.ts";
import { epochContentHash, type ResolvedObservation } from "./content-hash.ts";
import { insertObservations } from "./observations.ts";
import { resolvePointIds } from "./point-ids.ts";
import type { EpochInput } from "../../formats/epoch-json.ts";
import type { PhaseTimer } from "../timing.ts";

/** First key of the two-key advisory lock: "EPCH" in ASCII, so our locks are recognisable in pg_locks. */
export const INGEST_LOCK_NAMESPACE = 0x45504348;

export type IngestStage = "after-points" | "after-observations" | "after-results";
export type IngestOutcome = "created" | "unchanged" | "revised";

export interface IngestOptions {
  siteId: number;
  /** Actor label for the audit log (`token:…`, `user:…`, `cli:…`). */
  actor: string;
  /** Store a new revision where an epoch at that time holds different coordinates (else 409). */
  revise?: boolean;
  /** Where the epochs came from: `api`, `cli`, `mqtt`, `demo`, … */
  source?: string;
  /** Clock for the "not in the future" bound (tests). */
  nowMs?: number;
  /** Test hook: called at each stage inside the transaction; throwing there must roll everything back. */
  failpoint?: (stage: IngestStage) => void | Promise<void>;
  /**
   * Runs a task after the HTTP response has been sent (the route's next/server `after`); false when it
   * cannot. Given, the alert evaluation of the stored epochs follows the response (lib/server/alerts/backlog.ts).
   */
  afterResponse?: AfterResponse;
  /** Phase timings (the route's Server-Timing header): bounds, lock, points, classify, epochs, observations-encode, hash, observations, results-*, audit, commit, after-commit. */
  timer?: PhaseTimer;
}

export interface StoredEpoch {
  id: number;
  time: string;
  observations: number;
  revision: number;
  contentHash: string;
  outcome: IngestOutcome;
}

export interface IngestResult {
  /** True when anything was written (HTTP 201), false when every epoch was already stored (200). */
  stored: boolean;
  epochs: StoredEpoch[];
  /** Point codes registered by this request, in order of first appearance. */
  newPoints: string[];
  /** Element result rows written. */
  results: number;
}

function transactionTimeoutMs(): number {
  const v = Number(process.env.EPOCHAL_INGEST_TIMEOUT_MS);
  return Number.isFinite(v) && v > 0 ? v : 10 * 60_000;
}

/**
 * Stores the epochs; throws AppError `invalid` (422, nothing written) or `conflict` (409, nothing written).
 * Writes through the plain `pg` pool of pg-tx.ts on DATABASE_URL (not through Prisma: see there why);
 * `_db` is kept for callers that pass the shared client and is not used.
 */
export async function ingestEpochs(input: readonly EpochInput[], opts: IngestOptions, _db?: Db): Promise<IngestResult> {
  if (input.length === 0) throw new AppError("invalid", "No epochs in the request.", { errors: [{ line: null, field: null, message: "no epochs" }] });
  const boundErrors = checkEpochBounds(input, opts.nowMs ?? Date.now());
  if (boundErrors.length > 0) throw new AppError("invalid", "The input has values outside the plausible bounds; nothing was stored.", { errors: boundErrors });
  const seenTimes = new Set<string>();
  for (const ep of input) {
    if (seenTimes.has(ep.time)) throw new AppError("invalid", "Two epochs at the same time in one request.", { errors: [{ line: ep.timeAt.line, field: ep.timeAt.field, message: `a second epoch at ${ep.time}` }] });
    seenTimes.add(ep.time);
  }
  opts.timer?.lap("bounds");

  const result = await withPgTransaction((tx) => run(tx, input, opts), { timeoutMs: transactionTimeoutMs() });
  opts.timer?.lap("commit");
  const committed = result.epochs.filter((e) => e.outcome !== "unchanged").map((e) => e.id);
  await afterEpochsCommitted(opts.siteId, committed, opts.timer, opts.afterResponse);
  opts.timer?.lap("after-commit");
  return result;
}

async function run(tx: Sql, input: readonly EpochInput[], opts: IngestOptions): Promise<IngestResult> {
  const { siteId } = opts;
  await tx.query(`SELECT pg_advisory_xact_lock($1::int, $2::int)`, [INGEST_LOCK_NAMESPACE, siteId]);
  // The site's settings, its cache stamps and its reference as stored now (first current epoch when none is set).
  const [site] = await tx.query<{ sigmaHM: number; sigmaVM: number; refuseUnknownPoints: boolean; pointsStamp: string; elementsStamp: string; siteRef: number | null; firstId: number | null; firstTime: Date | null }>(
    `SELECT s."sigmaHM", s."sigmaVM", s."refuseUnknownPoints", s."pointsStamp"::text AS "pointsStamp", s."elementsStamp"::text AS "elementsStamp",
            s."referenceEpochId" AS "siteRef", f.id AS "firstId", f.time AS "firstTime"
       FROM "Site" s
       LEFT JOIN LATERAL (SELECT id, time FROM "Epoch" WHERE "siteId" = s.id AND "isCurrent" ORDER BY time, id LIMIT 1) f ON true
      WHERE s.id = $1`,
    [siteId],
  );
  if (!site) throw new AppError("not_found", `No site with id ${siteId}.`);
  opts.timer?.lap("lock");

  // 1. Points.
  const { pointId, newPoints } = await resolvePointIds(tx, siteId, site, input);
  await opts.failpoint?.("after-points");
  opts.timer?.lap("points");

  // 2. Classify against the current revisions.
  const resolved = input.map((ep) =>
    ep.observations.map(
      (o): ResolvedObservation => ({
        point: o.point,
        east: o.east,
        north: o.north,
        height: o.height,
        sigmaEast: o.sigmaEast ?? site.sigmaHM,
        sigmaNorth: o.sigmaNorth ?? site.sigmaHM,
        sigmaHeight: o.sigmaHeight ?? site.sigmaVM,
      }),
    ),
  );
  // Hashes are computed here only where an epoch at that time exists (to compare); the others while
  // the server stores the observations (below), since only the Epoch row needs them.
  const hashes: (string | null)[] = input.map(() => null);
  const hashOf = (i: number): string => (hashes[i] ??= epochContentHash(resolved[i]));
  // One index probe per time (LATERAL): the cost follows the request, not the site's number of epochs
  // (with "time = ANY(…)" the planner may scan all of the site's current epochs when its statistics lag a backfill).
  const existing = await tx.query<{ id: number; time: Date; contentHash: string; revision: number; n: number; maxRevision: number }>(
    `SELECT e.id, e.time, e."contentHash", e.revision,
            (SELECT count(*) FROM "Observation" o WHERE o."epochId" = e.id)::int AS n,
            (SELECT max(e2.revision) FROM "Epoch" e2 WHERE e2."siteId" = e."siteId" AND e2.time = e.time)::int AS "maxRevision"
       FROM unnest($2::timestamptz[]) AS t(time)
      CROSS JOIN LATERAL (SELECT * FROM "Epoch" x WHERE x."siteId" = $1 AND x."isCurrent" AND x.time = t.time OFFSET 0) e`,
    [siteId, textArray(input.map((e) => e.time))],
  );
  const byTime = new Map(existing.map((e) => [e.time.getTime(), e]));
  const plan: { index: number; revision: number; previous: (typeof existing)[number] | null }[] = [];
  const out: (StoredEpoch | null)[] = input.map(() => null);
  const conflicts: { time: string; epochId: number; revision: number; line: number | null; field: string | null }[] = [];
  input.forEach((ep, i) => {
    const prev = byTime.get(Date.parse(ep.time));
    if (!prev) plan.push({ index: i, revision: 1, previous: null });
    else if (prev.contentHash === hashOf(i)) out[i] = { id: prev.id, time: ep.time, observations: prev.n, revision: prev.revision, contentHash: prev.contentHash, outcome: "unchanged" };
    else if (opts.revise) plan.push({ index: i, revision: prev.maxRevision + 1, previous: prev });
    else conflicts.push({ time: ep.time, epochId: prev.id, revision: prev.revision, line: ep.timeAt.line, field: ep.timeAt.field });
  });
  if (conflicts.length > 0) {
    throw new AppError("conflict", `${conflicts.length === 1 ? "An epoch at this time is" : `${conflicts.length} epochs at these times are`} already stored with different coordinates; nothing was stored. Send ?revise=true to store a new revision (the old one is kept).`, {
      errors: conflicts.slice(0, 100).map((c) => ({ line: c.line, field: c.field, message: `an epoch at ${c.time} is already stored with different coordinates (epoch ${c.epochId}, revision ${c.revision})` })),
      details: { conflicts: conflicts.map(({ time, epochId, revision }) => ({ time, epochId, revision })) },
    });
  }

  opts.timer?.lap("classify");
  // 3. Write.
  const revisedIds = plan.filter((p) => p.previous).map((p) => (p.previous as (typeof existing)[number]).id);
  if (revisedIds.length > 0) await tx.query(`UPDATE "Epoch" SET "isCurrent" = false WHERE id = ANY($1::int[])`, [intArray(revisedIds)]);
  let results = 0;
  if (plan.length > 0) {
    // Epoch ids first (Observation has no foreign key, so its rows may go in before their Epoch row):
    // the observations are stored while this process hashes the new epochs, then the Epoch rows.
    const ids = await tx.query<{ id: number }>(`SELECT nextval(pg_get_serial_sequence('"Epoch"', 'id'))::int AS id FROM generate_series(1, $1::int)`, [plan.length]);
    plan.forEach((p, k) => {
      const ep = input[p.index];
      out[p.index] = { id: ids[k].id, time: ep.time, observations: ep.observations.length, revision: p.revision, contentHash: "", outcome: p.previous ? "revised" : "created" };
    });
    opts.timer?.lap("epochs");
    const toCompute: EpochToCompute[] = plan.map((p) => {
      const e = out[p.index] as StoredEpoch;
      return { id: e.id, time: e.time, points: () => new Map(resolved[p.index].map((o) => [o.point, o])) };
    });
    // The site's reference once these epochs are stored: known now unless it is (or may become) one of them.
    const first = site.firstId !== null && site.firstTime !== null ? { id: site.firstId, ms: site.firstTime.getTime() } : null;
    const siteRef =
      site.siteRef ?? (first && !revisedIds.includes(first.id) && plan.every((p) => Date.parse(input[p.index].time) > first.ms) ? first.id : undefined);
    // With the reference known, the results are planned now (no query after the inserts), computed
    // while the server stores the observations, and streamed to it after the Epoch rows.
    let resultsPlan: ResultsPlan | null = null;
    if (siteRef !== undefined) {
      resultsPlan = await planResults(tx, siteId, toCompute, { siteRef, elementsStamp: site.elementsStamp });
      opts.timer?.lap("results-read");
    }
    let resultRows: ResultColumns | undefined;
    await insertObservations(
      tx,
      plan.map((p) => ({ epochId: (out[p.index] as StoredEpoch).id, obs: resolved[p.index] })),
      pointId,
      opts.timer,
      () => {
        plan.forEach((p) => hashOf(p.index));
        opts.timer?.lap("hash");
        // A live request's results too (a backfill's are computed later, statement by statement: memory).
        if (resultsPlan && resultsPlan.rowCount <= STREAM_ROWS) {
          resultRows = resultsPlan.compute();
          opts.timer?.lap("results-compute");
        }
      },
    );
    for (const p of plan) (out[p.index] as StoredEpoch).contentHash = hashOf(p.index);
    await tx.query(
      `INSERT INTO "Epoch" (id, "siteId", "time", "revision", "isCurrent", "source", "contentHash", "createdBy")
       SELECT i, $1, t, r, true, $2, h, $3 FROM unnest($4::int[], $5::timestamptz[], $6::int[], $7::text[]) AS u(i, t, r, h)`,
      [siteId, opts.source ?? "api", opts.actor, intArray(plan.map((p) => (out[p.index] as StoredEpoch).id)), textArray(plan.map((p) => input[p.index].time)), intArray(plan.map((p) => p.revision)), textArray(plan.map((p) => hashOf(p.index)))],
    );
    opts.timer?.lap("epochs");
    await opts.failpoint?.("after-observations");

    // 4. Audit and results.
    const audit = plan.map((p) => {
      const e = out[p.index] as StoredEpoch;
      const before = p.previous ? auditSafe({ id: p.previous.id, revision: p.previous.revision, observations: p.previous.n, contentHash: p.previous.contentHash }) : null;
      const after = auditSafe({ time: e.time, observations: e.observations, contentHash: e.contentHash, revision: e.revision, source: opts.source ?? "api" });
      return { action: p.previous ? "epoch.revise" : "epoch.upload", entityId: String(e.id), before: before === null ? null : JSON.stringify(before), after: after === null ? null : JSON.stringify(after) };
    });
    // With the audit rows, the epochs' places in the alert backlog (lib/server/alerts/backlog.ts): the
    // evaluation after commit takes them out; a sweep evaluates what a stopped process left.
    await tx.query(
      `WITH backlog AS (INSERT INTO "AlertBacklog" ("epochId", "siteId") SELECT unnest($7::int[]), $2)
       INSERT INTO "AuditEntry" (actor, "siteId", action, "entityType", "entityId", before, after)
       SELECT $1, $2, a, 'epoch', i, b, c FROM unnest($3::text[], $4::text[], $5::jsonb[], $6::jsonb[]) AS u(a, i, b, c)`,
      [
        opts.actor,
        siteId,
        textArray(audit.map((a) => a.action)),
        textArray(audit.map((a) => a.entityId)),
        textArray(audit.map((a) => a.before)),
        textArray(audit.map((a) => a.after)),
        intArray(plan.map((p) => (out[p.index] as StoredEpoch).id)),
      ],
    );
    opts.timer?.lap("audit");
    // The stored epochs go to the results step as they are in memory (no re-read of what was just written).
    results = resultsPlan ? await storeResults(tx, resultsPlan, opts.timer, resultRows) : await computeResultsForEpochs(tx, siteId, toCompute, { timer: opts.timer });
    await opts.failpoint?.("after-results");
  }
  return { stored: plan.length > 0, epochs: out as StoredEpoch[], newPoints, results };
}
