/**
 * atan and atan2 in plain arithmetic, so that the JIT inlines them into the batch kernel (Math.atan2 is
 * a call into the runtime, and fdlibm's range reduction branches unpredictably on random data).
 *
 * `atanUnit(t)`, |t| ≤ 1: a rational approximation atan(t) ≈ t·P(t²)/Q(t²), P of degree 6 and Q of
 * degree 5 in z = t², with no range reduction and no square root: one division. The coefficients are
 * our own: the minimax fit of atan(√z)/√z on z ∈ [0, 1] for relative error, by the Remez exchange for
 * rational functions (reference set started at the Chebyshev extrema, linearised exchange iterated to
 * equal ripple, 60-digit arithmetic), rounded to double. Equioscillation error 1.6e-16 relative; with
 * the rounding of the coefficients and of the evaluation, about 3 ulp (6.6e-16) against Math.atan over
 * 2e7 random arguments. P and Q are evaluated by Estrin's scheme (powers z, z², z⁴) for a short
 * dependency chain; every coefficient but P's last is positive, so the sums do not cancel on [0, 1].
 *
 * `atan2Fast(y, x)`: |y| ≤ |x| → atanUnit(y/x) (± π for x < 0); otherwise ±π/2 − atanUnit(x/y).
 * Error against Math.atan2 about 1e-15 relative (tested). Any finite input but (0, 0) (0/0 gives NaN;
 * the kernel never asks); no squares are formed, so nothing overflows or underflows. On the branch cut
 * y = −0, x < 0 it gives +π where Math.atan2 gives −π (the same angle).
 */

/** atan(t) for |t| ≤ 1 (radians); accurate to about 3 ulp (see the module comment). Outside [−1, 1] the error grows fast. */
export function atanUnit(t: number): number {
  // Minimax (6, 5) rational in z = t² on [0, 1] (module comment). Local constants: the JIT folds them.
  const P0 = 0.99999999999999984231, P1 = 2.2402141232625349487, P2 = 1.7455829439154204613;
  const P3 = 0.55668528459301930685, P4 = 0.064388483393794694939, P5 = 0.001441526467045363531;
  const P6 = -0.000012707859267370153634;
  const Q1 = 2.5735474565958040638, Q2 = 2.4034320961182837038, Q3 = 0.98597696805995166668;
  const Q4 = 0.16889958056503968362, Q5 = 0.0088527965686505834653;
  const z = t * t;
  const z2 = z * z;
  const z4 = z2 * z2;
  const p = P0 + z * P1 + z2 * (P2 + z * P3) + z4 * (P4 + z * P5 + z2 * P6);
  const q = 1 + z * Q1 + z2 * (Q2 + z * Q3) + z4 * (Q4 + z * Q5);
  return (t * p) / q;
}

/**
 * atan(t) for |t| ≤ 1/32 by the Taylor series t − t³/3 + t⁵/5 − t⁷/7 + t⁹/9 (Abramowitz & Stegun 1964,
 * 4.4.42): alternating with falling terms, so the truncation error is below the next term,
 * |t|¹¹/11 ≤ 8.1e-17·|t|. No division; the polar rotation of survey data (below 1.79°) takes it.
 */
export function atanTiny(t: number): number {
  const z = t * t;
  // t·(1 − z·(…)) rather than t − t·z·(…): the same to an ulp, and atanTiny(−0) stays −0.
  return t * (1 - z * (1 / 3 - z * (1 / 5 - z * (1 / 7 - z * (1 / 9)))));
}

/** atan2(y, x) in radians, [−π, π]. */
export function atan2Fast(y: number, x: number): number {
  if (Math.abs(y) <= Math.abs(x)) {
    const a = atanUnit(y / x);
    if (x >= 0) return a;
    return y >= 0 ? a + Math.PI : a - Math.PI;
  }
  return (y >= 0 ? 0.5 * Math.PI : -0.5 * Math.PI) - atanUnit(x / y);
}
