/**
 * Polar decomposition F = R·U of a 2×2 deformation gradient with det F > 0.
 *
 * In 2D the rotation has the closed form θ = atan2(F₁₀ − F₀₁, F₀₀ + F₁₁) (e.g. Hoger & Carlson 1984,
 * "Determination of the stretch and rotation in the polar decomposition of the deformation gradient",
 * Q. Appl. Math. 42; the 2D case of their formula), and U = Rᵀ F.
 */
import type { Mat2 } from "./types.ts";
import { mat2, mul2 } from "./tensor2.ts";

/** Rotation angle of R in degrees, counter-clockwise positive, in (−180°, 180°]. */
export function polarRotationDeg(f: Mat2): number {
  return rotationDegFromComponents(f[0][0], f[0][1], f[1][0], f[1][1]);
}

/** Same as `polarRotationDeg`, on the four components (shared with the batch kernel). */
export function rotationDegFromComponents(f00: number, f01: number, f10: number, f11: number): number {
  const deg = (Math.atan2(f10 - f01, f00 + f11) * 180) / Math.PI;
  return deg <= -180 ? deg + 360 : deg;
}

/** R and the right stretch U (symmetric positive definite) with F = R·U. */
export function polarDecompose2(f: Mat2): { R: Mat2; U: Mat2; rotationDeg: number } {
  const theta = Math.atan2(f[1][0] - f[0][1], f[0][0] + f[1][1]);
  const c = Math.cos(theta);
  const s = Math.sin(theta);
  const r = mat2(c, -s, s, c);
  const u = mul2(mat2(c, s, -s, c), f);
  const off = 0.5 * (u[0][1] + u[1][0]);
  return { R: r, U: mat2(u[0][0], off, off, u[1][1]), rotationDeg: polarRotationDeg(f) };
}
