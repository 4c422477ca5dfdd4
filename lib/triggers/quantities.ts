/**
 * From stored results to the value a rule compares (see rule.ts for the sense of each quantity).
 *
 * Significance (domain notes §4): |f| > k·σ_f, k = 1.96 by default (95 %, two-sided). A rate between
 * epochs i−1 and i gets σ_rate = √(σ_i² + σ_{i−1}²) / Δt_days, treating the two cumulative values as
 * independent. They share the reference epoch, so their errors are positively correlated and the true
 * σ of the difference is smaller: this σ errs on the side of calling a rate not significant.
 */
import { parseQuantity, QUANTITY_SENSE, type RuleQuantity, type Sense } from "./rule.ts";

/** k for 95 % two-sided, the default confidence. */
export const DEFAULT_SIGNIFICANCE_K = 1.959963984540054;

const MS_PER_DAY = 86_400_000;

/** One stored value of a base quantity at one epoch: dimensionless strain and its σ (null when unknown). */
export type QuantitySample = { timeMs: number; value: number | null; sigma: number | null };

export type ComparedValue = {
  /** The value compared against the levels (sense applied). */
  compared: number;
  /** The quantity as stored (or the signed rate per day), before the sense is applied. */
  raw: number;
  sigma: number | null;
  /** null when σ is unknown. */
  isSignificant: boolean | null;
};

export function applySense(sense: Sense, v: number): number {
  if (sense === "negated") return -v;
  if (sense === "magnitude") return Math.abs(v);
  return v;
}

export function isSignificantValue(raw: number, sigma: number | null, k: number = DEFAULT_SIGNIFICANCE_K): boolean | null {
  if (sigma === null || !Number.isFinite(sigma)) return null;
  return Math.abs(raw) > k * sigma;
}

/**
 * The compared value of `quantity` at `cur`, or null when there is none (missing value, or for a rate:
 * no previous epoch, or no time between them). `prev` is the previous current epoch of the same
 * element and reference, used only by rates.
 */
export function comparedValueOf(
  quantity: RuleQuantity,
  cur: QuantitySample,
  prev: QuantitySample | null,
  k: number = DEFAULT_SIGNIFICANCE_K,
): ComparedValue | null {
  const { base, isRate } = parseQuantity(quantity);
  const sense = QUANTITY_SENSE[base];
  if (cur.value === null || !Number.isFinite(cur.value)) return null;
  if (!isRate) {
    return { compared: applySense(sense, cur.value), raw: cur.value, sigma: cur.sigma, isSignificant: isSignificantValue(cur.value, cur.sigma, k) };
  }
  if (!prev || prev.value === null || !Number.isFinite(prev.value)) return null;
  const days = (cur.timeMs - prev.timeMs) / MS_PER_DAY;
  if (!(days > 0)) return null;
  const rate = (cur.value - prev.value) / days;
  const sigma = cur.sigma === null || prev.sigma === null ? null : Math.hypot(cur.sigma, prev.sigma) / days;
  return { compared: applySense(sense, rate), raw: rate, sigma, isSignificant: isSignificantValue(rate, sigma, k) };
}
