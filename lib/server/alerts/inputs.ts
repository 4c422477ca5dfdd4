/**
 * What alert evaluation reads before it takes the site's lock: the rules, the epochs, the elements
 * and their results, from memory where this process has just computed them.
 */
import type { ElementResult, TriggerRule } from "../db/generated/client.ts";
import type { QuantitySample } from "../../triggers/quantities.ts";
import { isRuleQuantity, parseQuantity, type BaseQuantity, type RuleQuantity } from "../../triggers/rule.ts";
import { pgQuery } from "../ingest/pg-tx.ts";
import { computedResultsOf, type ComputedEpoch } from "../results/columns.ts";
import type { PhaseTimer } from "../timing.ts";
import { intArray, intArrayBinary, textArray } from "../ingest/sql-arrays.ts";

export const VALUE_FIELD: Record<BaseQuantity, { value: keyof ElementResult; sigma: keyof ElementResult }> = {
  greenMax: { value: "greenMax", sigma: "sigmaGreenMax" },
  greenMin: { value: "greenMin", sigma: "sigmaGreenMin" },
  maxShear: { value: "maxShear", sigma: "sigmaMaxShear" },
  arealStrain: { value: "arealStrain", sigma: "sigmaArealStrain" },
  engineering: { value: "engineering", sigma: "sigmaEngineering" },
};

export function sampleOf(row: ResultSample, base: BaseQuantity): QuantitySample {
  const f = VALUE_FIELD[base];
  const value = row.status === "ok" ? (row[f.value] as number | null) : null;
  const sigma = row.status === "ok" ? (row[f.sigma] as number | null) : null;
  return { timeMs: row.time.getTime(), value, sigma };
}

/** NaN (no value in a typed result column) as null. */
const nn = (x: number): number | null => (x === x ? x : null);
export type ElementHead = { id: number; name: string; label: string; kind: string; referenceEpochId: number | null };
/** What evaluation needs of an element to pick its results; the full head (name, label) only when a mail is written. */
type ElementRef = { id: number; referenceEpochId: number | null };
/** The columns the state machine reads from a result row. */
export type ResultSample = Pick<ElementResult, "elementId" | "epochId" | "time" | "status"> & Partial<Record<keyof ElementResult, unknown>>;

/**
 * Everything evaluation reads that does not need the site's alert lock: the rules, the epochs, the
 * elements and their results. Through the plain pg pool (Prisma's per-call cost is most of the time at
 * thousands of rows); results are committed rows of committed epochs, which evaluation never writes.
 * The rules, the epochs and the site's head (reference, previous epoch) are three concurrent reads.
 * What only a mail needs (the site's name, the recipients, element names) is read when one is written.
 * When this process has just computed the new epochs (computedResultsOf), their rows and the element
 * set they were computed for come from memory; otherwise results are read by the full key at the new
 * epochs and at the site's current epoch just before them (the predecessor a rate needs), and an
 * element without a usable result there gets its own look-back.
 */
export async function readInputs(siteId: number, epochIds: readonly number[], timer?: PhaseTimer) {
  const ids = intArray([...epochIds]);
  const [rules, epochs, heads] = await Promise.all([
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
  return { rules, epochs, elements, rowAt, prevRow };
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

