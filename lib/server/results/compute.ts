/**
 * Element results: after epochs are stored, every enabled Element of the site is computed at each of
 * those epochs against its reference epoch (Element.referenceEpochId, else Site.referenceEpochId, else
 * the site's first current epoch) and one cumulative ElementResult row is written per element and
 * epoch, in the caller's transaction. Plan triangles go through the batch kernel (lib/strain/batch.ts),
 * everything else through `computeElementStrain`. Rows are held column by column (columns.ts) and
 * written with binary COPY (store.ts): the epochs are new, so no row of theirs exists yet.
 *
 * Hot path (one live epoch of 2,000 points against ~3,900 elements, test/bench/ingest.ts): the epochs
 * just stored come in memory; the site's element definitions are cached per database and site and
 * checked against Site.elementsStamp, which database triggers change on any create, edit, disable or
 * re-baseline by any writer (migration site_cache_stamps); a reference epoch's points are cached by
 * epoch id (ingest never changes an epoch's observations: a revision is a new epoch id). So a live
 * epoch's results need no query of their own: the ingest service plans them (`planResults`) before it
 * stores the observations, and `storeResults` streams them to the server as they are computed.
 */
import type { Prisma } from "../db/generated/client.ts";
import type { Db } from "../db/client.ts";
import { computeElementStrain, type ElementSpec } from "../../strain/element.ts";
import { storedValuesOf } from "../../strain/stored-values.ts";
import { computeTriangleBatch, createTriangleBatchOut, BATCH_OK } from "../../strain/batch.ts";
import type { ElementKind, ElementMode, SurveyPoint } from "../../strain/types.ts";
import { intArray } from "../ingest/sql-arrays.ts";
import { currentDatabaseKey, type Sql } from "../ingest/pg-tx.ts";
import type { PhaseTimer } from "../timing.ts";
import { keepComputed, ResultColumns, type ResultRow } from "./columns.ts";
import { copyResultRows, STREAM_ROWS, streamResultRows } from "./store.ts";

export type Tx = Prisma.TransactionClient | Db;


type EpochPoints = Map<string, SurveyPoint>;

/** The site's reference epoch: Site.referenceEpochId, else its first current epoch (by time), else null. */
export async function siteReferenceEpochId(tx: Tx, siteId: number): Promise<number | null> {
  const site = await tx.site.findUnique({ where: { id: siteId }, select: { referenceEpochId: true } });
  if (site?.referenceEpochId) return site.referenceEpochId;
  const first = await tx.epoch.findFirst({ where: { siteId, isCurrent: true }, orderBy: [{ time: "asc" }, { id: "asc" }], select: { id: true } });
  return first?.id ?? null;
}

async function loadEpochPoints(tx: Sql, epochIds: number[]): Promise<Map<number, EpochPoints>> {
  const rows = await tx.query<{ epochId: number; code: string; east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number; sigmaHeight: number }>(
    `SELECT o."epochId", p.code, o.east, o.north, o.height, o."sigmaEast", o."sigmaNorth", o."sigmaHeight"
       FROM "Observation" o JOIN "Point" p ON p.id = o."pointId"
      WHERE o."epochId" = ANY($1::int[])`,
    [intArray(epochIds)],
  );
  const out = new Map<number, EpochPoints>();
  for (const id of epochIds) out.set(id, new Map());
  for (const r of rows) {
    out.get(r.epochId)?.set(r.code, { east: r.east, north: r.north, height: r.height, sigmaEast: r.sigmaEast, sigmaNorth: r.sigmaNorth, sigmaHeight: r.sigmaHeight });
  }
  return out;
}

/** One element at one epoch through the per-element engine, as a result row. */
function elementRow(el: { id: number; kind: string; mode: string; pointCodes: string[] }, ref: EpochPoints, cur: EpochPoints, head: Pick<ResultRow, "elementId" | "epochId" | "referenceEpochId" | "timeIso">): ResultRow {
  const spec: ElementSpec = { id: String(el.id), kind: el.kind as ElementKind, mode: el.mode as ElementMode, points: el.pointCodes };
  const { status, values } = storedValuesOf(computeElementStrain(spec, ref, cur));
  return { ...head, status, ...values };
}

type ElementRow = { id: number; kind: string; mode: string; pointCodes: string[]; referenceEpochId: number | null };

/** Elements of one reference epoch, split once: plan triangles for the batch kernel with their reference arrays, the rest. */
interface PreparedGroup {
  batchable: ElementRow[];
  others: ElementRow[];
  refXY: Float64Array;
  sigmaRef: Float64Array;
}

interface SiteElements {
  /** Site.elementsStamp when these were read. */
  stamp: string;
  elements: ElementRow[];
  groups: Map<number, PreparedGroup>;
}

const CACHE_KEY = Symbol.for("epochal.results.cache");
type Cache = { sites: Map<string, SiteElements>; refPoints: Map<string, EpochPoints> };
type CacheHolder = { [CACHE_KEY]?: Cache };
/** Reference epochs whose points are kept (a few per site; each ~2,000 points is ~0.5 MB). */
const REF_CACHE_SIZE = 16;

function cache(): Cache {
  const h = globalThis as CacheHolder;
  h[CACHE_KEY] ??= { sites: new Map(), refPoints: new Map() };
  return h[CACHE_KEY];
}

/** Points of the given epochs: from `known` (just stored), the reference cache, or one query for the rest. */
async function epochPoints(tx: Sql, dbKey: string, ids: readonly number[], known: Map<number, EpochPoints>, refIds: ReadonlySet<number>): Promise<Map<number, EpochPoints>> {
  const c = cache().refPoints;
  const out = new Map<number, EpochPoints>();
  const missing: number[] = [];
  for (const id of ids) {
    const k = known.get(id) ?? c.get(`${dbKey}#${id}`);
    if (k) out.set(id, k);
    else missing.push(id);
  }
  if (missing.length > 0) for (const [id, pts] of await loadEpochPoints(tx, missing)) out.set(id, pts);
  for (const id of refIds) {
    const key = `${dbKey}#${id}`;
    const pts = out.get(id);
    if (!pts || c.has(key)) continue;
    c.set(key, pts);
    if (c.size > REF_CACHE_SIZE) c.delete(c.keys().next().value as string);
  }
  return out;
}

function prepareGroup(els: ElementRow[], ref: EpochPoints): PreparedGroup {
  const batchable = els.filter((e) => e.kind === "triangle" && e.mode === "plan" && e.pointCodes.length === 3 && new Set(e.pointCodes).size === 3 && e.pointCodes.every((c) => ref.has(c)));
  const batchIds = new Set(batchable.map((e) => e.id));
  const others = els.filter((e) => !batchIds.has(e.id));
  const n = batchable.length;
  const refXY = new Float64Array(6 * n);
  const sigmaRef = new Float64Array(6 * n);
  for (let t = 0; t < n; t++) {
    const codes = batchable[t].pointCodes;
    for (let k = 0; k < 3; k++) {
      const R = ref.get(codes[k]) as SurveyPoint;
      const o = 6 * t + 2 * k;
      refXY[o] = R.east;
      refXY[o + 1] = R.north;
      sigmaRef[o] = R.sigmaEast;
      sigmaRef[o + 1] = R.sigmaNorth;
    }
  }
  return { batchable, others, refXY, sigmaRef };
}

/**
 * An epoch just stored: its id, time and a function giving its points as stored (called only when the
 * site has elements, so a backfill of a site without any builds no maps).
 */
export type EpochToCompute = { id: number; time: string; points: () => EpochPoints };

/** What the results step needs of the site: its reference (before the epochs' own) and its elements' stamp (Site.elementsStamp). */
export type ResultsHead = { siteRef: number | null; elementsStamp: string };

/**
 * The results of some epochs, ready to be computed without another query: the elements and every
 * point set they need are in memory. `compute` is synchronous (the ingest service runs it while the
 * server stores the observations); `storeResults` writes its rows in the caller's transaction.
 */
export interface ResultsPlan {
  /** Element rows in the order the engine reads them; empty when nothing is to be computed. */
  readonly elements: readonly ElementRow[];
  /** Rows `compute` gives, at the most (elements × epochs). */
  readonly rowCount: number;
  /** `onRows`: called with the columns whenever more rows are in them (to stream them on). */
  compute(onRows?: (rows: ResultColumns) => void): ResultColumns;
}

/**
 * Reads what `epochs` need for their results (the site's elements, checked against `head.elementsStamp`,
 * and reference epochs' points, from the caches or the database) and returns the plan. `head.siteRef`
 * is the site's reference as it will be once these epochs are stored (Site.referenceEpochId, else the
 * site's first current epoch).
 */
export async function planResults(tx: Sql, siteId: number, epochs: readonly EpochToCompute[], head: ResultsHead): Promise<ResultsPlan> {
  const none: ResultsPlan = { elements: [], rowCount: 0, compute: () => new ResultColumns(0) };
  if (epochs.length === 0) return none;
  const dbKey = currentDatabaseKey();
  const siteKey = `${dbKey}#${siteId}`;
  let site = cache().sites.get(siteKey);
  if (!site || site.stamp !== head.elementsStamp) {
    const elements = await tx.query<ElementRow>(`SELECT id, kind, mode, "pointCodes", "referenceEpochId" FROM "Element" WHERE "siteId" = $1 AND "disabledAt" IS NULL ORDER BY id`, [siteId]);
    site = { stamp: head.elementsStamp, elements, groups: new Map() };
    cache().sites.set(siteKey, site);
  }
  const siteElements = site;
  const elements = site.elements;
  if (elements.length === 0) return none;

  const known = new Map<number, EpochPoints>();
  const times = new Map<number, string>();
  for (const e of epochs) {
    known.set(e.id, e.points());
    times.set(e.id, new Date(e.time).toISOString());
  }
  const epochIds = epochs.map((e) => e.id);

  // Group the elements by reference epoch; plan triangles of a group go through the batch kernel together.
  const byRef = new Map<number, ElementRow[]>();
  for (const el of elements) {
    const r = el.referenceEpochId ?? head.siteRef;
    if (r === null) continue;
    let list = byRef.get(r);
    if (!list) byRef.set(r, (list = []));
    list.push(el);
  }
  if (byRef.size === 0) return none;
  const refIds = new Set(byRef.keys());
  const points = await epochPoints(tx, dbKey, [...new Set([...refIds, ...epochIds])], known, refIds);
  return { elements, rowCount: elements.length * epochIds.length, compute: (onRows) => computeRows(siteElements, byRef, points, epochIds, times, onRows) };
}

/** Triangles per kernel call when rows are streamed as they are computed (`onRows`), and rows per part when rows computed beforehand are streamed. */
const STREAM_SLICE = 1_000;

/**
 * Computes every element at every epoch. `onRows`, when given, is called with the columns each time
 * more rows are in them (after the per-element rows of an epoch and after every slice of triangles),
 * so that a caller can send them on while the rest is computed.
 */
function computeRows(
  site: SiteElements,
  byRef: Map<number, ElementRow[]>,
  points: Map<number, EpochPoints>,
  epochIds: readonly number[],
  times: Map<number, string>,
  onRows?: (rows: ResultColumns) => void,
): ResultColumns {
  const rows = new ResultColumns(site.elements.length * epochIds.length);
  for (const [refId, els] of byRef) {
    const ref = points.get(refId) ?? new Map<string, SurveyPoint>();
    // A group is prepared once per reference epoch and element set (ref points never change for an epoch id).
    let group = site.groups.get(refId);
    if (!group || !points.has(refId)) {
      group = prepareGroup(els, ref);
      if (points.has(refId)) site.groups.set(refId, group);
    }
    const { batchable, others } = group;
    for (const epochId of epochIds) {
      const cur = points.get(epochId) ?? new Map<string, SurveyPoint>();
      const timeIso = times.get(epochId) as string;
      const rowHead = { epochId, referenceEpochId: refId, timeIso };
      for (const el of others) rows.push(elementRow(el, ref, cur, { ...rowHead, elementId: el.id }));
      if (others.length > 0) onRows?.(rows);
      // Batch: only triangles whose three points are in this epoch; the rest take the per-element path (missing-point).
      const slice = onRows ? STREAM_SLICE : batchable.length;
      for (let a = 0; a < batchable.length; a += slice) {
        const b = Math.min(batchable.length, a + slice);
        batchRows(rows, group, a, b, cur, ref, rowHead);
        onRows?.(rows);
      }
    }
  }
  return rows;
}

/** Triangles [a, b) of a group at one epoch through the batch kernel, appended to `rows`. */
function batchRows(rows: ResultColumns, group: PreparedGroup, a: number, b: number, cur: EpochPoints, ref: EpochPoints, rowHead: { epochId: number; referenceEpochId: number; timeIso: string }): void {
  const { batchable } = group;
  const { epochId, referenceEpochId: refId, timeIso } = rowHead;
  const n = b - a;
  if (n <= 0) return;
  const refXY = group.refXY.subarray(6 * a, 6 * b);
  const sigmaRef = group.sigmaRef.subarray(6 * a, 6 * b);
  const curXY = new Float64Array(6 * n);
  const sigmaCur = new Float64Array(6 * n);
  const inBatch = new Uint8Array(n);
  for (let t = 0; t < n; t++) {
    const el = batchable[a + t];
    const codes = el.pointCodes;
    const A = cur.get(codes[0]), B = cur.get(codes[1]), C = cur.get(codes[2]);
    if (!A || !B || !C) {
      rows.push(elementRow(el, ref, cur, { ...rowHead, elementId: el.id }));
      // Any finite triangle keeps the kernel away from NaN handling; its slot is not read.
      curXY.set(refXY.subarray(6 * t, 6 * t + 6), 6 * t);
      continue;
    }
    inBatch[t] = 1;
    const o = 6 * t;
    curXY[o] = A.east; curXY[o + 1] = A.north; curXY[o + 2] = B.east; curXY[o + 3] = B.north; curXY[o + 4] = C.east; curXY[o + 5] = C.north;
    sigmaCur[o] = A.sigmaEast; sigmaCur[o + 1] = A.sigmaNorth; sigmaCur[o + 2] = B.sigmaEast; sigmaCur[o + 3] = B.sigmaNorth; sigmaCur[o + 4] = C.sigmaEast; sigmaCur[o + 5] = C.sigmaNorth;
  }
  const out = createTriangleBatchOut(n, true);
  computeTriangleBatch({ refXY, curXY, sigmaRef, sigmaCur }, out);
  const v = rows.values;
  const sGMax = out.sigmaGreenMax as Float64Array, sGMin = out.sigmaGreenMin as Float64Array, sSh = out.sigmaMaxShear as Float64Array, sAr = out.sigmaArealStrain as Float64Array;
  for (let s = 0; s < n; s++) {
    if (inBatch[s] === 0) continue;
    const ok = out.status[s] === BATCH_OK;
    const i = rows.add(batchable[a + s].id, epochId, refId, timeIso, ok ? "ok" : "degenerate");
    if (!ok) continue;
    // A non-finite azimuth (no unique direction) is stored as NULL, as on the per-element path.
    v.greenMax[i] = out.greenMax[s];
    v.greenMin[i] = out.greenMin[s];
    v.maxShear[i] = out.maxShear[s];
    v.arealStrain[i] = out.arealStrain[s];
    v.rotationDeg[i] = out.rotationDeg[s];
    const az = out.azimuthMaxDeg[s];
    v.azimuthMaxDeg[i] = Number.isFinite(az) ? az : NaN;
    v.sigmaGreenMax[i] = sGMax[s];
    v.sigmaGreenMin[i] = sGMin[s];
    v.sigmaMaxShear[i] = sSh[s];
    v.sigmaArealStrain[i] = sAr[s];
  }
}

/** The site's reference as stored now and its elements' stamp (one round trip). */
export async function readResultsHead(tx: Sql, siteId: number): Promise<ResultsHead | null> {
  const [head] = await tx.query<{ siteRef: number | null; firstEpoch: number | null; elementsStamp: string }>(
    `SELECT s."referenceEpochId" AS "siteRef",
            (SELECT id FROM "Epoch" WHERE "siteId" = s.id AND "isCurrent" ORDER BY time, id LIMIT 1) AS "firstEpoch",
            s."elementsStamp"::text AS "elementsStamp"
       FROM "Site" s WHERE s.id = $1`,
    [siteId],
  );
  return head ? { siteRef: head.siteRef ?? head.firstEpoch, elementsStamp: head.elementsStamp } : null;
}

/**
 * Computes a plan's rows (unless `computed` has them) and writes them in the caller's transaction: a
 * live request's (up to one statement's worth) streamed to the server while they are computed or
 * encoded, larger sets computed first and written statement by statement. A live request's rows
 * (a few epochs) are kept for the alert evaluation after commit.
 */
export async function storeResults(tx: Sql, plan: ResultsPlan, timer?: PhaseTimer, computed?: ResultColumns): Promise<number> {
  if (plan.rowCount === 0) return 0;
  let rows: ResultColumns;
  if (computed) {
    // Computed beforehand (a live request, so at most STREAM_ROWS): encoded and sent slice by slice
    // while the server inserts the slices before.
    rows = await streamResultRows(tx, (onRows) => {
      for (let i = STREAM_SLICE; i < computed.length; i += STREAM_SLICE) onRows(computed, i);
      return computed;
    }, timer, "results-encode");
  } else if (plan.rowCount <= STREAM_ROWS) rows = await streamResultRows(tx, (onRows) => plan.compute(onRows), timer);
  else {
    rows = plan.compute();
    timer?.lap("results-compute");
    await copyResultRows(tx, rows, timer);
  }
  const epochs = new Set(rows.epochId.subarray(0, rows.length)).size;
  if (epochs <= 4) keepComputed(currentDatabaseKey(), rows, plan.elements);
  return rows.length;
}

/**
 * Computes and stores the results of every enabled element of `siteId` at each of `epochs`.
 * Returns the number of rows written. Call it inside the transaction that stored the epochs.
 */
export async function computeResultsForEpochs(tx: Sql, siteId: number, epochs: readonly EpochToCompute[], opts: { timer?: PhaseTimer } = {}): Promise<number> {
  if (epochs.length === 0) return 0;
  const head = await readResultsHead(tx, siteId);
  if (!head) return 0;
  const plan = await planResults(tx, siteId, epochs, head);
  opts.timer?.lap("results-read");
  return storeResults(tx, plan, opts.timer);
}
