/**
 * Batch kernel: plan strain of many triangles over many epochs on flat Float64Arrays, for whole sites
 * and long series. Same formulas as triangle.ts (and tested equal to it); no allocation in the loop.
 *
 * Layout (slot s = epoch·nTriangles + triangle, epochs outermost):
 *
 *   refXY    [xa, ya, xb, yb, xc, yc] × nTriangles        reference epoch, metres (E, N)
 *   curXY    [xa, ya, xb, yb, xc, yc] × nTriangles × nEpochs  current epochs, same vertex order
 *   sigmaRef [σEa, σNa, σEb, σNb, σEc, σNc] × nTriangles   (optional, with sigmaCur)
 *   sigmaCur same shape as curXY
 *
 * Outputs, one slot per triangle-epoch (see `TriangleBatchOut`); `status[s]` is 0 ok, 1 degenerate
 * (collinear or coincident in either epoch, or turned over), 2 a non-finite input. Read status first: a
 * slot that is not ok holds NaN in every quantity. `azimuthMaxDeg` is NaN where the strain is isotropic
 * (greenMax − greenMin < 1e-9), where the per-element API says null.
 *
 * Precision (first order, see precision.ts): with G = D_X⁻¹, unit eigenvector n of E, λ = 1 + 2E_k and
 * s_b = n·G₀, s_c = n·G₁, s_a = −(s_b + s_c):  ∂E_k/∂(x_i)_m = (F n)_m s_i, ∂E_k/∂(X_i)_m = −λ n_m s_i;
 * and for the areal strain J − 1: ∂J/∂(x_i) = cof(F)·g_i, ∂J/∂(X_i) = −J g_i.
 */
import { ISOTROPY_TOLERANCE } from "./principal.ts";
import { SHAPE_TOLERANCE } from "./geometry.ts";
import { atan2Fast, atan2WithNorm } from "./atan2.ts";

export const BATCH_OK = 0;
export const BATCH_DEGENERATE = 1;
export const BATCH_NON_FINITE = 2;

export interface TriangleBatchOut {
  /** 0 ok, 1 degenerate, 2 non-finite input; one per slot. */
  status: Uint8Array;
  /** F row-major [F00, F01, F10, F11] per slot. */
  F: Float64Array;
  /** Green-Lagrange [Exx, Eyy, Exy] per slot (basis E, N). */
  green: Float64Array;
  greenMax: Float64Array;
  greenMin: Float64Array;
  /** Grid azimuth of the greenMax axis, degrees clockwise from grid north, [0, 180); NaN when isotropic. */
  azimuthMaxDeg: Float64Array;
  /** Polar rotation, degrees counter-clockwise, (−180, 180]. */
  rotationDeg: Float64Array;
  /** det F − 1. */
  arealStrain: Float64Array;
  /** greenMax − greenMin. */
  maxShear: Float64Array;
  /** First-order σ (dimensionless); null when the batch was made without precision. */
  sigmaGreenMax: Float64Array | null;
  sigmaGreenMin: Float64Array | null;
  sigmaMaxShear: Float64Array | null;
  sigmaArealStrain: Float64Array | null;
}

/** Allocate the outputs for `slots` triangle-epochs (once; reuse across calls). */
export function createTriangleBatchOut(slots: number, withSigma = true): TriangleBatchOut {
  const f = (k = 1): Float64Array => new Float64Array(slots * k);
  return {
    status: new Uint8Array(slots),
    F: f(4),
    green: f(3),
    greenMax: f(),
    greenMin: f(),
    azimuthMaxDeg: f(),
    rotationDeg: f(),
    arealStrain: f(),
    maxShear: f(),
    sigmaGreenMax: withSigma ? f() : null,
    sigmaGreenMin: withSigma ? f() : null,
    sigmaMaxShear: withSigma ? f() : null,
    sigmaArealStrain: withSigma ? f() : null,
  };
}

export interface TriangleBatchInput {
  refXY: Float64Array;
  curXY: Float64Array;
  /** Both or neither; required when `out` has σ arrays. */
  sigmaRef?: Float64Array;
  sigmaCur?: Float64Array;
}

const RAD_TO_DEG = 180 / Math.PI;
/** fdlibm `s_atan.c` (Sun Microsystems 1993) uses its odd polynomial alone below 7/16 (about 1 ulp). */
const ATAN_POLY_LIMIT = 0.4375;
const AT0 = 3.33333333333329318027e-1, AT1 = -1.99999999998764832476e-1, AT2 = 1.42857142725034663711e-1;
const AT3 = -1.1111110405462355788e-1, AT4 = 9.09088713343650656196e-2, AT5 = -7.69187620504482999495e-2;
const AT6 = 6.66107313738753120669e-2, AT7 = -5.83357013379057348645e-2, AT8 = 4.97687799461593236017e-2;
const AT9 = -3.6531572744216915527e-2, AT10 = 1.62858201153657823623e-2;

/**
 * atan(t) for |t| < 7/16 by the fdlibm polynomial (same coefficients as atan2.ts). The polar rotation
 * of survey data is a fraction of a degree, so atan2(y, x) with x > 0 and |y| < 7/16·x takes this one
 * division instead of the two square roots and two divisions of the general path; the branch is
 * predictable on real data.
 */
function atanSmall(x: number): number {
  const z = x * x;
  const w = z * z;
  const s1 = z * (AT0 + w * (AT2 + w * (AT4 + w * (AT6 + w * (AT8 + w * AT10)))));
  const s2 = w * (AT1 + w * (AT3 + w * (AT5 + w * (AT7 + w * AT9))));
  return x - x * (s1 + s2);
}
/** Slots per block of the two-pass loop (see computeTriangleBatch). */
const BLOCK = 256;

/**
 * Fill `out` for every slot of `input` (layout in the module comment). Returns the number of slots.
 * Throws RangeError for mismatched array lengths (a programmer error).
 */
export function computeTriangleBatch(input: TriangleBatchInput, out: TriangleBatchOut): number {
  const { refXY, curXY, sigmaRef, sigmaCur } = input;
  const nTri = refXY.length / 6;
  const slots = curXY.length / 6;
  if (!Number.isInteger(nTri) || !Number.isInteger(slots) || nTri === 0 || slots % nTri !== 0) {
    throw new RangeError(`computeTriangleBatch: refXY (${refXY.length}) and curXY (${curXY.length}) must hold 6 numbers per triangle, curXY a whole number of epochs`);
  }
  if (out.status.length < slots || out.F.length < 4 * slots || out.green.length < 3 * slots) throw new RangeError("computeTriangleBatch: out is too small");
  const { status, F, green, greenMax, greenMin, azimuthMaxDeg, rotationDeg, arealStrain, maxShear } = out;
  const sGMax = out.sigmaGreenMax;
  const sGMin = out.sigmaGreenMin;
  const sShear = out.sigmaMaxShear;
  const sAreal = out.sigmaArealStrain;
  const withSigma = sGMax !== null && sGMin !== null && sShear !== null && sAreal !== null;
  if (withSigma && (!sigmaRef || !sigmaCur || sigmaRef.length !== refXY.length || sigmaCur.length !== curXY.length)) {
    throw new RangeError("computeTriangleBatch: sigmaRef and sigmaCur must match refXY and curXY");
  }

  // Reference-epoch quantities once per triangle (one allocation per call, none in the slot loop):
  // G = D_X⁻¹ row-major, and whether the reference shape passes (1) or not (0).
  const refG = new Float64Array(5 * nTri);
  for (let t = 0; t < nTri; t++) {
    const r = 6 * t;
    const e1x = refXY[r + 2] - refXY[r], e1y = refXY[r + 3] - refXY[r + 1];
    const e2x = refXY[r + 4] - refXY[r], e2y = refXY[r + 5] - refXY[r + 1];
    const e3x = e2x - e1x, e3y = e2y - e1y;
    const det = e1x * e2y - e2x * e1y;
    const l1 = e1x * e1x + e1y * e1y, l2 = e2x * e2x + e2y * e2y, l3 = e3x * e3x + e3y * e3y;
    const lRef = l1 > l2 ? (l1 > l3 ? l1 : l3) : l2 > l3 ? l2 : l3;
    const inv = 1 / det;
    const o = 5 * t;
    refG[o] = e2y * inv;
    refG[o + 1] = -e2x * inv;
    refG[o + 2] = -e1y * inv;
    refG[o + 3] = e1x * inv;
    refG[o + 4] = Math.abs(det) >= SHAPE_TOLERANCE * lRef ? 1 : 0;
  }

  // Blocks of BLOCK slots: pass 1 computes everything but the two angles; pass 2 computes the angles
  // from what pass 1 stored. The short pass-2 loop lets the CPU overlap the long atan2 dependency
  // chains of neighbouring slots (about twice as fast as one long loop body), while the block stays in cache.
  for (let s0 = 0; s0 < slots; s0 += BLOCK) {
  const s1 = s0 + BLOCK < slots ? s0 + BLOCK : slots;
  for (let s = s0, t = s0 % nTri; s < s1; s++, t = t + 1 === nTri ? 0 : t + 1) {
    const r = 6 * t;
    const c = 6 * s;
    const Xa = refXY[r], Ya = refXY[r + 1], Xb = refXY[r + 2], Yb = refXY[r + 3], Xc = refXY[r + 4], Yc = refXY[r + 5];
    const uxa = curXY[c] - Xa, uya = curXY[c + 1] - Ya;
    const uxb = curXY[c + 2] - Xb, uyb = curXY[c + 3] - Yb;
    const uxc = curXY[c + 4] - Xc, uyc = curXY[c + 5] - Yc;
    const e1x = Xb - Xa, e1y = Yb - Ya, e2x = Xc - Xa, e2y = Yc - Ya;
    const d1x = uxb - uxa, d1y = uyb - uya, d2x = uxc - uxa, d2y = uyc - uya;
    // Shape test of the current epoch: |2·area| / longest² ≥ SHAPE_TOLERANCE (reference: refG).
    const c1x = e1x + d1x, c1y = e1y + d1y, c2x = e2x + d2x, c2y = e2y + d2y;
    const c3x = c2x - c1x, c3y = c2y - c1y;
    const detCur = c1x * c2y - c2x * c1y;
    const k1 = c1x * c1x + c1y * c1y, k2 = c2x * c2x + c2y * c2y, k3 = c3x * c3x + c3y * c3y;
    const lCur = k1 > k2 ? (k1 > k3 ? k1 : k3) : k2 > k3 ? k2 : k3;
    const q5 = 5 * t;
    const g00 = refG[q5], g01 = refG[q5 + 1], g10 = refG[q5 + 2], g11 = refG[q5 + 3];
    const h00 = d1x * g00 + d2x * g10, h01 = d1x * g01 + d2x * g11;
    const h10 = d1y * g00 + d2y * g10, h11 = d1y * g01 + d2y * g11;
    const areal = h00 + h11 + (h00 * h11 - h01 * h10);
    // NaN anywhere fails every comparison below and lands in the else branch.
    if (refG[q5 + 4] === 1 && Math.abs(detCur) >= SHAPE_TOLERANCE * lCur && areal > -1) {
      const f00 = 1 + h00, f01 = h01, f10 = h10, f11 = 1 + h11;
      const exx = h00 + 0.5 * (h00 * h00 + h10 * h10);
      const eyy = h11 + 0.5 * (h01 * h01 + h11 * h11);
      const exy = 0.5 * (h01 + h10 + h00 * h01 + h10 * h11);
      const mean = 0.5 * (exx + eyy);
      const half = 0.5 * (exx - eyy);
      const radius = Math.sqrt(half * half + exy * exy);
      const gMax = mean + radius;
      const gMin = mean - radius;
      const o = 4 * s;
      F[o] = f00;
      F[o + 1] = f01;
      F[o + 2] = f10;
      F[o + 3] = f11;
      const q = 3 * s;
      green[q] = exx;
      green[q + 1] = eyy;
      green[q + 2] = exy;
      greenMax[s] = gMax;
      greenMin[s] = gMin;
      maxShear[s] = 2 * radius;
      arealStrain[s] = areal;
      status[s] = BATCH_OK;

      if (withSigma) {
        // Unit major axis without trigonometry: (half + radius, exy) or (exy, radius − half), normalised;
        // at an exact isotropic point East (as ½·atan2(0, 0) = 0 in principal.ts).
        let nx: number, ny: number;
        if (half >= 0) {
          nx = half + radius;
          ny = exy;
        } else {
          nx = exy;
          ny = radius - half;
        }
        const nl = Math.sqrt(nx * nx + ny * ny);
        if (nl > 0) {
          nx /= nl;
          ny /= nl;
        } else {
          nx = 1;
          ny = 0;
        }
        const sr = sigmaRef as Float64Array;
        const sc = sigmaCur as Float64Array;
        // Minor axis (−ny, nx).
        const mx = -ny, my = nx;
        const fnx = f00 * nx + f01 * ny, fny = f10 * nx + f11 * ny;
        const fmx = f00 * mx + f01 * my, fmy = f10 * mx + f11 * my;
        const l1 = 1 + 2 * gMax, l2 = 1 + 2 * gMin;
        const sb1 = nx * g00 + ny * g01, sc1 = nx * g10 + ny * g11, sa1 = -(sb1 + sc1);
        const sb2 = mx * g00 + my * g01, sc2 = mx * g10 + my * g11, sa2 = -(sb2 + sc2);
        const jac = 1 + areal;
        // Areal: cof(F)·g_i for current, −J g_i for reference; g_b = (g00, g01), g_c = (g10, g11).
        const gax = -(g00 + g10), gay = -(g01 + g11);
        let v1 = 0, v2 = 0, vs = 0, va = 0;
        // vertex a, b, c: (s1, s2, gx, gy)
        for (let i = 0; i < 3; i++) {
          const s1 = i === 0 ? sa1 : i === 1 ? sb1 : sc1;
          const s2 = i === 0 ? sa2 : i === 1 ? sb2 : sc2;
          const gx = i === 0 ? gax : i === 1 ? g00 : g10;
          const gy = i === 0 ? gay : i === 1 ? g01 : g11;
          const cex = sc[c + 2 * i], cey = sc[c + 2 * i + 1];
          const rex = sr[r + 2 * i], rey = sr[r + 2 * i + 1];
          const cex2 = cex * cex, cey2 = cey * cey, rex2 = rex * rex, rey2 = rey * rey;
          // current coordinates
          const a1x = fnx * s1, a1y = fny * s1, a2x = fmx * s2, a2y = fmy * s2;
          // reference coordinates
          const b1x = -l1 * nx * s1, b1y = -l1 * ny * s1, b2x = -l2 * mx * s2, b2y = -l2 * my * s2;
          v1 += a1x * a1x * cex2 + a1y * a1y * cey2 + b1x * b1x * rex2 + b1y * b1y * rey2;
          v2 += a2x * a2x * cex2 + a2y * a2y * cey2 + b2x * b2x * rex2 + b2y * b2y * rey2;
          const dx = a1x - a2x, dy = a1y - a2y, ex = b1x - b2x, ey = b1y - b2y;
          vs += dx * dx * cex2 + dy * dy * cey2 + ex * ex * rex2 + ey * ey * rey2;
          const jx = f11 * gx - f10 * gy, jy = -f01 * gx + f00 * gy;
          va += jx * jx * cex2 + jy * jy * cey2 + jac * jac * (gx * gx * rex2 + gy * gy * rey2);
        }
        (sGMax as Float64Array)[s] = Math.sqrt(v1);
        (sGMin as Float64Array)[s] = Math.sqrt(v2);
        (sShear as Float64Array)[s] = Math.sqrt(vs);
        (sAreal as Float64Array)[s] = Math.sqrt(va);
      }
    } else {
      status[s] = Number.isFinite(e1x + e1y + e2x + e2y + d1x + d1y + d2x + d2y) ? BATCH_DEGENERATE : BATCH_NON_FINITE;
      F.fill(NaN, 4 * s, 4 * s + 4);
      green.fill(NaN, 3 * s, 3 * s + 3);
      greenMax[s] = greenMin[s] = arealStrain[s] = maxShear[s] = NaN;
      if (withSigma) (sGMax as Float64Array)[s] = (sGMin as Float64Array)[s] = (sShear as Float64Array)[s] = (sAreal as Float64Array)[s] = NaN;
    }
  }
  // Pass 2: angles. NaN in (slots not ok) gives NaN out.
  for (let s = s0; s < s1; s++) {
    const q = 3 * s;
    const o = 4 * s;
    const shear = maxShear[s];
    // Major axis at θ = ½·atan2(2Exy, Exx − Eyy) from East (principal.ts); azimuth = 90° − θ in [0, 180);
    // |(Exx − Eyy, 2Exy)| = 2·radius = maxShear.
    let az = 90 - 0.5 * atan2WithNorm(2 * green[q + 2], green[q] - green[q + 1], shear) * RAD_TO_DEG;
    if (az >= 180) az -= 180;
    azimuthMaxDeg[s] = shear >= ISOTROPY_TOLERANCE ? az : NaN;
    const ry = F[o + 2] - F[o + 1], rx = F[o] + F[o + 3];
    const rot = (rx > 0 && Math.abs(ry) < ATAN_POLY_LIMIT * rx ? atanSmall(ry / rx) : atan2Fast(ry, rx)) * RAD_TO_DEG;
    rotationDeg[s] = rot <= -180 ? rot + 360 : rot;
  }
  }
  return slots;
}
