/**
 * Strain of a plan triangle (E, N only) between a reference and a current epoch (domain.md §3).
 *
 *        c                 D_X = [X_b − X_a, X_c − X_a]   (edges as columns)
 *       / \                D_x = [x_b − x_a, x_c − x_a]
 *      /   \               F = D_x · D_X⁻¹ = I + D_u · D_X⁻¹,  u = x − X
 *     a --- b
 *
 * F is formed from the displacements (D_u) so that a 1e-9 strain at 5,000,000 m grid coordinates
 * keeps its digits.
 */
import type { Mat2, StrainOptions, SurveyPoint, TriangleStrainResult } from "./types.ts";
import { det2, mat2, mul2 } from "./tensor2.ts";
import { azimuthFromAngle } from "./principal.ts";
import { planarAffinePrecision, planarMeasuresFromH, publicMeasures } from "./measures.ts";
import { SHAPE_TOLERANCE, WARN_MIN_ANGLE_DEG, checkPoint, triangleShape } from "./geometry.ts";
import { twoSidedK } from "./normal-quantile.ts";

export const DEFAULT_CONFIDENCE = 0.95;

/** k for `opts.confidence` (default 0.95); throws RangeError for a level outside (0, 1). */
export function kFromOptions(opts: StrainOptions | undefined): number {
  return twoSidedK(opts?.confidence ?? DEFAULT_CONFIDENCE);
}

const LABELS = ["a", "b", "c"] as const;

/**
 * Plan-mode strain of the triangle a, b, c. Tensors in the basis (E, N). Degenerate (tagged, never
 * NaN) when a coordinate is not finite, when 2·area/(longest edge)² < 1e-6 in either epoch, or when
 * det F ≤ 0 (turned over). Hand-made slivers are computed with a warning below 20°.
 */
export function computeTriangleStrain(
  ref: readonly [SurveyPoint, SurveyPoint, SurveyPoint],
  cur: readonly [SurveyPoint, SurveyPoint, SurveyPoint],
  opts: StrainOptions = {},
): TriangleStrainResult {
  const k = kFromOptions(opts);
  for (let i = 0; i < 3; i++) {
    const bad = checkPoint(ref[i], `reference point ${LABELS[i]}`, false) ?? checkPoint(cur[i], `current point ${LABELS[i]}`, false);
    if (bad) return { status: "degenerate", message: bad };
  }
  const [Xa, Xb, Xc] = ref;
  const [xa, xb, xc] = cur;
  const dX = mat2(Xb.east - Xa.east, Xc.east - Xa.east, Xb.north - Xa.north, Xc.north - Xa.north);
  const dx = mat2(xb.east - xa.east, xc.east - xa.east, xb.north - xa.north, xc.north - xa.north);
  const refShape = triangleShape([dX[0][0], dX[1][0], 0], [dX[0][1], dX[1][1], 0]);
  const curShape = triangleShape([dx[0][0], dx[1][0], 0], [dx[0][1], dx[1][1], 0]);
  if (!(refShape.shape >= SHAPE_TOLERANCE)) return { status: "degenerate", message: `reference triangle is collinear or coincident (2·area/longest² = ${refShape.shape.toExponential(2)} < ${SHAPE_TOLERANCE})` };
  if (!(curShape.shape >= SHAPE_TOLERANCE)) return { status: "degenerate", message: `current triangle is collinear or coincident (2·area/longest² = ${curShape.shape.toExponential(2)} < ${SHAPE_TOLERANCE})` };

  const ux = [xa.east - Xa.east, xb.east - Xb.east, xc.east - Xc.east];
  const uy = [xa.north - Xa.north, xb.north - Xb.north, xc.north - Xc.north];
  const dU: Mat2 = mat2(ux[1] - ux[0], ux[2] - ux[0], uy[1] - uy[0], uy[2] - uy[0]);
  const d = det2(dX);
  const g: Mat2 = mat2(dX[1][1] / d, -dX[0][1] / d, -dX[1][0] / d, dX[0][0] / d); // D_X⁻¹
  const h = mul2(dU, g);
  const detF = (1 + h[0][0]) * (1 + h[1][1]) - h[0][1] * h[1][0];
  if (!(detF > 0)) return { status: "degenerate", message: `triangle turned over between epochs (det F = ${detF.toPrecision(3)} ≤ 0)` };

  const m = planarMeasuresFromH(h);
  // g_b, g_c are the rows of D_X⁻¹; g_a = −(g_b + g_c) (see precision.ts).
  const gi = Float64Array.of(-(g[0][0] + g[1][0]), -(g[0][1] + g[1][1]), g[0][0], g[0][1], g[1][0], g[1][1]);
  const precision = planarAffinePrecision(
    m,
    {
      n: 3,
      aInv: new Float64Array(4),
      g: gi,
      wr: new Float64Array(6),
      sigmaRef: Float64Array.of(Xa.sigmaEast, Xa.sigmaNorth, Xb.sigmaEast, Xb.sigmaNorth, Xc.sigmaEast, Xc.sigmaNorth),
      sigmaCur: Float64Array.of(xa.sigmaEast, xa.sigmaNorth, xb.sigmaEast, xb.sigmaNorth, xc.sigmaEast, xc.sigmaNorth),
    },
    k,
  );
  const warnings: string[] = [];
  if (refShape.minAngleDeg < WARN_MIN_ANGLE_DEG) warnings.push(`smallest interior angle ${refShape.minAngleDeg.toFixed(1)}° is below ${WARN_MIN_ANGLE_DEG}°: survey noise is amplified`);
  return {
    status: "ok",
    ...publicMeasures(m),
    azimuthMaxDeg: azimuthFromAngle(m.greenAxisRad, m.greenMax - m.greenMin),
    ...precision,
    minAngleDeg: refShape.minAngleDeg,
    warnings,
  };
}
