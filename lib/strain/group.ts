/**
 * Least-squares strain of a group of N points (domain.md §3, "Groups"): x_i = F X_i + t by weighted
 * least squares over weighted-centred coordinates, w_i = 1/(σ²_E,ref + σ²_N,ref + σ²_E,cur + σ²_N,cur)
 * (plus both σ²_H in volume mode). Solved for the displacement gradient H = F − I from u_i = x_i − X_i,
 * which is the same fit and keeps small strains exact at grid magnitudes. With three points the fit is
 * exact and equals the triangle's. Volume mode (N ≥ 4, not coplanar) fits a 3×3 F.
 * Precision: precision.ts (affine fits).
 */
import type { GroupMode, GroupPoint, GroupStrainResult, GroupVolumeStrainOk, Mat2, Mat3, StrainOptions, SurveyPoint } from "./types.ts";
import { mat2 } from "./tensor2.ts";
import { azimuthFromAngle } from "./principal.ts";
import { planarAffinePrecision, planarMeasuresFromH, publicMeasures } from "./measures.ts";
import { checkPoint } from "./geometry.ts";
import { inverseMatrix, leastSquares, symmetricEigen } from "./linalg.ts";
import { determinantGradient, eigenGradient, isSignificant, sigmaOfAffineFunction, subtractGradients, type AffineSensitivity } from "./precision.ts";
import { kFromOptions } from "./triangle.ts";

/** A configuration is collinear (plan) or coplanar (volume) below this √(λ_min/λ_max) of its scatter matrix. */
export const SPREAD_TOLERANCE = 1e-6;

export interface GroupOptions extends StrainOptions {
  mode?: GroupMode;
}

function coords(p: SurveyPoint, d: number): number[] {
  return d === 2 ? [p.east, p.north] : [p.east, p.north, p.height];
}
function sigmas(p: SurveyPoint, d: number): number[] {
  return d === 2 ? [p.sigmaEast, p.sigmaNorth] : [p.sigmaEast, p.sigmaNorth, p.sigmaHeight];
}

/** √(λ_min/λ_max) of Σ w_i c_i c_iᵀ (c centred). */
function spread(centred: number[][], w: number[], d: number): number {
  const s = Array.from({ length: d }, () => new Array<number>(d).fill(0));
  centred.forEach((c, i) => {
    for (let a = 0; a < d; a++) for (let b = 0; b < d; b++) s[a][b] += w[i] * c[a] * c[b];
  });
  const { values } = symmetricEigen(s);
  const max = values[0];
  const min = values[d - 1];
  return max > 0 ? Math.sqrt(Math.max(0, min) / max) : 0;
}

export function computeGroupStrain(points: readonly GroupPoint[], opts: GroupOptions = {}): GroupStrainResult {
  const k = kFromOptions(opts);
  const mode = opts.mode ?? "plan";
  const d = mode === "plan" ? 2 : 3;
  const minPoints = mode === "plan" ? 3 : 4;
  const seen = new Set<string>();
  for (const p of points) {
    if (seen.has(p.code)) return { status: "degenerate", message: `point ${p.code} appears twice in the group` };
    seen.add(p.code);
  }
  const used = points.filter((p): p is GroupPoint & { ref: SurveyPoint; cur: SurveyPoint } => p.ref !== undefined && p.cur !== undefined);
  const absent = points.filter((p) => p.ref === undefined || p.cur === undefined).map((p) => `${p.code} (${p.ref === undefined ? "reference" : "current"})`);
  if (used.length < minPoints) {
    return { status: "missing-point", message: `only ${used.length} of ${points.length} points are in both epochs; ${mode} groups need ${minPoints}${absent.length ? `; missing: ${absent.join(", ")}` : ""}` };
  }
  for (const p of used) {
    const bad = checkPoint(p.ref, `reference point ${p.code}`, d === 3) ?? checkPoint(p.cur, `current point ${p.code}`, d === 3);
    if (bad) return { status: "degenerate", message: bad };
  }
  const n = used.length;
  const warnings: string[] = [];
  let w = used.map((p) => 1 / [...sigmas(p.ref, d), ...sigmas(p.cur, d)].reduce((s, x) => s + x * x, 0));
  if (!w.every((x) => Number.isFinite(x))) {
    w = w.map(() => 1);
    warnings.push("a point has zero σ: equal weights used");
  }
  const W = w.reduce((s, x) => s + x, 0);
  // Local origin at the first point keeps the centring exact at grid magnitudes.
  const origin = coords(used[0].ref, d);
  const X = used.map((p) => coords(p.ref, d).map((c, j) => c - origin[j]));
  const U = used.map((p) => coords(p.cur, d).map((c, j) => c - coords(p.ref, d)[j]));
  const mean = (rows: number[][]): number[] => Array.from({ length: d }, (_, j) => rows.reduce((s, r, i) => s + w[i] * r[j], 0) / W);
  const Xm = mean(X);
  const Um = mean(U);
  const Xc = X.map((r) => r.map((c, j) => c - Xm[j]));
  const Uc = U.map((r) => r.map((c, j) => c - Um[j]));
  const xc = Xc.map((r, i) => r.map((c, j) => c + Uc[i][j]));
  const refSpread = spread(Xc, w, d);
  const curSpread = spread(xc, w, d);
  const shapeWord = d === 2 ? "collinear" : "coplanar";
  if (!(refSpread >= SPREAD_TOLERANCE)) return { status: "degenerate", message: `reference points are ${shapeWord} or coincident (spread ${refSpread.toExponential(2)} < ${SPREAD_TOLERANCE})` };
  if (!(curSpread >= SPREAD_TOLERANCE)) return { status: "degenerate", message: `current points are ${shapeWord} or coincident (spread ${curSpread.toExponential(2)} < ${SPREAD_TOLERANCE})` };

  const sw = w.map(Math.sqrt);
  const Ht = leastSquares(
    Xc.map((r, i) => r.map((c) => c * sw[i])),
    Uc.map((r, i) => r.map((c) => c * sw[i])),
  ); // d×d, Hᵀ
  const H = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => Ht[j][i]));
  const A = Array.from({ length: d }, (_, a) => Array.from({ length: d }, (_, b) => Xc.reduce((s, r, i) => s + w[i] * r[a] * r[b], 0)));
  const aInv = inverseMatrix(A);
  const r = Uc.map((u, i) => u.map((c, a) => c - H[a].reduce((s, h, b) => s + h * Xc[i][b], 0)));
  const residualRmsM = Math.sqrt(r.reduce((s, v) => s + v.reduce((t, x) => t + x * x, 0), 0) / n);
  const sens: Omit<AffineSensitivity, "d" | "F"> = {
    n,
    aInv: Float64Array.from(aInv.flat()),
    g: Float64Array.from(Xc.flatMap((row, i) => aInv.map((arow) => w[i] * arow.reduce((s, x, b) => s + x * row[b], 0)))),
    wr: Float64Array.from(r.flatMap((row, i) => row.map((x) => w[i] * x))),
    sigmaRef: Float64Array.from(used.flatMap((p) => sigmas(p.ref, d))),
    sigmaCur: Float64Array.from(used.flatMap((p) => sigmas(p.cur, d))),
  };
  const pointsUsed = used.map((p) => p.code);
  if (absent.length) warnings.push(`left out (not in both epochs): ${absent.join(", ")}`);

  if (d === 2) {
    const h: Mat2 = mat2(H[0][0], H[0][1], H[1][0], H[1][1]);
    const detF = (1 + h[0][0]) * (1 + h[1][1]) - h[0][1] * h[1][0];
    if (!(detF > 0)) return { status: "degenerate", message: `group turned over between epochs (det F = ${detF.toPrecision(3)} ≤ 0)` };
    const m = planarMeasuresFromH(h);
    return {
      status: "ok",
      ...publicMeasures(m),
      azimuthMaxDeg: azimuthFromAngle(m.greenAxisRad, m.greenMax - m.greenMin),
      ...planarAffinePrecision(m, sens, k),
      residualRmsM,
      redundancy: 2 * n - 6,
      pointsUsed,
      warnings,
    };
  }
  return volumeResult(H, sens, k, { residualRmsM, redundancy: 3 * n - 12, pointsUsed, warnings });
}

function mat3(m: number[][]): Mat3 {
  return [
    [m[0][0], m[0][1], m[0][2]],
    [m[1][0], m[1][1], m[1][2]],
    [m[2][0], m[2][1], m[2][2]],
  ];
}
function mul(a: number[][], b: number[][]): number[][] {
  return a.map((row) => b[0].map((_, j) => row.reduce((s, x, k) => s + x * b[k][j], 0)));
}
function tr(a: number[][]): number[][] {
  return a[0].map((_, j) => a.map((row) => row[j]));
}

function volumeResult(
  H: number[][],
  sens: Omit<AffineSensitivity, "d" | "F">,
  k: number,
  extra: Pick<GroupVolumeStrainOk, "residualRmsM" | "redundancy" | "pointsUsed" | "warnings">,
): GroupStrainResult {
  const F = H.map((row, i) => row.map((x, j) => x + (i === j ? 1 : 0)));
  const [[a, b, c], [e, f, g], [p, q, s]] = H;
  // det(I + H) − 1 = tr H + Σ principal 2×2 minors + det H (no 1 − 1 cancellation).
  const volumetricStrain = a + f + s + (a * f - b * e) + (a * s - c * p) + (f * s - g * q) + (a * (f * s - g * q) - b * (e * s - g * p) + c * (e * q - f * p));
  if (!(volumetricStrain > -1)) return { status: "degenerate", message: `group turned over between epochs (det F = ${(1 + volumetricStrain).toPrecision(3)} ≤ 0)` };
  const HtH = mul(tr(H), H);
  const green = H.map((row, i) => row.map((x, j) => 0.5 * (x + H[j][i] + HtH[i][j])));
  const small = H.map((row, i) => row.map((x, j) => 0.5 * (x + H[j][i])));
  const Finv = inverseMatrix(F);
  const almansiRaw = mul(tr(Finv), mul(green, Finv)); // e = F⁻ᵀ E F⁻¹ (Holzapfel 2000, eq. 2.84)
  const almansi = almansiRaw.map((row, i) => row.map((x, j) => 0.5 * (x + almansiRaw[j][i])));
  const eg = symmetricEigen(green);
  const es = symmetricEigen(small);
  const [gMax, gMid, gMin] = eg.values;
  const stretch = eg.values.map((x) => Math.sqrt(1 + 2 * x));
  // Polar decomposition: U = V diag(λ) Vᵀ, R = F U⁻¹ (e.g. Holzapfel 2000, §2.6).
  const V = eg.vectors; // V[k] is the k-th eigenvector
  const uInv = [0, 1, 2].map((i) => [0, 1, 2].map((j) => V.reduce((sum, v, kk) => sum + (v[i] * v[j]) / stretch[kk], 0)));
  const R = mul(F, uInv);
  const sv: [number, number, number] = [0.5 * (R[2][1] - R[1][2]), 0.5 * (R[0][2] - R[2][0]), 0.5 * (R[1][0] - R[0][1])];
  const sinT = Math.hypot(...sv);
  const cosT = 0.5 * (R[0][0] + R[1][1] + R[2][2] - 1);
  const rotationRad = Math.atan2(sinT, cosT);
  const rotationAxis: [number, number, number] | null = sinT > 1e-12 ? [sv[0] / sinT, sv[1] / sinT, sv[2] / sinT] : null;

  const Ff = Float64Array.from(F.flat());
  const full: AffineSensitivity = { ...sens, d: 3, F: Ff };
  const grads = V.map((v) => eigenGradient(Ff, 3, v));
  const sigma = {
    greenMax: sigmaOfAffineFunction(full, grads[0]),
    greenMid: sigmaOfAffineFunction(full, grads[1]),
    greenMin: sigmaOfAffineFunction(full, grads[2]),
    maxShear: sigmaOfAffineFunction(full, subtractGradients(grads[0], grads[2])),
    volumetricStrain: sigmaOfAffineFunction(full, determinantGradient(Ff, 3)),
  };
  const values = { greenMax: gMax, greenMid: gMid, greenMin: gMin, maxShear: gMax - gMin, volumetricStrain };
  return {
    status: "ok",
    F: mat3(F),
    green: mat3(green),
    almansi: mat3(almansi),
    small: mat3(small),
    greenMax: gMax,
    greenMid: gMid,
    greenMin: gMin,
    almansiMax: gMax / (1 + 2 * gMax),
    almansiMid: gMid / (1 + 2 * gMid),
    almansiMin: gMin / (1 + 2 * gMin),
    smallMax: es.values[0],
    smallMid: es.values[1],
    smallMin: es.values[2],
    stretchMax: stretch[0],
    stretchMid: stretch[1],
    stretchMin: stretch[2],
    maxShear: gMax - gMin,
    volumetricStrain,
    rotationDeg: (rotationRad * 180) / Math.PI,
    rotationAxis,
    sigma,
    significant: {
      greenMax: isSignificant(values.greenMax, sigma.greenMax, k),
      greenMid: isSignificant(values.greenMid, sigma.greenMid, k),
      greenMin: isSignificant(values.greenMin, sigma.greenMin, k),
      maxShear: isSignificant(values.maxShear, sigma.maxShear, k),
      volumetricStrain: isSignificant(values.volumetricStrain, sigma.volumetricStrain, k),
    },
    ...extra,
  };
}
