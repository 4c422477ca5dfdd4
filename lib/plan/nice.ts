/** "Nice" round numbers for legends and scale bars: 1, 2 or 5 times a power of ten. */

/** The largest nice number ≤ x (x > 0): 1, 2 or 5 × 10^k. Returns 0 for x ≤ 0 or non-finite x. */
export function niceFloor(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 0;
  const p = Math.pow(10, Math.floor(Math.log10(x)));
  const m = x / p;
  // Guard the power-of-ten rounding (e.g. log10(1000) = 2.9999999999999996).
  const step = m >= 5 - 1e-9 ? 5 : m >= 2 - 1e-9 ? 2 : 1;
  return step * p;
}

const FINE_STEPS = [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10] as const;

/**
 * The smallest "fine" round number ≥ x (x > 0), from 1, 1.5, 2, 2.5, 3, 4, 5, 6, 8 × 10^k: a colour
 * scale ending there wastes at most a third of its range. Returns 0 for x ≤ 0 or non-finite x.
 */
export function niceCeilFine(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 0;
  const p = Math.pow(10, Math.floor(Math.log10(x)));
  const m = x / p;
  for (const s of FINE_STEPS) if (m <= s + 1e-9) return s * p;
  return 10 * p;
}

/** The smallest nice number ≥ x (x > 0). Returns 0 for x ≤ 0 or non-finite x. */
export function niceCeil(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 0;
  const p = Math.pow(10, Math.floor(Math.log10(x)));
  const m = x / p;
  const step = m <= 1 + 1e-9 ? 1 : m <= 2 + 1e-9 ? 2 : m <= 5 + 1e-9 ? 5 : 10;
  return step * p;
}
