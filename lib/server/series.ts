/**
 * Series of an element quantity or of a point's displacement, for charts and exports: cumulative
 * (against the reference epoch), incremental (between consecutive epochs) or rate per day, each value
 * with its σ and significance, downsampled to `maxPoints` without losing peaks (lib/series/lttb.ts).
 *
 * Times are UTC: `t` is ISO 8601 with `Z`; `local` is the same instant in the site's time zone
 * (luxon), for display. Element series read ElementResult rows against the element's effective
 * reference epoch, at current epochs (a superseded revision's rows are kept in the table but never
 * shown), status "ok" only (other epochs are counted in `skipped`). The read is one lean
 * raw query that returns the three needed columns as packed 8-byte arrays (one row), decoded into
 * Float64Arrays, so a year of 15-minute epochs costs a few milliseconds rather than 35,040 row objects.
 */
// No "server-only" marker: the benchmark and the CLI import this module outside Next.js too.
import { Prisma } from "./db/generated/client.ts";
import type { Db } from "./db/client.ts";
import type { SiteRow } from "./http/route.ts";
import { AppError } from "./errors.ts";
import { pgCopyOut, pgQuery } from "./ingest/pg-tx.ts";
import { parseCopyBinary, readInt4 } from "../formats/pg-copy-binary.ts";
import { incrementalSeries, isSignificant, rateSeries, type SeriesArrays } from "../series/increments.ts";
import { downsampleIndices } from "../series/lttb.ts";
import { localIsoTimes } from "../series/local-time.ts";
import { decodeFloat8BE, decodePgTimestampsMs, orderByTime } from "../series/packed.ts";
import { displacementComponent, type DisplacementComponent } from "../series/displacement.ts";
import { effectiveReferenceEpochId } from "./results/element-history.ts";
import { getElementRow } from "./elements.ts";
import type { ElementQuantity, ElementSeriesQuery, PointSeriesQuery, SeriesMode } from "./schemas/elements.ts";

/** Two-sided 95 % normal factor (domain.md §4). */
export const SIGNIFICANCE_K = 1.96;

/** Stored column and σ column of each quantity (whitelist: these names go into SQL). */
const QUANTITY_COLUMNS: Record<ElementQuantity, { value: string; sigma: string | null; unit: string }> = {
  greenMax: { value: "greenMax", sigma: "sigmaGreenMax", unit: "strain" },
  greenMin: { value: "greenMin", sigma: "sigmaGreenMin", unit: "strain" },
  maxShear: { value: "maxShear", sigma: "sigmaMaxShear", unit: "strain" },
  arealStrain: { value: "arealStrain", sigma: "sigmaArealStrain", unit: "strain" },
  rotationDeg: { value: "rotationDeg", sigma: null, unit: "deg" },
  engineering: { value: "engineering", sigma: "sigmaEngineering", unit: "strain" },
};

export interface SeriesPoint {
  t: string;
  local: string;
  value: number;
  sigma: number | null;
  /** |value| > 1.96 σ; null where σ is not known (rotation). */
  significant: boolean | null;
}

export interface SeriesResponse {
  mode: SeriesMode;
  /** Unit of `value`: "strain" (dimensionless), "deg", "m"; rates add "/day". */
  unit: string;
  timeZone: string;
  referenceEpoch: { id: number; time: string } | null;
  /** Values in the range before downsampling. */
  count: number;
  /** Epochs in the range without a usable value (degenerate, missing point). */
  skipped: number;
  downsampled: boolean;
  method: string | null;
  significanceK: number;
  note: string | null;
  points: SeriesPoint[];
}

/** The packed read: counts, the three byte strings, and the reference epoch's time (null when it has no row). */
type Packed = { n: number; t: Uint8Array | null; v: Uint8Array | null; s: Uint8Array | null; skipped: number; refTime: Uint8Array | null };

/**
 * Rows of an element against one reference at the site's current epoch revisions. Superseded
 * revisions are few; the hashed sub-plan over them (index on (siteId, isCurrent, time)) costs less
 * than joining every result row to its epoch. `el` and `ref` are the element and reference: SQL
 * text, placeholders for a parameterised query or checked literals for COPY.
 */
function currentRows(el: string, ref: string): string {
  return `r."elementId" = ${el} AND r."referenceEpochId" = ${ref}
  AND r."epochId" NOT IN (SELECT e.id FROM "Epoch" e WHERE e."siteId" = (SELECT el."siteId" FROM "Element" el WHERE el.id = ${el}) AND NOT e."isCurrent")`;
}

/** An id as an SQL literal (COPY takes no parameters). */
function idLiteral(id: number): string {
  if (!Number.isSafeInteger(id)) throw new TypeError(`series read: id ${id} is not an integer`);
  return String(id);
}

/** An instant as an SQL literal: toISOString writes only digits, "-", ":", ".", "T" and "Z". */
function timeLiteral(d: Date): string {
  return `'${d.toISOString()}'::timestamptz`;
}

/**
 * One row: n, skipped, and the times, values and σ as packed byte strings, through the plain `pg`
 * pool (lib/server/ingest/pg-tx.ts) as binary COPY. Measured on a year of 15-minute epochs
 * (test/bench/series.ts, EXPLAIN ANALYZE, backend CPU time and perf), what the read costs and what
 * this query avoids:
 * - Prisma's raw path, which copies and decodes the three quarter-megabyte strings slowly;
 * - hex text: as an ordinary result a bytea goes out as hex that PostgreSQL writes and pg turns
 *   into a string and back into bytes (about 12 ms of Node.js CPU per year of epochs); binary COPY
 *   hands over the bytes as they are;
 * - `extract(epoch …)`, which returns numeric: numeric arithmetic per row was a third of the
 *   query; times go out as timestamptz_send (the stored int64 µs) and are converted in Node;
 * - ORDER BY: sorting 35,040 rows was another third. The aggregates all advance on the same input
 *   row, so the three strings stay aligned whatever the scan order, and the scan order is the
 *   insertion order, which live ingest writes in time order; `decodePacked` checks the order and
 *   sorts only when it is not (a back-filled site; lib/series/packed.ts). Times are unique here
 *   (one current revision per site and time, index "Epoch_one_current"): no tie-break is needed.
 * What remains on the server is mostly copying and first-touching the large strings. The same row
 * carries the reference epoch's time, which saves the series a round trip of its own.
 */
async function readPacked(elementId: number, refId: number, q: { value: string; sigma: string | null }, from: Date | null, to: Date | null): Promise<Packed> {
  const v = `r."${q.value}"`;
  const s = q.sigma ? `coalesce(r."${q.sigma}", 'NaN'::float8)` : `'NaN'::float8`;
  const lo = from ? `AND r."time" >= ${timeLiteral(from)}` : "";
  const hi = to ? `AND r."time" <= ${timeLiteral(to)}` : "";
  const bytes = await pgCopyOut(
    `COPY (SELECT (count(*) FILTER (WHERE ok))::int AS n,
                  (count(*) FILTER (WHERE NOT ok))::int AS skipped,
                  string_agg(timestamptz_send(tm), ''::bytea) FILTER (WHERE ok) AS t,
                  string_agg(float8send(val), ''::bytea) FILTER (WHERE ok) AS v,
                  string_agg(float8send(sig), ''::bytea) FILTER (WHERE ok) AS s,
                  (SELECT timestamptz_send(e."time") FROM "Epoch" e WHERE e.id = ${idLiteral(refId)}) AS ref
             FROM (SELECT r."time" AS tm, ${v} AS val, ${s} AS sig, (r.status = 'ok' AND ${v} IS NOT NULL) AS ok
                     FROM "ElementResult" r
                    WHERE ${currentRows(idLiteral(elementId), idLiteral(refId))} ${lo} ${hi}) x) TO STDOUT (FORMAT binary)`,
  );
  const rows = parseCopyBinary(bytes);
  const [n, skipped, t, vs, ss, ref] = rows.length === 1 && rows[0].length === 6 ? rows[0] : [];
  if (!n || !skipped) throw new Error("series read: expected one row of six fields");
  return { n: readInt4(n), skipped: readInt4(skipped), t: t ?? null, v: vs ?? null, s: ss ?? null, refTime: ref ?? null };
}

function decodePacked(p: Packed): SeriesArrays {
  return orderByTime({ tMs: decodePgTimestampsMs(p.t, p.n), value: decodeFloat8BE(p.v, p.n), sigma: decodeFloat8BE(p.s, p.n) });
}

/** The last usable value strictly before `from` (the predecessor an increment at `from` needs). */
async function readBefore(elementId: number, refId: number, q: { value: string; sigma: string | null }, from: Date): Promise<{ tMs: number; value: number; sigma: number } | null> {
  const v = `r."${q.value}"`;
  const s = q.sigma ? `r."${q.sigma}"` : `NULL::float8`;
  const rows = await pgQuery<{ tm: number; val: number; sig: number | null }>(
    `SELECT (extract(epoch FROM r."time") * 1000)::float8 AS tm, ${v} AS val, ${s} AS sig
       FROM "ElementResult" r
      WHERE ${currentRows("$1", "$2")} AND r."time" < $3::timestamptz AND r.status = 'ok' AND ${v} IS NOT NULL
      ORDER BY r."time" DESC, r."epochId" DESC LIMIT 1`,
    [elementId, refId, from],
  );
  return rows[0] ? { tMs: rows[0].tm, value: rows[0].val, sigma: rows[0].sig ?? NaN } : null;
}

function prepend(s: SeriesArrays, p: { tMs: number; value: number; sigma: number }): SeriesArrays {
  const n = s.tMs.length;
  const out: SeriesArrays = { tMs: new Float64Array(n + 1), value: new Float64Array(n + 1), sigma: new Float64Array(n + 1) };
  out.tMs[0] = p.tMs;
  out.value[0] = p.value;
  out.sigma[0] = p.sigma;
  out.tMs.set(s.tMs, 1);
  out.value.set(s.value, 1);
  out.sigma.set(s.sigma, 1);
  return out;
}

function view(s: SeriesArrays, mode: SeriesMode): SeriesArrays {
  return mode === "cumulative" ? s : mode === "incremental" ? incrementalSeries(s) : rateSeries(s);
}

/** Downsamples and formats; the σ-less quantities report null σ and significance. */
function format(s: SeriesArrays, maxPoints: number, timeZone: string, hasSigma: boolean): { points: SeriesPoint[]; downsampled: boolean } {
  const idx = downsampleIndices(s.tMs, s.value, maxPoints);
  const keptT = new Float64Array(idx.length);
  for (let k = 0; k < idx.length; k++) keptT[k] = s.tMs[idx[k]];
  const local = localIsoTimes(keptT, timeZone);
  const points: SeriesPoint[] = new Array(idx.length);
  for (let k = 0; k < idx.length; k++) {
    const i = idx[k];
    const sigma = s.sigma[i];
    const known = hasSigma && Number.isFinite(sigma);
    points[k] = {
      t: new Date(keptT[k]).toISOString(),
      local: local[k],
      value: s.value[i],
      sigma: known ? sigma : null,
      significant: known ? isSignificant(s.value[i], sigma, SIGNIFICANCE_K) : null,
    };
  }
  return { points, downsampled: idx.length < s.tMs.length };
}

const LTTB_METHOD = "largest-triangle-three-buckets (Steinarsson 2013), keeping each bucket's largest |value|, the global max and min, and the first and last points";
const INCREMENT_NOTE = "σ of increments and rates treats the two cumulative values as independent (first order); the shared reference makes the true σ somewhat smaller.";

/** The element's cumulative values in [from, to] as typed arrays, and the reference used. */
export async function readElementArrays(_db: Db, elementId: number, refId: number, quantity: ElementQuantity, from: Date | null, to: Date | null): Promise<SeriesArrays & { skipped: number }> {
  // Committed rows only, through the pg pool on the same DATABASE_URL (see readPacked); `_db` keeps
  // the signature of the other reads (callers never pass a transaction).
  const q = QUANTITY_COLUMNS[quantity];
  const p = await readPacked(elementId, refId, q, from, to);
  return { ...decodePacked(p), skipped: p.skipped };
}

export async function elementSeries(db: Db, site: SiteRow, elementId: number, query: ElementSeriesQuery): Promise<SeriesResponse & { element: { id: number; name: string; label: string; kind: string; mode: string }; quantity: ElementQuantity }> {
  const el = await getElementRow(db, site, elementId);
  const q = QUANTITY_COLUMNS[query.quantity];
  if (query.quantity === "engineering" ? el.kind !== "baseline" : el.kind === "baseline")
    throw new AppError("invalid", `quantity: ${query.quantity} is not a quantity of a ${el.kind}`, { errors: [{ line: null, field: "quantity", message: `${query.quantity} is not a quantity of a ${el.kind}` }] });
  const refId = await effectiveReferenceEpochId(db, el);
  const elementHead = { id: el.id, name: el.name, label: el.label, kind: el.kind, mode: el.mode };
  const unit = query.mode === "rate" ? `${q.unit}/day` : q.unit;
  if (refId === null)
    return { element: elementHead, quantity: query.quantity, mode: query.mode, unit, timeZone: site.timeZone, referenceEpoch: null, count: 0, skipped: 0, downsampled: false, method: null, significanceK: SIGNIFICANCE_K, note: null, points: [] };
  // An increment at `from` needs the value before it: read it beside the range.
  const [packed, prev] = await Promise.all([
    readPacked(el.id, refId, q, query.from ?? null, query.to ?? null),
    query.mode !== "cumulative" && query.from ? readBefore(el.id, refId, q, query.from) : null,
  ]);
  const arrays = { ...decodePacked(packed), skipped: packed.skipped };
  const refTimeMs = packed.refTime ? decodePgTimestampsMs(packed.refTime, 1)[0] : null;
  const base: SeriesArrays = prev ? prepend(arrays, prev) : arrays;
  const s = view(base, query.mode);
  const { points, downsampled } = format(s, query.maxPoints, site.timeZone, q.sigma !== null);
  return {
    element: elementHead,
    quantity: query.quantity,
    mode: query.mode,
    unit,
    timeZone: site.timeZone,
    referenceEpoch: refTimeMs === null ? null : { id: refId, time: new Date(refTimeMs).toISOString() },
    count: s.tMs.length,
    skipped: arrays.skipped,
    downsampled,
    method: downsampled ? LTTB_METHOD : null,
    significanceK: SIGNIFICANCE_K,
    note: query.mode === "cumulative" ? null : INCREMENT_NOTE,
    points,
  };
}

type ObsRow = { tm: number; east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number; sigmaHeight: number };

/**
 * Displacement of one point against the site's reference epoch (Site.referenceEpochId, else its first
 * current epoch), at every current epoch at or after it in which the point was observed.
 */
export async function pointSeries(db: Db, site: SiteRow, code: string, query: PointSeriesQuery): Promise<SeriesResponse & { point: { code: string }; component: DisplacementComponent }> {
  const point = await db.point.findUnique({ where: { siteId_code: { siteId: site.id, code } }, select: { id: true, code: true } });
  if (!point) throw new AppError("not_found", `No point "${code}" on site "${site.slug}".`);
  const refId = await effectiveReferenceEpochId(db, { siteId: site.id, referenceEpochId: null });
  const unit = query.mode === "rate" ? "m/day" : "m";
  const empty = { point: { code: point.code }, component: query.component, mode: query.mode, unit, timeZone: site.timeZone, count: 0, skipped: 0, downsampled: false, method: null, significanceK: SIGNIFICANCE_K, note: null, points: [] };
  if (refId === null) return { ...empty, referenceEpoch: null };
  const refEpoch = await db.epoch.findUnique({ where: { id: refId }, select: { id: true, time: true } });
  const refObs = await db.observation.findUnique({ where: { epochId_pointId: { epochId: refId, pointId: point.id } } });
  const refView = refEpoch ? { id: refEpoch.id, time: refEpoch.time.toISOString() } : null;
  if (!refEpoch || !refObs) return { ...empty, referenceEpoch: refView, note: `point ${point.code} was not observed in the reference epoch` };
  // Increments at `from` need the epoch before it, so read from the reference time and cut afterwards.
  const lo = query.from && query.mode === "cumulative" ? query.from : refEpoch.time;
  const hiSql = query.to ? Prisma.sql`AND e."time" <= ${query.to}` : Prisma.empty;
  const rows = await db.$queryRaw<ObsRow[]>`
    SELECT (extract(epoch FROM e."time") * 1000)::float8 AS tm, o.east, o.north, o.height, o."sigmaEast", o."sigmaNorth", o."sigmaHeight"
      FROM "Observation" o JOIN "Epoch" e ON e.id = o."epochId"
     WHERE o."pointId" = ${point.id} AND e."isCurrent" AND e."time" >= ${lo} ${hiSql}
     ORDER BY e."time", e.id`;
  const n = rows.length;
  const s: SeriesArrays = { tMs: new Float64Array(n), value: new Float64Array(n), sigma: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    const d = displacementComponent(refObs, rows[i], query.component, SIGNIFICANCE_K);
    s.tMs[i] = rows[i].tm;
    s.value[i] = d.value;
    s.sigma[i] = d.sigma;
  }
  let out = view(s, query.mode);
  if (query.from && query.mode !== "cumulative") {
    const fromMs = query.from.getTime();
    let k = 0;
    while (k < out.tMs.length && out.tMs[k] < fromMs) k++;
    out = { tMs: out.tMs.subarray(k), value: out.value.subarray(k), sigma: out.sigma.subarray(k) };
  }
  const { points, downsampled } = format(out, query.maxPoints, site.timeZone, true);
  // Lengths (d2D, d3D) are tested with χ² on the components; recompute their flags for the kept cumulative points.
  if (query.mode === "cumulative" && (query.component === "d2D" || query.component === "d3D")) {
    const byT = new Map(rows.map((r) => [r.tm, r]));
    for (const p of points) {
      const r = byT.get(Date.parse(p.t));
      if (r) p.significant = displacementComponent(refObs, r, query.component, SIGNIFICANCE_K).significant;
    }
  }
  return {
    ...empty,
    referenceEpoch: refView,
    count: out.tMs.length,
    downsampled,
    method: downsampled ? LTTB_METHOD : null,
    note: query.mode === "cumulative" ? (query.component === "d2D" || query.component === "d3D" ? "significance of a length: χ² test on its components at 95 %" : null) : INCREMENT_NOTE,
    points,
  };
}
