/** Scale helpers of the site plan: exaggeration choices, robust maxima, medians. */
import type { StrainField } from "@/lib/plan/index.ts";

export const EXAGGERATIONS = [10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000] as const;
/** Glyphs are drawn only on elements at least this many screen pixels across (zoom in for the rest). */
export const MIN_GLYPH_ELEMENT_PX = 22;
export const PLAY_STEP_MS = 700;

/** Robust maximum: the 98th percentile of magnitudes, so one wild element does not wash the plan out. */
export function robustMax(values: number[]): number {
  // A typed array sorts numerically without a comparator call per pair (this runs on every render of a new field).
  const a = new Float64Array(values.length);
  let n = 0;
  for (const v of values) if (Number.isFinite(v)) a[n++] = Math.abs(v);
  if (n === 0) return 0;
  const sorted = a.subarray(0, n).sort();
  return sorted[Math.min(n - 1, Math.floor(n * 0.98))] || sorted[n - 1];
}

/**
 * Default exaggeration: the largest offered value at which the 95th percentile of the plan
 * displacements draws at most 1.2 typical element sizes.
 */
export function defaultExaggeration(field: StrainField | null, typicalSizeM: number): number {
  if (!field || field.points.length === 0 || !(typicalSizeM > 0)) return 1000;
  const d = field.points.map((p) => Math.hypot(p.dE, p.dN)).sort((a, b) => a - b);
  const p95 = d[Math.min(d.length - 1, Math.floor(d.length * 0.95))];
  if (!(p95 > 0)) return 1000;
  let best: number = EXAGGERATIONS[0];
  for (const x of EXAGGERATIONS) if (p95 * x <= 1.2 * typicalSizeM) best = x;
  return best;
}

export function median(values: number[]): number {
  if (values.length === 0) return 0;
  const a = [...values].sort((x, y) => x - y);
  return a[Math.floor(a.length / 2)];
}
