/**
 * The inverse of lib/geodesy/enu.ts: local east-north-up metres about a fixed origin back to WGS84
 * geodetic coordinates (for exports: RFC 7946 GeoJSON wants longitude, latitude, height).
 *
 *   ENU (e, n, u) ──▶ ECEF (X, Y, Z) ──▶ geodetic (φ, λ, h)
 *
 * ENU → ECEF: the rotation of enu.ts is orthonormal, so its inverse is its transpose:
 *   ΔX = −sin λ₀ e − sin φ₀ cos λ₀ n + cos φ₀ cos λ₀ u
 *   ΔY =  cos λ₀ e − sin φ₀ sin λ₀ n + cos φ₀ sin λ₀ u
 *   ΔZ =             cos φ₀ n        + sin φ₀ u
 * (Hofmann-Wellenhof, Lichtenegger & Wasle, *GNSS*, Springer 2008, local-level system.)
 *
 * ECEF → geodetic: Bowring's (1976) parametric-latitude start, then fixed-point iteration of
 *   φ = atan2(Z + e² N sin φ, p),  h = p / cos φ − N   (or Z / sin φ − N(1 − e²) near the poles)
 * with N = a / √(1 − e² sin² φ), p = √(X² + Y²) (same book, "Cartesian → ellipsoidal"; Bowring, B. R.,
 * "Transformation from spatial to geographical coordinates", Survey Review 23 (181), 1976). From
 * Bowring's start the iteration converges to below 1e-12 rad (≈ 6 µm) in two or three steps for
 * points within a few kilometres of the ellipsoid; it stops when the change is below 1e-14 rad or
 * after 10 steps.
 *
 * Angles in degrees, lengths in metres. Pure.
 */
import { WGS84_A_M, WGS84_E2, WGS84_F, type EnuFrame, type GeodeticPoint, type Vec3 } from "./enu.ts";

const DEG = Math.PI / 180;
/** Semi-minor axis b = a(1 − f), metres. */
const WGS84_B_M = WGS84_A_M * (1 - WGS84_F);
/** Second eccentricity squared e′² = (a² − b²) / b². */
const WGS84_EP2 = (WGS84_A_M * WGS84_A_M - WGS84_B_M * WGS84_B_M) / (WGS84_B_M * WGS84_B_M);
/** Stop the latitude iteration when it moves by less than this (radians; 1e-14 rad ≈ 64 nm). */
const LAT_TOLERANCE_RAD = 1e-14;
const MAX_ITERATIONS = 10;

/** ECEF coordinates (metres) of a point given in the frame's east, north, up (metres). */
export function enuToEcef(frame: EnuFrame, enu: Vec3): Vec3 {
  const [re, rn, ru] = frame.r;
  const [e, n, u] = enu;
  return [
    frame.originEcef[0] + re[0] * e + rn[0] * n + ru[0] * u,
    frame.originEcef[1] + re[1] * e + rn[1] * n + ru[1] * u,
    frame.originEcef[2] + re[2] * e + rn[2] * n + ru[2] * u,
  ];
}

/** WGS84 latitude, longitude (degrees) and ellipsoidal height (metres) of an ECEF point. */
export function ecefToGeodetic(x: Vec3): GeodeticPoint {
  const [X, Y, Z] = x;
  const p = Math.hypot(X, Y);
  const lon = Math.atan2(Y, X);
  if (p < 1e-9) {
    // On the polar axis: latitude ±90°, height above the pole.
    const latDeg = Z >= 0 ? 90 : -90;
    return { latDeg, lonDeg: 0, heightM: Math.abs(Z) - WGS84_B_M };
  }
  // Bowring's start: parametric latitude β from tan β = (a Z) / (b p).
  const beta = Math.atan2(WGS84_A_M * Z, WGS84_B_M * p);
  const sb = Math.sin(beta);
  const cb = Math.cos(beta);
  let phi = Math.atan2(Z + WGS84_EP2 * WGS84_B_M * sb * sb * sb, p - WGS84_E2 * WGS84_A_M * cb * cb * cb);
  for (let i = 0; i < MAX_ITERATIONS; i++) {
    const s = Math.sin(phi);
    const N = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * s * s);
    const next = Math.atan2(Z + WGS84_E2 * N * s, p);
    const done = Math.abs(next - phi) < LAT_TOLERANCE_RAD;
    phi = next;
    if (done) break;
  }
  const s = Math.sin(phi);
  const c = Math.cos(phi);
  const N = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * s * s);
  // Away from the poles h from p (well conditioned), near them from Z.
  const heightM = Math.abs(c) > 1e-3 ? p / c - N : Z / s - N * (1 - WGS84_E2);
  return { latDeg: phi / DEG, lonDeg: lon / DEG, heightM };
}

/** WGS84 geodetic coordinates of a point given in the frame's east, north, up (metres). */
export function enuToGeodetic(frame: EnuFrame, enu: Vec3): GeodeticPoint {
  return ecefToGeodetic(enuToEcef(frame, enu));
}
