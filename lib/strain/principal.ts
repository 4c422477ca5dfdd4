/**
 * Principal values and axes of symmetric 2×2 tensors, in closed form.
 *
 * For S = [[a, b], [b, c]]: λ = (a + c)/2 ± √(((a − c)/2)² + b²), and the major axis makes the angle
 * θ = ½·atan2(2b, a − c) with the first basis axis, counter-clockwise (Mohr's circle; e.g. Timoshenko &
 * Goodier 1951, *Theory of Elasticity*, §9). At an isotropic point atan2(0, 0) = 0 picks the first axis,
 * so the axis is always defined for the precision code; `azimuthFromAngle` reports null there instead.
 */
import type { Mat2 } from "./types.ts";

/** Below this spread (greenMax − greenMin) there is no preferred direction (domain.md §3). */
export const ISOTROPY_TOLERANCE = 1e-9;

export interface Principal2 {
  max: number;
  min: number;
  /** Angle of the major axis from basis axis 0 toward axis 1, radians, in (−π/2, π/2]. */
  angleRad: number;
}

export function principal2(s: Mat2): Principal2 {
  const a = s[0][0];
  const c = s[1][1];
  const b = 0.5 * (s[0][1] + s[1][0]);
  const mean = 0.5 * (a + c);
  const half = 0.5 * (a - c);
  const radius = Math.sqrt(half * half + b * b);
  return { max: mean + radius, min: mean - radius, angleRad: 0.5 * Math.atan2(2 * b, a - c) };
}

/** Unit major and minor axes from `principal2(...).angleRad`. */
export function principalAxes2(angleRad: number): { major: [number, number]; minor: [number, number] } {
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  return { major: [c, s], minor: [-s, c] };
}

/**
 * Grid azimuth (clockwise from grid north, [0°, 180°)) of an axis at `angleRad` counter-clockwise from
 * East; null when max − min is below ISOTROPY_TOLERANCE.
 */
export function azimuthFromAngle(angleRad: number, spread: number): number | null {
  if (!(spread >= ISOTROPY_TOLERANCE)) return null;
  let az = 90 - (angleRad * 180) / Math.PI;
  az = az % 180;
  if (az < 0) az += 180;
  if (az >= 180) az -= 180;
  return az;
}
