/**
 * Element result rows in memory: the columns the results engine fills and the store writes, and the
 * rows of the epochs this process has just computed, kept for the alert evaluation after commit.
 */
import { STORED_VALUE_KEYS, type StoredValueKey, type StoredValues } from "../../strain/stored-values.ts";
import { currentDatabaseKey } from "../ingest/pg-tx.ts";

/** One result row as the per-element engine gives it. */
export interface ResultRow extends StoredValues {
  elementId: number;
  epochId: number;
  referenceEpochId: number;
  timeIso: string;
  status: string;
}

/**
 * Result rows column by column (what COPY and the upsert take), without one object per row: ids in
 * Int32Arrays, values in Float64Arrays with NaN for "no value" (stored as NULL: a stored value is never
 * NaN, non-finite results are stored as NULL), so a live epoch's ~50,000 numbers are no ~50,000 heap
 * objects for the garbage collector. The arrays hold `capacity` slots: read only the first `length`.
 */
export class ResultColumns {
  length = 0;
  elementId: Int32Array;
  epochId: Int32Array;
  referenceEpochId: Int32Array;
  readonly timeIso: string[] = [];
  readonly status: string[] = [];
  values: Record<StoredValueKey, Float64Array>;

  constructor(capacity = 1024) {
    const n = Math.max(16, capacity);
    this.elementId = new Int32Array(n);
    this.epochId = new Int32Array(n);
    this.referenceEpochId = new Int32Array(n);
    this.values = Object.fromEntries(STORED_VALUE_KEYS.map((k) => [k, new Float64Array(n).fill(NaN)])) as Record<StoredValueKey, Float64Array>;
  }

  /** Appends a row's head; its values start as NaN (no value). Returns the row's index. */
  add(elementId: number, epochId: number, referenceEpochId: number, timeIso: string, status: string): number {
    const i = this.length;
    if (i === this.elementId.length) this.grow(2 * i);
    this.elementId[i] = elementId;
    this.epochId[i] = epochId;
    this.referenceEpochId[i] = referenceEpochId;
    this.timeIso.push(timeIso);
    this.status.push(status);
    this.length = i + 1;
    return i;
  }

  push(r: ResultRow): void {
    const i = this.add(r.elementId, r.epochId, r.referenceEpochId, r.timeIso, r.status);
    for (const k of STORED_VALUE_KEYS) {
      const v = r[k];
      if (v !== null) this.values[k][i] = v;
    }
  }

  /** The value at row i, or null. */
  value(k: StoredValueKey, i: number): number | null {
    const v = this.values[k][i];
    return Number.isNaN(v) ? null : v;
  }

  private grow(n: number): void {
    const int = (a: Int32Array): Int32Array => {
      const b = new Int32Array(n);
      b.set(a);
      return b;
    };
    this.elementId = int(this.elementId);
    this.epochId = int(this.epochId);
    this.referenceEpochId = int(this.referenceEpochId);
    for (const k of STORED_VALUE_KEYS) {
      const b = new Float64Array(n).fill(NaN);
      b.set(this.values[k]);
      this.values[k] = b;
    }
  }
}

/**
 * The rows just computed for one epoch, kept in memory for the alert evaluation that follows its
 * commit (lib/server/alerts/evaluate.ts reads them instead of reading them back, and reads the
 * previous epoch's from here too when this process computed it). Only epochs stored in the same
 * transaction are kept (their rows are never recomputed), keyed by database and epoch id; an epoch
 * id is never reused, so an entry of a transaction that rolled back is never asked for (evaluation
 * only asks for committed current epochs). The last few epochs per process are kept.
 */
export interface ComputedEpoch {
  epochId: number;
  columns: ResultColumns;
  /** The site's enabled elements these rows were computed for (checked against the database in that transaction). */
  elements: readonly ComputedElement[];
}

/** An enabled element as the results engine read it: what alert evaluation needs to pick its rows. */
export type ComputedElement = { id: number; referenceEpochId: number | null };
const COMPUTED_KEEP = 8;
const COMPUTED_KEY = Symbol.for("epochal.results.computed");
type ComputedHolder = { [COMPUTED_KEY]?: Map<string, ComputedEpoch> };

/** On globalThis: every copy of this module (Next.js bundles) shares it. */
function computed(): Map<string, ComputedEpoch> {
  const h = globalThis as ComputedHolder;
  h[COMPUTED_KEY] ??= new Map();
  return h[COMPUTED_KEY];
}

/** The rows computed in this process for that epoch, or undefined. */
export function computedResultsOf(epochId: number): ComputedEpoch | undefined {
  return computed().get(`${currentDatabaseKey()}#${epochId}`);
}

/** Drops the kept rows of these epochs (tests: to make evaluation read them from the database). */
export function forgetComputedResults(epochIds: readonly number[]): void {
  for (const id of epochIds) computed().delete(`${currentDatabaseKey()}#${id}`);
}

/** Keeps the rows of a live request's epochs (called by the results engine after storing them). */
export function keepComputed(dbKey: string, rows: ResultColumns, elements: readonly ComputedElement[]): void {
  const c = computed();
  for (const epochId of new Set(rows.epochId.subarray(0, rows.length))) {
    c.set(`${dbKey}#${epochId}`, { epochId, columns: rows, elements });
    while (c.size > COMPUTED_KEEP) c.delete(c.keys().next().value as string);
  }
}

