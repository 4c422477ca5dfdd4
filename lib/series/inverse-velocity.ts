/**
 * Inverse-velocity forecast of the time of failure for accelerating movement.
 *
 * Fukuzono, T. (1985), "A new method for predicting the failure time of a slope", Proc. 4th Int.
 * Conf. and Field Workshop on Landslides, Tokyo, 145–150; generalised by Voight, B. (1988), "A method
 * for prediction of volcanic eruptions", Nature 332, 125–130. With Voight's α = 2 the velocity grows as
 * v = A / (t_f − t), so 1/v = (t_f − t)/A is a straight line in t that reaches zero at t_f. Fitting
 * 1/v = a·t + b by least squares gives t_f = −b/a.
 *
 *   1/v
 *    |\
 *    | \  ·  fitted line
 *    |  \·
 *    |   ·\
 *    +-----\------ t
 *           t_f
 *
 * Steps (all documented choices):
 * 1. Velocity between consecutive epochs, v_i = Δy / Δt (per day), stamped at the midpoint time.
 * 2. Smoothing: centred moving average of the velocities over `smoothWindow` points (odd, default 5;
 *    the window shrinks symmetrically at both ends so no point is shifted). Raw survey velocities are
 *    noisy and 1/v magnifies the noise of small velocities; smoothing first is common practice (e.g.
 *    Dick et al. 2015, Can. Geotech. J. 52, 515–529).
 * 3. Direction: the sign of the net movement y_last − y_first; velocities are taken in that direction.
 * 4. Accelerating segment: from the smoothed velocity's minimum (in the movement direction) to the end.
 *    A series that slows down has its minimum at the end and so no segment.
 * 5. Fit 1/v against t over the segment (points with v > 0 only); accelerating when the fitted slope
 *    a < 0, |a| > 2·se(a), and the fitted velocity grows by at least `minVelocityGain` (default 1.25,
 *    i.e. 25 %) from the start to the end of the segment — steady creep with noise is not acceleration.
 *    t_f = −b/a.
 * The fit is flagged `poorFit` when R² < `minRSquared` (default 0.8).
 */
import { MS_PER_DAY } from "./increments.ts";

export const INVERSE_VELOCITY_CAUTION =
  "The inverse-velocity method assumes the acceleration continues in the same way until failure. It is a " +
  "screening tool for accelerating movement, not a prediction: forecasts often move as new epochs arrive, " +
  "and many accelerating slopes slow down without failing. Never use the forecast time alone to decide on safety.";

export interface InverseVelocityOptions {
  /** Odd number of velocities in the moving average; 1 means no smoothing. Default 5. */
  smoothWindow?: number;
  /** Fewest points in the accelerating segment. Default 5. */
  minPoints?: number;
  /** Below this R² the fit is flagged poor. Default 0.8. */
  minRSquared?: number;
  /** Least ratio of fitted end velocity to start velocity over the segment to call it accelerating. Default 1.25. */
  minVelocityGain?: number;
}

export interface InverseVelocityResult {
  status: "ok" | "not-accelerating" | "insufficient-data";
  isAccelerating: boolean;
  poorFit: boolean;
  /** Forecast time of failure, UTC ms; null unless accelerating. */
  failureTimeMs: number | null;
  /** 1/v = a·t + b with t in days since `originMs` and v in value units per day. */
  slopeA: number | null;
  interceptB: number | null;
  rSquared: number | null;
  originMs: number;
  /** Segment fitted, UTC ms (velocity midpoint times). */
  segmentStartMs: number | null;
  segmentEndMs: number | null;
  pointsUsed: number;
  message: string;
  caution: string;
}

/** Centred moving average over `w` (odd) points, shrinking symmetrically at the ends. */
export function movingAverageCentred(x: Float64Array, w: number): Float64Array {
  if (!Number.isInteger(w) || w < 1 || w % 2 === 0) throw new RangeError(`movingAverageCentred: window must be a positive odd integer, got ${w}`);
  const n = x.length;
  const out = new Float64Array(n);
  const half = (w - 1) / 2;
  for (let i = 0; i < n; i++) {
    const h = Math.min(half, i, n - 1 - i);
    let s = 0;
    for (let j = i - h; j <= i + h; j++) s += x[j];
    out[i] = s / (2 * h + 1);
  }
  return out;
}

export function inverseVelocityForecast(tMs: Float64Array, y: Float64Array, opts: InverseVelocityOptions = {}): InverseVelocityResult {
  const smoothWindow = opts.smoothWindow ?? 5;
  const minPoints = opts.minPoints ?? 5;
  const minR2 = opts.minRSquared ?? 0.8;
  const minGain = opts.minVelocityGain ?? 1.25;
  const n = tMs.length;
  if (y.length !== n) throw new RangeError("inverseVelocityForecast: tMs and y differ in length");
  const originMs = n > 0 ? tMs[0] : 0;
  const base = {
    isAccelerating: false,
    poorFit: false,
    failureTimeMs: null,
    slopeA: null,
    interceptB: null,
    rSquared: null,
    originMs,
    segmentStartMs: null,
    segmentEndMs: null,
    pointsUsed: 0,
    caution: INVERSE_VELOCITY_CAUTION,
  };
  if (n < minPoints + 1) return { ...base, status: "insufficient-data", message: `needs at least ${minPoints + 1} epochs, got ${n}` };

  // 1. velocities at midpoints (days since origin); pairs at one time are skipped.
  const tv = new Float64Array(n - 1);
  const vel = new Float64Array(n - 1);
  let m = 0;
  for (let i = 1; i < n; i++) {
    const dt = (tMs[i] - tMs[i - 1]) / MS_PER_DAY;
    if (!(dt > 0)) continue;
    tv[m] = ((tMs[i] + tMs[i - 1]) / 2 - originMs) / MS_PER_DAY;
    vel[m] = (y[i] - y[i - 1]) / dt;
    m++;
  }
  if (m < minPoints) return { ...base, status: "insufficient-data", message: `needs at least ${minPoints + 1} epochs at distinct times` };
  // 2–3. smooth, orient.
  const dir = y[n - 1] - y[0] >= 0 ? 1 : -1;
  const sm = movingAverageCentred(vel.subarray(0, m), Math.min(smoothWindow, m % 2 === 1 ? m : m - 1));
  for (let i = 0; i < m; i++) sm[i] *= dir;
  // 4. segment from the minimum velocity to the end.
  let iMin = 0;
  for (let i = 1; i < m; i++) if (sm[i] < sm[iMin]) iMin = i;
  const segCount = m - iMin;
  if (segCount < minPoints) return { ...base, status: "not-accelerating", message: "the velocity does not increase towards the end of the window (decelerating or steady movement)" };
  // 5. fit 1/v = a t + b over v > 0.
  let cnt = 0;
  let tBar = 0;
  let zBar = 0;
  for (let i = iMin; i < m; i++) {
    if (!(sm[i] > 0)) continue;
    cnt++;
    tBar += tv[i];
    zBar += 1 / sm[i];
  }
  if (cnt < minPoints) return { ...base, status: "not-accelerating", message: "too few epochs move in the direction of the net movement" };
  tBar /= cnt;
  zBar /= cnt;
  let sxx = 0;
  let sxz = 0;
  let szz = 0;
  for (let i = iMin; i < m; i++) {
    if (!(sm[i] > 0)) continue;
    const dt = tv[i] - tBar;
    const dz = 1 / sm[i] - zBar;
    sxx += dt * dt;
    sxz += dt * dz;
    szz += dz * dz;
  }
  const a = sxz / sxx;
  const b = zBar - a * tBar;
  let sse = 0;
  for (let i = iMin; i < m; i++) {
    if (!(sm[i] > 0)) continue;
    const r = 1 / sm[i] - (a * tv[i] + b);
    sse += r * r;
  }
  const r2 = szz > 0 ? Math.max(0, 1 - sse / szz) : 0;
  const seA = cnt > 2 ? Math.sqrt(sse / (cnt - 2) / sxx) : Infinity;
  const common = {
    ...base,
    slopeA: a,
    interceptB: b,
    rSquared: r2,
    segmentStartMs: originMs + tv[iMin] * MS_PER_DAY,
    segmentEndMs: originMs + tv[m - 1] * MS_PER_DAY,
    pointsUsed: cnt,
    poorFit: r2 < minR2,
  };
  if (!(a < 0) || !(Math.abs(a) > 2 * seA)) return { ...common, status: "not-accelerating", message: "1/v does not decrease significantly over the segment" };
  const invStart = a * tv[iMin] + b;
  const invEnd = a * tv[m - 1] + b;
  // invEnd ≤ 0: the fitted line already crossed zero inside the data, an extreme acceleration; keep it.
  if (invEnd > 0 && !(invStart / invEnd >= minGain))
    return { ...common, status: "not-accelerating", message: `the fitted velocity grows by less than ${Math.round((minGain - 1) * 100)} % over the segment (steady movement)` };
  const failureTimeMs = originMs + (-b / a) * MS_PER_DAY;
  return {
    ...common,
    status: "ok",
    isAccelerating: true,
    failureTimeMs,
    message: common.poorFit ? `poor fit (R² = ${r2.toFixed(2)} < ${minR2}): treat the forecast time as unreliable` : "accelerating movement; 1/v fitted by least squares",
  };
}
