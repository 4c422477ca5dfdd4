/**
 * Cumulative, incremental and rate views of one series (domain.md §5). Times are UTC epoch
 * milliseconds; values and σ in the quantity's own unit (dimensionless strain, degrees, metres).
 *
 *   cumulative  v_i (against the reference epoch), σ_i as stored
 *   incremental Δ_i = v_i − v_{i−1},           σ(Δ_i) = √(σ_i² + σ_{i−1}²)
 *   rate        r_i = Δ_i / ((t_i − t_{i−1}) / 86 400 000),  σ(r_i) = σ(Δ_i) / Δt_days
 *
 * The incremental σ is first order and treats the two cumulative values as independent. That is an
 * approximation: both are measured against the same reference epoch, so their errors are positively
 * correlated through the reference coordinates and the true σ(Δ) is somewhat smaller (exact only with
 * the covariance, which the stored results do not carry). It errs on the safe side: fewer increments
 * are called significant, never more.
 *
 * Incremental and rate values are stamped with the later epoch's time; the first epoch has none.
 * A missing σ (NaN) gives NaN σ and no significance.
 */

export const MS_PER_DAY = 86_400_000;

export interface SeriesArrays {
  /** UTC epoch milliseconds, increasing. */
  tMs: Float64Array;
  value: Float64Array;
  /** First-order σ of each value; NaN where unknown. */
  sigma: Float64Array;
}

/** Differences of consecutive values with their σ (n − 1 points, stamped at the later time). */
export function incrementalSeries(s: SeriesArrays): SeriesArrays {
  const n = s.tMs.length;
  const m = Math.max(0, n - 1);
  const out: SeriesArrays = { tMs: new Float64Array(m), value: new Float64Array(m), sigma: new Float64Array(m) };
  for (let i = 1; i < n; i++) {
    out.tMs[i - 1] = s.tMs[i];
    out.value[i - 1] = s.value[i] - s.value[i - 1];
    out.sigma[i - 1] = Math.sqrt(s.sigma[i] * s.sigma[i] + s.sigma[i - 1] * s.sigma[i - 1]);
  }
  return out;
}

/**
 * Rates per day between consecutive epochs with their σ. Pairs with Δt ≤ 0 (two epochs at one time)
 * are left out rather than divided by zero.
 */
export function rateSeries(s: SeriesArrays): SeriesArrays {
  const inc = incrementalSeries(s);
  const m = inc.tMs.length;
  const tMs = new Float64Array(m);
  const value = new Float64Array(m);
  const sigma = new Float64Array(m);
  let k = 0;
  for (let i = 0; i < m; i++) {
    const dtDays = (s.tMs[i + 1] - s.tMs[i]) / MS_PER_DAY;
    if (!(dtDays > 0)) continue;
    tMs[k] = inc.tMs[i];
    value[k] = inc.value[i] / dtDays;
    sigma[k] = inc.sigma[i] / dtDays;
    k++;
  }
  return k === m ? { tMs, value, sigma } : { tMs: tMs.slice(0, k), value: value.slice(0, k), sigma: sigma.slice(0, k) };
}

/** |value| > k·σ; false where σ is unknown (NaN) — callers report those as "unknown", not as insignificant. */
export function isSignificant(value: number, sigma: number, k: number): boolean {
  return Number.isFinite(sigma) && Math.abs(value) > k * sigma;
}
