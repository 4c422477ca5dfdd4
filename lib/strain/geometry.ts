/**
 * Small geometric helpers shared by the elements: validation of inputs, triangle shape, angles.
 */
import type { SurveyPoint } from "./types.ts";

/** A triangle is degenerate below this 2·area / (longest edge)² (domain.md §3; 0.866 for equilateral). */
export const SHAPE_TOLERANCE = 1e-6;
/** Hand-made triangles below this smallest interior angle get a warning (domain.md §3). */
export const WARN_MIN_ANGLE_DEG = 20;

export type Vec3 = [number, number, number];

/** Null when every coordinate and σ is finite and every σ ≥ 0; otherwise what is wrong. */
export function checkPoint(p: SurveyPoint, label: string, withHeight: boolean): string | null {
  const coords: (keyof SurveyPoint)[] = withHeight ? ["east", "north", "height"] : ["east", "north"];
  for (const key of coords) if (!Number.isFinite(p[key])) return `${label}: ${key} is not a finite number (${p[key]})`;
  const sig: (keyof SurveyPoint)[] = withHeight ? ["sigmaEast", "sigmaNorth", "sigmaHeight"] : ["sigmaEast", "sigmaNorth"];
  for (const key of sig) if (!(Number.isFinite(p[key]) && p[key] >= 0)) return `${label}: ${key} must be a finite number ≥ 0 (${p[key]})`;
  return null;
}

export function sub3(a: Vec3, b: Vec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}
export function cross3(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
export function dot3(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}
export function norm3(a: Vec3): number {
  return Math.sqrt(dot3(a, a));
}
export function scale3(a: Vec3, s: number): Vec3 {
  return [a[0] * s, a[1] * s, a[2] * s];
}

/**
 * Shape figure 2·area / (longest edge)² and smallest interior angle (degrees) of the triangle with
 * edge vectors e1 = b − a, e2 = c − a (3D; pass z = 0 for plan).
 */
export function triangleShape(e1: Vec3, e2: Vec3): { shape: number; minAngleDeg: number } {
  const e3 = sub3(e2, e1); // c − b
  const twiceArea = norm3(cross3(e1, e2));
  const l1 = dot3(e1, e1);
  const l2 = dot3(e2, e2);
  const l3 = dot3(e3, e3);
  const longest = Math.max(l1, l2, l3);
  const shape = longest > 0 ? twiceArea / longest : 0;
  // Angles by atan2(|cross|, dot): accurate even for slivers (Kahan, "Miscalculating area and angles of a needle-like triangle", 2014).
  const angA = Math.atan2(twiceArea, dot3(e1, e2));
  const angB = Math.atan2(twiceArea, -dot3(e1, e3));
  const angC = Math.PI - angA - angB;
  const minAngleDeg = (Math.min(angA, angB, angC) * 180) / Math.PI;
  return { shape, minAngleDeg: Math.max(0, minAngleDeg) };
}

export function xyz(p: SurveyPoint): Vec3 {
  return [p.east, p.north, p.height];
}
