/**
 * WGS84 geodetic coordinates to a local east-north-up frame about a fixed origin.
 *
 *   geodetic (φ, λ, h) ──▶ ECEF (X, Y, Z) ──▶ ENU (e, n, u) about the origin (φ₀, λ₀, h₀)
 *
 * Formulas: Hofmann-Wellenhof, Lichtenegger & Wasle, *GNSS – Global Navigation Satellite Systems*
 * (Springer, 2008), chapter on coordinate transformations: ellipsoidal → Cartesian with the
 * prime-vertical radius N = a / √(1 − e² sin²φ),
 *   X = (N + h) cos φ cos λ,  Y = (N + h) cos φ sin λ,  Z = (N(1 − e²) + h) sin φ,
 * then the rotation into the local-level (topocentric) system at the origin:
 *
 *   e = −sin λ₀ ΔX + cos λ₀ ΔY
 *   n = −sin φ₀ cos λ₀ ΔX − sin φ₀ sin λ₀ ΔY + cos φ₀ ΔZ
 *   u =  cos φ₀ cos λ₀ ΔX + cos φ₀ sin λ₀ ΔY + sin φ₀ ΔZ
 *
 * Angles in degrees (latitude north positive, longitude east positive), heights ellipsoidal, lengths
 * in metres. Pure; no allocation beyond the returned tuples.
 */

/** WGS84 semi-major axis, metres (NIMA TR8350.2). */
export const WGS84_A_M = 6378137;
/** WGS84 flattening. */
export const WGS84_F = 1 / 298.257223563;
/** First eccentricity squared, e² = f(2 − f). */
export const WGS84_E2 = WGS84_F * (2 - WGS84_F);

const DEG = Math.PI / 180;

export interface GeodeticPoint {
  latDeg: number;
  lonDeg: number;
  heightM: number;
}
export type Vec3 = [number, number, number];

/** Earth-centred, Earth-fixed Cartesian coordinates (X, Y, Z) in metres of a WGS84 geodetic point. */
export function geodeticToEcef(p: GeodeticPoint): Vec3 {
  const phi = p.latDeg * DEG;
  const lam = p.lonDeg * DEG;
  const sphi = Math.sin(phi);
  const cphi = Math.cos(phi);
  const N = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * sphi * sphi);
  return [(N + p.heightM) * cphi * Math.cos(lam), (N + p.heightM) * cphi * Math.sin(lam), (N * (1 - WGS84_E2) + p.heightM) * sphi];
}

/** A precomputed local frame about one origin: reuse it for every point of a site. */
export interface EnuFrame {
  origin: GeodeticPoint;
  originEcef: Vec3;
  /** Rows of the rotation ECEF → ENU: [east, north, up] unit vectors in ECEF. */
  r: [Vec3, Vec3, Vec3];
}

export function enuFrame(origin: GeodeticPoint): EnuFrame {
  const phi = origin.latDeg * DEG;
  const lam = origin.lonDeg * DEG;
  const sp = Math.sin(phi), cp = Math.cos(phi), sl = Math.sin(lam), cl = Math.cos(lam);
  return {
    origin,
    originEcef: geodeticToEcef(origin),
    r: [
      [-sl, cl, 0],
      [-sp * cl, -sp * sl, cp],
      [cp * cl, cp * sl, sp],
    ],
  };
}

/** East, north, up (metres) of an ECEF point in the frame. */
export function ecefToEnu(frame: EnuFrame, x: Vec3): Vec3 {
  const dx = x[0] - frame.originEcef[0];
  const dy = x[1] - frame.originEcef[1];
  const dz = x[2] - frame.originEcef[2];
  const [re, rn, ru] = frame.r;
  return [re[0] * dx + re[1] * dy + re[2] * dz, rn[0] * dx + rn[1] * dy + rn[2] * dz, ru[0] * dx + ru[1] * dy + ru[2] * dz];
}

/** East, north, up (metres) of a geodetic point about the frame's origin. */
export function geodeticToEnu(frame: EnuFrame, p: GeodeticPoint): Vec3 {
  return ecefToEnu(frame, geodeticToEcef(p));
}

/** Whether latitude, longitude and height are finite and in range (|φ| ≤ 90°, |λ| ≤ 180°). */
export function isValidGeodetic(p: GeodeticPoint): boolean {
  return Number.isFinite(p.latDeg) && Number.isFinite(p.lonDeg) && Number.isFinite(p.heightM) && Math.abs(p.latDeg) <= 90 && Math.abs(p.lonDeg) <= 180;
}
