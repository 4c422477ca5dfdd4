/**
 * Alert evaluation after epochs are committed: for every enabled rule of the site and every element
 * of the rule, the element's results at the new epochs are run through the state machine
 * (lib/triggers/evaluate.ts) in epoch time order, and the transitions are written: one Alert per rule
 * and element while the condition lasts, one AlertEvent per change, mail rows for openings and
 * escalations. All of it in one transaction under a per-site advisory lock, so two ingests of the same
 * site cannot both open an alert; mails are queued only after commit (runAlerting). The transaction
 * is a plain pg one with parameterised SQL (lib/server/ingest/pg-tx.ts), as ingest's is: through
 * Prisma's interactive transaction the same work cost about 40 ms per live epoch of ~4,000 elements
 * (test/bench/ingest.ts), nearly all of it per-call overhead.
 *
 * Which results: the element's reference epoch as the results engine uses it (Element.referenceEpochId,
 * else the site's reference); only current epoch revisions. An epoch not later than an open alert's last
 * evaluated epoch is skipped for that alert (late data does not rewrite an alert's past). A rate uses the
 * element's last result before the first new epoch, then the new epochs in order.
 *
 * Recorded, not mailed: a watch (crossing seen, not significant: event "not-significant"), a held rise
 * ("not-significant"), de-escalation and clearing. After an alert is acknowledged, its escalations are
 * still recorded but no longer mailed (neither immediately nor in digests).
 */
import { getDb, type Db } from "../db/client.ts";
import type { Alert, ElementResult, TriggerRule } from "../db/generated/client.ts";
import { evaluateTransition, nextState, type AlertState, type Transition } from "../../triggers/evaluate.ts";
import { comparedValueOf, DEFAULT_SIGNIFICANCE_K, type ComparedValue, type QuantitySample } from "../../triggers/quantities.ts";
import { higherLevel, isRuleQuantity, isTriggerLevel, parseQuantity, type BaseQuantity, type RuleQuantity, type RuleSpec, type TriggerLevel } from "../../triggers/rule.ts";
import { recordAlertMails } from "../mail/outgoing.ts";
import type { AlertMailFacts } from "../mail/compose.ts";
import { mailConfigFromEnv, type MailConfig } from "../mail/config.ts";
import { enqueueMails, scheduleDigest, startMailWorker } from "../mail/queue.ts";
import { pgQuery, withPgTransaction, type Sql } from "../ingest/pg-tx.ts";
import { computedResultsOf, type ComputedEpoch } from "../results/columns.ts";
import type { PhaseTimer } from "../timing.ts";
import { floatArray, intArray, intArrayBinary, textArray } from "../ingest/sql-arrays.ts";

/** Advisory lock class of alert evaluation (the second key is the site id). */
export const ALERT_LOCK_CLASS = 727_001;

export type EvaluateOptions = {
  hasSmtp: boolean;
  publicUrl: string;
  k?: number;
  /** Phase laps (the ingest route's Server-Timing). */
  timer?: PhaseTimer;
};

export type TransitionRecord = { ruleId: number; elementId: number; epochId: number; alertId: number | null; transition: Transition };

export type EvaluationReport = { transitions: TransitionRecord[]; queuedMailIds: number[]; digestItems: number };

const VALUE_FIELD: Record<BaseQuantity, { value: keyof ElementResult; sigma: keyof ElementResult }> = {
  greenMax: { value: "greenMax", sigma: "sigmaGreenMax" },
  greenMin: { value: "greenMin", sigma: "sigmaGreenMin" },
  maxShear: { value: "maxShear", sigma: "sigmaMaxShear" },
  arealStrain: { value: "arealStrain", sigma: "sigmaArealStrain" },
  engineering: { value: "engineering", sigma: "sigmaEngineering" },
};

function sampleOf(row: ResultSample, base: BaseQuantity): QuantitySample {
  const f = VALUE_FIELD[base];
  const value = row.status === "ok" ? (row[f.value] as number | null) : null;
  const sigma = row.status === "ok" ? (row[f.sigma] as number | null) : null;
  return { timeMs: row.time.getTime(), value, sigma };
}

function stateOf(a: Pick<Alert, "clearedAt" | "level" | "isSignificant"> | null): AlertState {
  if (!a || a.clearedAt || !isTriggerLevel(a.level)) return { status: "none" };
  return { status: a.isSignificant ? "open" : "watch", level: a.level };
}

function responseFor(rule: { responseReview: string; responseAlert: string; responseLimit: string }, level: TriggerLevel): string {
  return level === "review" ? rule.responseReview : level === "alert" ? rule.responseAlert : rule.responseLimit;
}

/** NaN (no value in a typed result column) as null. */
const nn = (x: number): number | null => (x === x ? x : null);

type ElementHead = { id: number; name: string; label: string; kind: string; referenceEpochId: number | null };
/** What evaluation needs of an element to pick its results; the full head (name, label) only when a mail is written. */
type ElementRef = { id: number; referenceEpochId: number | null };
/** The columns the state machine reads from a result row. */
type ResultSample = Pick<ElementResult, "elementId" | "epochId" | "time" | "status"> & Partial<Record<keyof ElementResult, unknown>>;

/**
 * Everything evaluation reads that does not need the site's alert lock: the rules, the epochs, the
 * elements and their results. Through the plain pg pool (Prisma's per-call cost is most of the time at
 * thousands of rows); results are committed rows of committed epochs, which evaluation never writes.
 * The rules, the epochs and the site's head (reference, previous epoch) are three concurrent reads.
 * When this process has just computed the new epochs (computedResultsOf), their rows and the element
 * set they were computed for come from memory; otherwise results are read by the full key at the new
 * epochs and at the site's current epoch just before them (the predecessor a rate needs), and an
 * element without a usable result there gets its own look-back.
 */
async function readInputs(siteId: number, epochIds: readonly number[], timer?: PhaseTimer) {
  const ids = intArray([...epochIds]);
  const [rules, epochs, heads, sites, recipients] = await Promise.all([
    pgQuery<TriggerRule>(`SELECT * FROM "TriggerRule" WHERE "siteId" = $1 AND enabled ORDER BY id`, [siteId]),
    pgQuery<{ id: number; time: Date }>(`SELECT id, "time" FROM "Epoch" WHERE "siteId" = $1 AND id = ANY($2::int[]) AND "isCurrent" ORDER BY "time", id`, [siteId, ids]),
    pgQuery<{ siteRef: number | null; firstEpoch: number | null; prevId: number | null; prevTime: Date | null }>(
      `SELECT s."referenceEpochId" AS "siteRef",
              (SELECT id FROM "Epoch" WHERE "siteId" = s.id AND "isCurrent" ORDER BY "time", id LIMIT 1) AS "firstEpoch",
              p.id AS "prevId", p."time" AS "prevTime"
         FROM "Site" s
         LEFT JOIN LATERAL (
           SELECT id, "time" FROM "Epoch"
            WHERE "siteId" = s.id AND "isCurrent"
              AND "time" < (SELECT min("time") FROM "Epoch" WHERE "siteId" = s.id AND id = ANY($2::int[]) AND "isCurrent")
            ORDER BY "time" DESC, id DESC LIMIT 1) p ON true
        WHERE s.id = $1`,
      [siteId, ids],
    ),
    // For the mails; recipients change rarely and a mail row records them as they were read here.
    pgQuery<AlertMailFacts["site"]>(`SELECT id, slug, name, "timeZone" FROM "Site" WHERE id = $1`, [siteId]),
    pgQuery<{ email: string; minLevel: string; digest: boolean }>(`SELECT email, "minLevel", digest FROM "MailRecipient" WHERE "siteId" = $1 ORDER BY id`, [siteId]),
  ]);
  timer?.lap("alerts-read");
  if (rules.length === 0 || epochs.length === 0) return null;
  const head = heads[0];
  const allElementIds = new Set(rules.flatMap((r) => r.elementIds));
  const siteRef = head?.siteRef ?? head?.firstEpoch ?? null;
  // The element set of the results just computed in this process, else the database's.
  const computed = epochs.map((e) => computedResultsOf(e.id));
  const known = computed.every((c) => c !== undefined) ? (computed[0] as ComputedEpoch).elements : null;
  const elementRows: ElementRef[] = known
    ? known.filter((e) => allElementIds.has(e.id))
    : await pgQuery<ElementRef>(`SELECT id, "referenceEpochId" FROM "Element" WHERE "siteId" = $1 AND id = ANY($2::int[]) AND "disabledAt" IS NULL`, [siteId, intArray([...allElementIds])]);
  const elements = new Map(elementRows.map((e) => [e.id, e]));
  const refOf = (elementId: number): number | null => elements.get(elementId)?.referenceEpochId ?? siteRef;
  const refs = [...elements.keys()].map((id) => ({ id, ref: refOf(id) })).filter((p): p is { id: number; ref: number } => p.ref !== null);
  const refById = new Map(refs.map((p) => [p.id, p.ref]));

  // Only the columns the rules compare (a whitelist: the names come from VALUE_FIELD).
  const bases = [...new Set(rules.filter((r) => isRuleQuantity(r.quantity)).map((r) => parseQuantity(r.quantity as RuleQuantity).base))];
  const cols = bases.flatMap((b) => [VALUE_FIELD[b].value, VALUE_FIELD[b].sigma]).map((c) => `r."${String(c)}"`);
  const select = [`r."elementId"`, `r."epochId"`, `r."time"`, `r.status`, ...cols].join(", ");
  const rateElements = new Set(rules.filter((r) => isRuleQuantity(r.quantity) && parseQuantity(r.quantity).isRate).flatMap((r) => r.elementIds));
  const wantPrev = head?.prevId != null && rateElements.size > 0;
  const at = [...(wantPrev ? [{ id: head.prevId as number, time: head.prevTime as Date }] : []), ...epochs];
  // Epochs this process has just computed come from memory (every wanted element's row there); the others from the database.
  const rows: ResultSample[] = [];
  const fromDb: { id: number; time: Date }[] = [];
  for (const ep of at) {
    const c = computedResultsOf(ep.id);
    const mine: ResultSample[] = [];
    if (c) {
      const { elementId: eid, epochId: pid, referenceEpochId: rid, status, length } = c.columns;
      // Every compared column in one literal (one object shape for all rows), read from the typed columns (NaN: no value).
      const v = c.columns.values;
      const [gMax, sgMax, gMin, sgMin, sh, ssh, ar, sar, en, sen] = [v.greenMax, v.sigmaGreenMax, v.greenMin, v.sigmaGreenMin, v.maxShear, v.sigmaMaxShear, v.arealStrain, v.sigmaArealStrain, v.engineering, v.sigmaEngineering];
      for (let i = 0; i < length; i++) {
        if (pid[i] !== ep.id || refById.get(eid[i]) !== rid[i]) continue;
        mine.push({
          elementId: eid[i],
          epochId: ep.id,
          time: ep.time,
          status: status[i],
          greenMax: nn(gMax[i]),
          sigmaGreenMax: nn(sgMax[i]),
          greenMin: nn(gMin[i]),
          sigmaGreenMin: nn(sgMin[i]),
          maxShear: nn(sh[i]),
          sigmaMaxShear: nn(ssh[i]),
          arealStrain: nn(ar[i]),
          sigmaArealStrain: nn(sar[i]),
          engineering: nn(en[i]),
          sigmaEngineering: nn(sen[i]),
        });
      }
    }
    if (c && mine.length === refs.length) rows.push(...mine);
    else fromDb.push(ep);
  }
  if (fromDb.length > 0) rows.push(...(await readPackedResults(refs, fromDb, bases)));
  /** Result rows by epoch id, then element id. */
  const rowAt = new Map<number, Map<number, ResultSample>>();
  for (const ep of epochs) rowAt.set(ep.id, new Map());
  const prevRow = new Map<number, ResultSample>();
  for (const r of rows) {
    if (wantPrev && r.epochId === head.prevId) {
      if (r.status === "ok" && rateElements.has(r.elementId)) prevRow.set(r.elementId, r);
    } else rowAt.get(r.epochId)?.set(r.elementId, r);
  }
  // Rate elements without a usable result at the previous epoch: their last one before it.
  const lookBack = refs.filter((p) => rateElements.has(p.id) && !prevRow.has(p.id));
  if (lookBack.length > 0) {
    const prev = await pgQuery<ResultSample>(
      `SELECT p.* FROM unnest($1::int[], $2::int[]) AS k(eid, rid)
         CROSS JOIN LATERAL (
           SELECT ${select} FROM "ElementResult" r
            WHERE r."elementId" = k.eid AND r."referenceEpochId" = k.rid AND r."time" < $3 AND r.status = 'ok'
              AND r."epochId" NOT IN (SELECT e.id FROM "Epoch" e WHERE e."siteId" = $4 AND NOT e."isCurrent")
            ORDER BY r."time" DESC, r."epochId" DESC LIMIT 1) p`,
      [intArray(lookBack.map((p) => p.id)), intArray(lookBack.map((p) => p.ref)), epochs[0].time.toISOString(), siteId],
    );
    for (const p of prev) prevRow.set(p.elementId, p);
  }
  timer?.lap("alerts-results");
  return { rules, epochs, elements, rowAt, prevRow, site: sites[0] ?? null, recipients };
}

/** Alerts whose only change is the latest value: one UPDATE for all of them. */
async function writeStays(sql: Sql, stays: readonly { id: number; lastEpochId: number; value: number; sigma: number | null }[]): Promise<void> {
  await sql.query(
    `UPDATE "Alert" a SET "lastEpochId" = u.e, value = u.v, sigma = u.s
       FROM unnest($1::int[], $2::int[], $3::float8[], $4::float8[]) AS u(id, e, v, s) WHERE a.id = u.id`,
    [intArray(stays.map((x) => x.id)), intArray(stays.map((x) => x.lastEpochId)), floatArray(stays.map((x) => x.value)), floatArray(stays.map((x) => x.sigma))],
  );
}

/** Alert columns evaluation may set; the names are this whitelist, the values parameters. */
type AlertChange = Partial<Pick<Alert, "level" | "peakLevel" | "isSignificant" | "openedAt" | "openedEpochId" | "lastEpochId" | "value" | "sigma" | "clearedAt">>;

async function insertAlert(sql: Sql, a: Pick<Alert, "siteId" | "ruleId" | "elementId" | "level" | "peakLevel" | "openedAt" | "openedEpochId" | "lastEpochId" | "value" | "sigma" | "isSignificant">): Promise<Alert> {
  const [row] = await sql.query<Alert>(
    `INSERT INTO "Alert" ("siteId", "ruleId", "elementId", level, "peakLevel", "openedAt", "openedEpochId", "lastEpochId", value, sigma, "isSignificant")
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11) RETURNING *`,
    [a.siteId, a.ruleId, a.elementId, a.level, a.peakLevel, a.openedAt, a.openedEpochId, a.lastEpochId, a.value, a.sigma, a.isSignificant],
  );
  return row;
}

async function updateAlert(sql: Sql, id: number, change: AlertChange): Promise<Alert> {
  const keys = Object.keys(change) as (keyof AlertChange)[];
  const set = keys.map((k, i) => `"${k}" = $${i + 2}`).join(", ");
  const [row] = await sql.query<Alert>(`UPDATE "Alert" SET ${set} WHERE id = $1 RETURNING *`, [id, ...keys.map((k) => change[k])]);
  return row;
}

async function insertEvent(sql: Sql, e: { alertId: number; at: Date; kind: string; level: TriggerLevel; value: number; comment: string | null }): Promise<bigint> {
  const [row] = await sql.query<{ id: string }>(
    `INSERT INTO "AlertEvent" ("alertId", at, kind, level, value, actor, comment) VALUES ($1, $2, $3, $4, $5, 'system', $6) RETURNING id::text AS id`,
    [e.alertId, e.at, e.kind, e.level, e.value, e.comment],
  );
  return BigInt(row.id);
}

/**
 * Result rows of the given elements (with their references) at the given epochs, by the full key,
 * returned as one row of packed big-endian byte strings (int4send/float8send, as lib/server/series.ts
 * does) and unpacked here: thousands of rows cost one small decode instead of one parsed row object
 * each. A NULL value or σ arrives as NaN and is given back as null.
 */
async function readPackedResults(refs: readonly { id: number; ref: number }[], at: readonly { id: number; time: Date }[], bases: readonly BaseQuantity[]): Promise<ResultSample[]> {
  if (refs.length === 0 || at.length === 0) return [];
  const cols = bases.flatMap((b) => [VALUE_FIELD[b].value, VALUE_FIELD[b].sigma]).map(String);
  const agg = cols.map((c, i) => `string_agg(float8send(coalesce(r."${c}", 'NaN'::float8)), ''::bytea) AS c${i}`).join(", ");
  const [packed] = await pgQuery<Record<string, Buffer | number | null>>(
    `SELECT count(*)::int AS n, string_agg(int4send(r."elementId"), ''::bytea) AS e, string_agg(int4send(r."epochId"), ''::bytea) AS p,
            string_agg(int4send((r.status = 'ok')::int), ''::bytea) AS ok${agg ? ", " + agg : ""}
       FROM unnest($1::int[], $2::int[]) AS k(eid, rid)
       CROSS JOIN unnest($3::int[], $4::timestamptz[]) AS ep(id, t)
       JOIN "ElementResult" r ON r."elementId" = k.eid AND r."referenceEpochId" = k.rid AND r."time" = ep.t AND r."epochId" = ep.id`,
    [intArrayBinary(refs.map((p) => p.id)), intArrayBinary(refs.map((p) => p.ref)), intArrayBinary(at.map((e) => e.id)), textArray(at.map((e) => e.time.toISOString()))],
  );
  const n = (packed?.n as number) ?? 0;
  if (n === 0) return [];
  const view = (b: unknown): DataView => {
    const buf = b as Buffer;
    return new DataView(buf.buffer, buf.byteOffset, buf.byteLength);
  };
  const e = view(packed.e), p = view(packed.p), ok = view(packed.ok);
  const c = cols.map((_, i) => view(packed[`c${i}`]));
  const timeOf = new Map(at.map((x) => [x.id, x.time]));
  const out: ResultSample[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const epochId = p.getInt32(4 * i);
    const row: ResultSample = { elementId: e.getInt32(4 * i), epochId, time: timeOf.get(epochId) as Date, status: ok.getInt32(4 * i) === 1 ? "ok" : "not-ok" };
    for (let k = 0; k < cols.length; k++) {
      const v = c[k].getFloat64(8 * i);
      (row as Record<string, unknown>)[cols[k]] = Number.isNaN(v) ? null : v;
    }
    out[i] = row;
  }
  return out;
}

export async function evaluateAlerts(_db: Db, siteId: number, epochIds: readonly number[], opts: EvaluateOptions): Promise<EvaluationReport> {
  const k = opts.k ?? DEFAULT_SIGNIFICANCE_K;
  const empty = (): EvaluationReport => ({ transitions: [], queuedMailIds: [], digestItems: 0 });
  if (epochIds.length === 0) return empty();
  // Most epochs of most sites meet no enabled rule: that is answered without opening a transaction.
  const inputs = await readInputs(siteId, epochIds, opts.timer);
  if (!inputs) return empty();
  const { rules, epochs, elements, rowAt, prevRow, site, recipients } = inputs;
  if (!site) return empty();
  // Element heads (name, label) only for the mails that need them, once each.
  const heads = new Map<number, ElementHead>();
  const headOf = async (sql: Sql, elementId: number): Promise<ElementHead> => {
    let h = heads.get(elementId);
    if (!h) {
      [h] = await sql.query<ElementHead>(`SELECT id, name, label, kind, "referenceEpochId" FROM "Element" WHERE id = $1`, [elementId]);
      heads.set(elementId, h);
    }
    return h;
  };
  const report = await withPgTransaction(
    async (tx) => {
      await tx.query(`SELECT pg_advisory_xact_lock($1::int, $2::int)`, [ALERT_LOCK_CLASS, siteId]);
      const report = empty();
      const openAlerts = await tx.query<Alert & { lastTime: Date | null }>(
        `SELECT a.*, e."time" AS "lastTime" FROM "Alert" a LEFT JOIN "Epoch" e ON e.id = a."lastEpochId"
          WHERE a."siteId" = $1 AND a."clearedAt" IS NULL AND a."ruleId" = ANY($2::int[]) ORDER BY a.id`,
        [siteId, intArray(rules.map((r) => r.id))],
      );
      /** Open alerts by rule id, then element id. */
      const openBy = new Map<number, Map<number, Alert>>();
      const lastEpochTime = new Map<number, number>();
      for (const a of openAlerts) {
        let m = openBy.get(a.ruleId);
        if (!m) openBy.set(a.ruleId, (m = new Map()));
        m.set(a.elementId, a);
        if (a.lastTime) lastEpochTime.set(a.lastEpochId, a.lastTime.getTime());
      }
      // Alerts whose only change is the latest value ("stay"): one UPDATE for all of them at the end.
      const stays: { id: number; lastEpochId: number; value: number; sigma: number | null }[] = [];
      const rowsOfEpoch = epochs.map((ep) => rowAt.get(ep.id));
      for (const rule of rules) {
        if (!isRuleQuantity(rule.quantity)) continue;
        const spec: RuleSpec = {
          quantity: rule.quantity,
          levels: { review: rule.reviewLevel, alert: rule.alertLevel, limit: rule.limitLevel },
          hysteresis: rule.hysteresis,
          significantOnly: rule.significantOnly,
        };
        const { base } = parseQuantity(rule.quantity);
        const openOfRule = openBy.get(rule.id);
        for (const elementId of new Set(rule.elementIds)) {
          if (!elements.has(elementId)) continue;
          let alert: Alert | null = openOfRule?.get(elementId) ?? null;
          const watermark = alert ? (lastEpochTime.get(alert.lastEpochId) ?? -Infinity) : -Infinity;
          let state = stateOf(alert);
          const p = prevRow.get(elementId);
          let prev: QuantitySample | null = p ? sampleOf(p, base) : null;
          let dirty: { lastEpochId: number; value: number; sigma: number | null } | null = null;

          for (let e = 0; e < epochs.length; e++) {
            const ep = epochs[e];
            if (ep.time.getTime() <= watermark) continue;
            const row = rowsOfEpoch[e]?.get(elementId);
            if (!row) continue;
            const sample = sampleOf(row, base);
            const v = comparedValueOf(rule.quantity, sample, prev, k);
            if (sample.value !== null) prev = sample;
            const t = evaluateTransition(spec, state, v);
            if (t.kind === "none" || t.kind === "no-value") {
              state = nextState(state, t);
              continue;
            }
            const cv = v as ComparedValue;
            const latest = { lastEpochId: ep.id, value: cv.raw, sigma: cv.sigma };
            const event = async (kind: string, level: TriggerLevel, comment: string | null = null) => ({
              id: await insertEvent(tx, { alertId: alert!.id, at: ep.time, kind, level, value: cv.raw, comment }),
            });
            const notSignificantNote = `not significant at k = ${k.toFixed(2)}: |value| ≤ k·σ; not counted (rule counts significant values only)`;
            let mailFor: { kind: "open" | "escalate"; from: TriggerLevel | null; level: TriggerLevel; eventId: bigint } | null = null;

            if (t.kind === "stay") {
              dirty = latest;
            } else if (state.status === "none") {
              // open or watch from nothing: a new alert.
              const level = t.kind === "open" || t.kind === "watch" ? t.level : null;
              if (!level) throw new Error(`unexpected transition ${t.kind} from none`);
              alert = await insertAlert(tx, { siteId, ruleId: rule.id, elementId, level, peakLevel: level, openedAt: ep.time, openedEpochId: ep.id, ...latest, isSignificant: t.kind === "open" });
              const e = await event(t.kind === "open" ? "open" : "not-significant", level, t.kind === "open" ? null : notSignificantNote);
              if (t.kind === "open") mailFor = { kind: "open", from: null, level, eventId: e.id };
              dirty = null;
            } else {
              const a: Alert = alert!;
              let data: AlertChange = { ...latest };
              if (t.kind === "open") {
                data = { ...data, level: t.level, peakLevel: higherLevel(a.peakLevel as TriggerLevel, t.level)!, isSignificant: true, openedAt: ep.time, openedEpochId: ep.id };
                const e = await event("open", t.level);
                mailFor = { kind: "open", from: null, level: t.level, eventId: e.id };
              } else if (t.kind === "watch") {
                data = { ...data, level: t.level, peakLevel: higherLevel(a.peakLevel as TriggerLevel, t.level)! };
                await event("not-significant", t.level, notSignificantNote);
              } else if (t.kind === "escalate") {
                data = { ...data, level: t.level, peakLevel: higherLevel(a.peakLevel as TriggerLevel, t.level)! };
                const e = await event("escalate", t.level, `from ${t.from}`);
                mailFor = { kind: "escalate", from: t.from, level: t.level, eventId: e.id };
              } else if (t.kind === "held") {
                await event("not-significant", t.wouldBe, `${notSignificantNote}; level stays ${t.level}`);
              } else if (t.kind === "de-escalate") {
                data = { ...data, level: t.level };
                await event("de-escalate", t.level, `from ${t.from}`);
              } else if (t.kind === "clear") {
                data = { ...data, clearedAt: ep.time };
                await event("clear", t.from, "fell below review − hysteresis");
              }
              alert = await updateAlert(tx, a.id, data);
              dirty = null;
            }

            report.transitions.push({ ruleId: rule.id, elementId, epochId: ep.id, alertId: alert?.id ?? null, transition: t });
            if (mailFor && alert && !alert.acknowledgedAt) {
              const element = await headOf(tx, elementId);
              const facts: AlertMailFacts = {
                site,
                element: { id: element.id, name: element.name, label: element.label, kind: element.kind },
                rule: { name: rule.name, quantity: rule.quantity, levels: spec.levels, hysteresis: spec.hysteresis, response: responseFor(rule, mailFor.level) },
                eventKind: mailFor.kind,
                fromLevel: mailFor.from,
                level: mailFor.level,
                value: cv.raw,
                sigma: cv.sigma,
                isSignificant: cv.isSignificant,
                time: ep.time,
                publicUrl: opts.publicUrl,
              };
              const m = await recordAlertMails(tx, { siteId, alertId: alert.id, eventId: mailFor.eventId, facts, recipients, hasSmtp: opts.hasSmtp });
              report.queuedMailIds.push(...m.queuedIds);
              report.digestItems += m.digestItems;
            }
            state = nextState(state, t);
            if (state.status === "none") alert = null;
          }
          if (dirty && alert) stays.push({ id: alert.id, ...dirty });
        }
      }
      opts.timer?.lap("alerts-evaluate");
      if (stays.length > 0) await writeStays(tx, stays);
      return report;
    },
    { timeoutMs: 300_000 },
  );
  opts.timer?.lap("alerts-write");
  return report;
}

/**
 * Evaluates and then, after commit, hands the mails to the job queue. The queue's own configuration
 * (startMailWorker) decides between SMTP and the outbox; if the queue cannot start, alerts are still
 * evaluated from the environment's settings and the mails wait as `queued` for the next worker start.
 */
export async function runAlerting(siteId: number, epochIds: readonly number[], timer?: PhaseTimer): Promise<EvaluationReport> {
  let config: MailConfig;
  let queueUp = true;
  try {
    config = (await startMailWorker()).config;
  } catch (err) {
    console.error("epochal: the job queue did not start; alert mails wait in the table", err);
    config = mailConfigFromEnv();
    queueUp = false;
  }
  const report = await evaluateAlerts(getDb(), siteId, epochIds, { hasSmtp: config.smtpUrl !== null, publicUrl: config.publicUrl, timer });
  if (queueUp) {
    await enqueueMails(report.queuedMailIds);
    if (report.digestItems > 0) await scheduleDigest(siteId);
  }
  return report;
}
