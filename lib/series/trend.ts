/**
 * Least-squares straight-line trend of a series, with its uncertainty, and the times at which the
 * trend would reach given levels.
 *
 * Simple linear regression (Montgomery, D. C. & Runger, G. C., *Applied Statistics and Probability
 * for Engineers*, ch. 11 "Simple Linear Regression and Correlation", eqs. 11-7, 11-8 and the standard
 * errors of §11-4):
 *   Sxx = Σ(t_i − t̄)²,  Sxy = Σ(t_i − t̄)(y_i − ȳ),  slope β₁ = Sxy / Sxx,  intercept β₀ = ȳ − β₁ t̄
 *   SSE = Σ(y_i − ŷ_i)²,  σ̂² = SSE / (n − 2)
 *   se(β₁) = √(σ̂² / Sxx),  se(β₀) = √(σ̂² (1/n + t̄² / Sxx)),  R² = 1 − SSE / SST
 *
 * Time is measured in days from `originMs` (UTC epoch ms), so the slope is "per day" and the intercept
 * is the trend's value at the origin. Sums are taken about the means (two-pass) for accuracy with
 * epoch-millisecond magnitudes.
 */
import { MS_PER_DAY } from "./increments.ts";

export const TREND_CAUTION =
  "A straight-line trend describes the past window only. Movement can speed up, slow down or stop; " +
  "a projected crossing time is an indication for planning, not a prediction, and its uncertainty grows with distance from the data.";

export interface LinearTrendOk {
  status: "ok";
  n: number;
  originMs: number;
  /** Value units per day. */
  slopePerDay: number;
  /** Trend value at `originMs`. */
  intercept: number;
  sigmaSlopePerDay: number;
  sigmaIntercept: number;
  rSquared: number;
  /** √(SSE / (n − 2)). */
  residualSigma: number;
  /** Time span of the data fitted, first and last, UTC ms. */
  firstMs: number;
  lastMs: number;
  caution: string;
}
export type LinearTrend = LinearTrendOk | { status: "insufficient-data"; n: number; message: string; caution: string };

/** Fit y = β₀ + β₁·(t − origin)/day. Needs n ≥ 3 finite points spread in time (n − 2 > 0 degrees of freedom). */
export function fitLinearTrend(tMs: Float64Array, y: Float64Array, originMs?: number): LinearTrend {
  const n = tMs.length;
  if (y.length !== n) throw new RangeError("fitLinearTrend: tMs and y differ in length");
  for (let i = 0; i < n; i++) if (!Number.isFinite(tMs[i]) || !Number.isFinite(y[i])) throw new RangeError(`fitLinearTrend: non-finite input at ${i}`);
  if (n < 3) return { status: "insufficient-data", n, message: `a trend needs at least 3 points, got ${n}`, caution: TREND_CAUTION };
  const origin = originMs ?? tMs[0];
  let tBar = 0;
  let yBar = 0;
  for (let i = 0; i < n; i++) {
    tBar += (tMs[i] - origin) / MS_PER_DAY;
    yBar += y[i];
  }
  tBar /= n;
  yBar /= n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dt = (tMs[i] - origin) / MS_PER_DAY - tBar;
    const dy = y[i] - yBar;
    sxx += dt * dt;
    sxy += dt * dy;
    syy += dy * dy;
  }
  const span = (tMs[n - 1] - tMs[0]) / MS_PER_DAY;
  // Relative floor: all points at (numerically) one time.
  if (!(sxx > 1e-18 * Math.max(1, span * span) * n)) return { status: "insufficient-data", n, message: "all points are at the same time", caution: TREND_CAUTION };
  const slope = sxy / sxx;
  const intercept = yBar - slope * tBar;
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - (intercept + slope * ((tMs[i] - origin) / MS_PER_DAY));
    sse += r * r;
  }
  const s2 = sse / (n - 2);
  return {
    status: "ok",
    n,
    originMs: origin,
    slopePerDay: slope,
    intercept,
    sigmaSlopePerDay: Math.sqrt(s2 / sxx),
    sigmaIntercept: Math.sqrt(s2 * (1 / n + (tBar * tBar) / sxx)),
    // A constant series is fitted exactly: R² = 1 by convention (SST = 0).
    rSquared: syy > 0 ? Math.max(0, 1 - sse / syy) : 1,
    residualSigma: Math.sqrt(s2),
    firstMs: tMs[0],
    lastMs: tMs[n - 1],
    caution: TREND_CAUTION,
  };
}

export type LevelCrossing = (
  | { level: number; status: "reached"; message: string }
  | { level: number; status: "projected"; timeMs: number; daysFromLast: number }
  | { level: number; status: "not-approaching"; message: string }
) & { caution: string };

/**
 * When the fitted line would reach each level. A level the trend value at the last point already
 * reached (|trend| ≥ |level| on the level's side) is `reached`; a level the line moves away from, or a
 * flat line (|slope| ≤ its σ: not distinguishable from zero at 1σ), is `not-approaching`.
 */
export function levelCrossingTimes(trend: LinearTrendOk, levels: readonly number[]): LevelCrossing[] {
  const atLast = trend.intercept + trend.slopePerDay * ((trend.lastMs - trend.originMs) / MS_PER_DAY);
  const caution = TREND_CAUTION;
  return levels.map((level): LevelCrossing => {
    const gap = level - atLast;
    if (gap === 0 || (level >= 0 ? atLast >= level : atLast <= level)) return { level, status: "reached", message: "the trend is already at or past this level", caution };
    if (Math.abs(trend.slopePerDay) <= trend.sigmaSlopePerDay) return { level, status: "not-approaching", message: "the slope is not distinguishable from zero", caution };
    if (Math.sign(gap) !== Math.sign(trend.slopePerDay)) return { level, status: "not-approaching", message: "the trend moves away from this level", caution };
    const days = gap / trend.slopePerDay;
    return { level, status: "projected", timeMs: trend.lastMs + days * MS_PER_DAY, daysFromLast: days, caution };
  });
}
