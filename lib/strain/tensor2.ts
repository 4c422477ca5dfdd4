/**
 * Closed-form helpers for 2×2 matrices (`Mat2`, row-major, `m[i][j]` = row i, column j).
 * Pure: each returns a new matrix and never changes its arguments.
 */
import type { Mat2 } from "./types.ts";

export function mat2(a00: number, a01: number, a10: number, a11: number): Mat2 {
  return [
    [a00, a01],
    [a10, a11],
  ];
}

export const IDENTITY2: Readonly<Mat2> = mat2(1, 0, 0, 1);

/** Determinant a00·a11 − a01·a10. */
export function det2(m: Mat2): number {
  return m[0][0] * m[1][1] - m[0][1] * m[1][0];
}

/** Inverse by the adjugate; the caller checks det ≠ 0 (a programmer error otherwise). */
export function inv2(m: Mat2): Mat2 {
  const d = det2(m);
  if (d === 0 || !Number.isFinite(d)) throw new RangeError("inv2: singular matrix");
  return mat2(m[1][1] / d, -m[0][1] / d, -m[1][0] / d, m[0][0] / d);
}

/** Matrix product a·b. */
export function mul2(a: Mat2, b: Mat2): Mat2 {
  return mat2(
    a[0][0] * b[0][0] + a[0][1] * b[1][0],
    a[0][0] * b[0][1] + a[0][1] * b[1][1],
    a[1][0] * b[0][0] + a[1][1] * b[1][0],
    a[1][0] * b[0][1] + a[1][1] * b[1][1],
  );
}

export function transpose2(m: Mat2): Mat2 {
  return mat2(m[0][0], m[1][0], m[0][1], m[1][1]);
}

export function add2(a: Mat2, b: Mat2): Mat2 {
  return mat2(a[0][0] + b[0][0], a[0][1] + b[0][1], a[1][0] + b[1][0], a[1][1] + b[1][1]);
}

export function scale2(a: Mat2, s: number): Mat2 {
  return mat2(a[0][0] * s, a[0][1] * s, a[1][0] * s, a[1][1] * s);
}

/** Matrix–vector product m·v. */
export function apply2(m: Mat2, v: readonly [number, number]): [number, number] {
  return [m[0][0] * v[0] + m[0][1] * v[1], m[1][0] * v[0] + m[1][1] * v[1]];
}

/** Cofactor matrix ∂det(m)/∂m_ij = [[a11, −a10], [−a01, a00]]. */
export function cofactor2(m: Mat2): Mat2 {
  return mat2(m[1][1], -m[1][0], -m[0][1], m[0][0]);
}

/**
 * Green-Lagrange strain E = ½(FᵀF − I), computed as ½(H + Hᵀ + HᵀH) with H = F − I given
 * directly, so that strains of 1e-9 keep their digits (no 1 − 1 cancellation).
 */
export function greenFromH(h: Mat2): Mat2 {
  const exx = h[0][0] + 0.5 * (h[0][0] * h[0][0] + h[1][0] * h[1][0]);
  const eyy = h[1][1] + 0.5 * (h[0][1] * h[0][1] + h[1][1] * h[1][1]);
  const exy = 0.5 * (h[0][1] + h[1][0] + h[0][0] * h[0][1] + h[1][0] * h[1][1]);
  return mat2(exx, exy, exy, eyy);
}

/** Small strain ε = ½(H + Hᵀ). */
export function smallFromH(h: Mat2): Mat2 {
  const exy = 0.5 * (h[0][1] + h[1][0]);
  return mat2(h[0][0], exy, exy, h[1][1]);
}

/**
 * Euler-Almansi strain e = ½(I − b⁻¹), b = FFᵀ, evaluated through the identity e = F⁻ᵀ E F⁻¹
 * (Holzapfel 2000, *Nonlinear Solid Mechanics*, eq. 2.84), free of the I − b⁻¹ cancellation.
 */
export function almansiFromGreen(f: Mat2, green: Mat2): Mat2 {
  const fi = inv2(f);
  const e = mul2(transpose2(fi), mul2(green, fi));
  const off = 0.5 * (e[0][1] + e[1][0]);
  return mat2(e[0][0], off, off, e[1][1]);
}
