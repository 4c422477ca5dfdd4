/**
 * Strain of a triangle in its own plane from 3D points (surface mode, domain.md §3): wall faces,
 * tunnel linings.
 *
 * In-plane basis of each epoch, from the vertex order a, b, c (so it never flips):
 *   n = unit((b − a) × (c − a)),  u = unit(ẑ × n) (horizontal, in the plane),  v = n × u (up the slope);
 *   where |ẑ × n| < 1e-6 (a horizontal face), u = East.
 * Local edge matrices A = [u v]ᵀ D_X and a = [u′ v′]ᵀ D_x; F = a·A⁻¹ maps (u, v) to (u′, v′).
 * H = F − I is formed as ([u′ v′]ᵀ D_u + [u′ − u, v′ − v]ᵀ D_X)·A⁻¹ to keep small strains exact.
 *
 * Precision: eigenvalues of E depend only on the metrics M_X = D_XᵀD_X, M_x = D_xᵀD_x; with
 * w = A⁻¹ n (n a unit eigenvector of E) and λ = 1 + 2E_k, dE_k = (D_x w)·(dD_x w) − λ (D_X w)·(dD_X w)
 * (perturbation of the generalised eigenproblem M_x w = λ M_X w, wᵀM_X w = 1). Areal strain is
 * area_x/area_X − 1 with ∂area/∂a = ½ n × (c − b) (and cyclically).
 */
import type { Mat2, StrainOptions, SurfaceStrainResult, SurveyPoint } from "./types.ts";
import { mat2, mul2 } from "./tensor2.ts";
import { ISOTROPY_TOLERANCE, principalAxes2 } from "./principal.ts";
import { planarMeasuresFromH, publicMeasures } from "./measures.ts";
import { SHAPE_TOLERANCE, WARN_MIN_ANGLE_DEG, checkPoint, cross3, dot3, norm3, scale3, sub3, triangleShape, xyz, type Vec3 } from "./geometry.ts";
import { isSignificant, sigmaFromGradients } from "./precision.ts";
import { kFromOptions } from "./triangle.ts";

/** |ẑ × n| below which a plane counts as horizontal and u = East (domain.md §3). */
export const HORIZONTAL_PLANE_TOLERANCE = 1e-6;
/** Faces within this many degrees of horizontal get a warning: plan mode is the better choice. */
export const WARN_NEAR_HORIZONTAL_DEG = 10;

export interface PlaneBasis {
  n: Vec3;
  u: Vec3;
  v: Vec3;
}

/** The in-plane basis of triangle edges e1 = b − a, e2 = c − a (see the module comment). */
export function planeBasis(e1: Vec3, e2: Vec3): PlaneBasis {
  const c = cross3(e1, e2);
  const n = scale3(c, 1 / norm3(c));
  const zx: Vec3 = [-n[1], n[0], 0];
  const len = norm3(zx);
  const u: Vec3 = len < HORIZONTAL_PLANE_TOLERANCE ? [1, 0, 0] : scale3(zx, 1 / len);
  const v = cross3(n, u);
  return { n, u, v };
}

const LABELS = ["a", "b", "c"] as const;

export function computeSurfaceTriangleStrain(
  ref: readonly [SurveyPoint, SurveyPoint, SurveyPoint],
  cur: readonly [SurveyPoint, SurveyPoint, SurveyPoint],
  opts: StrainOptions = {},
): SurfaceStrainResult {
  const k = kFromOptions(opts);
  for (let i = 0; i < 3; i++) {
    const bad = checkPoint(ref[i], `reference point ${LABELS[i]}`, true) ?? checkPoint(cur[i], `current point ${LABELS[i]}`, true);
    if (bad) return { status: "degenerate", message: bad };
  }
  const P = ref.map(xyz);
  const p = cur.map(xyz);
  const E1 = sub3(P[1], P[0]);
  const E2 = sub3(P[2], P[0]);
  const e1 = sub3(p[1], p[0]);
  const e2 = sub3(p[2], p[0]);
  const refShape = triangleShape(E1, E2);
  const curShape = triangleShape(e1, e2);
  if (!(refShape.shape >= SHAPE_TOLERANCE)) return { status: "degenerate", message: `reference triangle is collinear or coincident (2·area/longest² = ${refShape.shape.toExponential(2)} < ${SHAPE_TOLERANCE})` };
  if (!(curShape.shape >= SHAPE_TOLERANCE)) return { status: "degenerate", message: `current triangle is collinear or coincident (2·area/longest² = ${curShape.shape.toExponential(2)} < ${SHAPE_TOLERANCE})` };
  const B = planeBasis(E1, E2);
  const b = planeBasis(e1, e2);
  // No turn-over test here: each epoch's basis follows its own normal from the same vertex order, so
  // det F = area_x/area_X > 0 by construction (a 3D triangle can only be rotated, never mirrored).

  const A: Mat2 = mat2(dot3(B.u, E1), dot3(B.u, E2), dot3(B.v, E1), dot3(B.v, E2));
  const detA = A[0][0] * A[1][1] - A[0][1] * A[1][0];
  const aInv: Mat2 = mat2(A[1][1] / detA, -A[0][1] / detA, -A[1][0] / detA, A[0][0] / detA);
  const U = [sub3(p[0], P[0]), sub3(p[1], P[1]), sub3(p[2], P[2])];
  const dU1 = sub3(U[1], U[0]);
  const dU2 = sub3(U[2], U[0]);
  const du = sub3(b.u, B.u);
  const dv = sub3(b.v, B.v);
  // a − A = [u′ v′]ᵀ D_u + [u′ − u, v′ − v]ᵀ D_X
  const aMinusA: Mat2 = mat2(
    dot3(b.u, dU1) + dot3(du, E1),
    dot3(b.u, dU2) + dot3(du, E2),
    dot3(b.v, dU1) + dot3(dv, E1),
    dot3(b.v, dU2) + dot3(dv, E2),
  );
  const h = mul2(aMinusA, aInv);
  const m = planarMeasuresFromH(h);

  // Precision: gradients over [a, b, c] × (E, N, H), current then reference.
  const sigmaCur = cur.flatMap((q) => [q.sigmaEast, q.sigmaNorth, q.sigmaHeight]);
  const sigmaRef = ref.flatMap((q) => [q.sigmaEast, q.sigmaNorth, q.sigmaHeight]);
  const { major, minor } = principalAxes2(m.greenAxisRad);
  const eigenGrad = (axis: [number, number], value: number): { cur: number[]; ref: number[] } => {
    const w0 = aInv[0][0] * axis[0] + aInv[0][1] * axis[1];
    const w1 = aInv[1][0] * axis[0] + aInv[1][1] * axis[1];
    const dxw: Vec3 = [e1[0] * w0 + e2[0] * w1, e1[1] * w0 + e2[1] * w1, e1[2] * w0 + e2[2] * w1];
    const dXw: Vec3 = [E1[0] * w0 + E2[0] * w1, E1[1] * w0 + E2[1] * w1, E1[2] * w0 + E2[2] * w1];
    const lam = 1 + 2 * value;
    const coef = [-(w0 + w1), w0, w1];
    return {
      cur: coef.flatMap((c) => [dxw[0] * c, dxw[1] * c, dxw[2] * c]),
      ref: coef.flatMap((c) => [-lam * dXw[0] * c, -lam * dXw[1] * c, -lam * dXw[2] * c]),
    };
  };
  const gMax = eigenGrad(major, m.greenMax);
  const gMin = eigenGrad(minor, m.greenMin);
  const twiceAreaRef = norm3(cross3(E1, E2));
  const jac = m.arealStrain + 1;
  const areaGrad = (q: Vec3[], n: Vec3, factor: number): number[] =>
    [cross3(n, sub3(q[2], q[1])), cross3(n, sub3(q[0], q[2])), cross3(n, sub3(q[1], q[0]))].flatMap((g) => [g[0] * factor, g[1] * factor, g[2] * factor]);
  const areal = { cur: areaGrad(p, b.n, 1 / twiceAreaRef), ref: areaGrad(P, B.n, -jac / twiceAreaRef) };
  const sig = (g: { cur: number[]; ref: number[] }): number => Math.hypot(sigmaFromGradients(g.cur, sigmaCur), sigmaFromGradients(g.ref, sigmaRef));
  const shearGrad = { cur: gMax.cur.map((x, i) => x - gMin.cur[i]), ref: gMax.ref.map((x, i) => x - gMin.ref[i]) };
  const sigma = { greenMax: sig(gMax), greenMin: sig(gMin), maxShear: sig(shearGrad), arealStrain: sig(areal) };

  const warnings: string[] = [];
  if (refShape.minAngleDeg < WARN_MIN_ANGLE_DEG) warnings.push(`smallest interior angle ${refShape.minAngleDeg.toFixed(1)}° is below ${WARN_MIN_ANGLE_DEG}°: survey noise is amplified`);
  const tiltDeg = (Math.acos(Math.min(1, Math.abs(B.n[2]))) * 180) / Math.PI;
  if (tiltDeg < WARN_NEAR_HORIZONTAL_DEG) warnings.push(`face is within ${WARN_NEAR_HORIZONTAL_DEG}° of horizontal (${tiltDeg.toFixed(1)}°): plan mode is the better choice`);
  const spread = m.greenMax - m.greenMin;
  const dipMaxDeg = spread >= ISOTROPY_TOLERANCE ? (Math.atan2(Math.abs(Math.sin(m.greenAxisRad)), Math.abs(Math.cos(m.greenAxisRad))) * 180) / Math.PI : null;
  return {
    status: "ok",
    ...publicMeasures(m),
    dipMaxDeg,
    sigma,
    significant: {
      greenMax: isSignificant(m.greenMax, sigma.greenMax, k),
      greenMin: isSignificant(m.greenMin, sigma.greenMin, k),
      maxShear: isSignificant(m.maxShear, sigma.maxShear, k),
      arealStrain: isSignificant(m.arealStrain, sigma.arealStrain, k),
    },
    minAngleDeg: refShape.minAngleDeg,
    warnings,
  };
}
