/**
 * atan2 in plain arithmetic and almost without branches, so the JIT inlines it into the batch kernel
 * (Math.atan2 is a call into the runtime, and fdlibm's range reduction branches unpredictably on
 * random data).
 *
 * Half-angle reduction: for r = √(x² + y²) and x ≥ 0, atan2(y, x) = 2·atan(y / (r + x)) with the
 * argument in [−1, 1]; for x < 0, atan2(y, x) = ±π − 2·atan(y / (r − x)). A second half-angle step,
 * atan(t) = 2·atan(t / (1 + √(1 + t²))), brings the argument below tan(π/8) ≈ 0.414 < 7/16, where the
 * odd polynomial of fdlibm `s_atan.c` (Sun Microsystems 1993, coefficients aT[0..10]) is accurate to
 * about 1 ulp. Error against Math.atan2 ≈ 1e-15 relative (tested). Finite inputs, not both zero
 * (0/0 gives NaN; the kernel never asks), |(x, y)| between 1e-150 and 1e150 (x² + y² is not scaled
 * against underflow or overflow; strains and F entries are far inside).
 */

const AT0 = 3.33333333333329318027e-1;
const AT1 = -1.99999999998764832476e-1;
const AT2 = 1.42857142725034663711e-1;
const AT3 = -1.1111110405462355788e-1;
const AT4 = 9.09088713343650656196e-2;
const AT5 = -7.69187620504482999495e-2;
const AT6 = 6.66107313738753120669e-2;
const AT7 = -5.83357013379057348645e-2;
const AT8 = 4.97687799461593236017e-2;
const AT9 = -3.6531572744216915527e-2;
const AT10 = 1.62858201153657823623e-2;

/** atan(t) for |t| ≤ 1: one half-angle step, then the fdlibm polynomial (|argument| ≤ 0.4143). */
export function atanUnit(t: number): number {
  const x = t / (1 + Math.sqrt(1 + t * t));
  const z = x * x;
  const w = z * z;
  const s1 = z * (AT0 + w * (AT2 + w * (AT4 + w * (AT6 + w * (AT8 + w * AT10)))));
  const s2 = w * (AT1 + w * (AT3 + w * (AT5 + w * (AT7 + w * AT9))));
  return 2 * (x - x * (s1 + s2));
}

/** atan2(y, x) in radians, [−π, π], given r = √(x² + y²) already computed by the caller. */
export function atan2WithNorm(y: number, x: number, r: number): number {
  if (x >= 0) return 2 * atanUnit(y / (r + x));
  return (y >= 0 ? Math.PI : -Math.PI) - 2 * atanUnit(y / (r - x));
}

/** atan2(y, x) in radians, [−π, π]. */
export function atan2Fast(y: number, x: number): number {
  return atan2WithNorm(y, x, Math.sqrt(x * x + y * y));
}
