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
import { atan2Fast, atanTiny, atanUnit } from "./atan2.ts";

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
const KERNEL_CONSTANTS = Float64Array.of(SHAPE_TOLERANCE, ISOTROPY_TOLERANCE, RAD_TO_DEG);
/** Slots per block of the two-pass loop (see computeTriangleBatch); a block's outputs stay in L1/L2. */
const BLOCK = 256;
/** Per-triangle reference record: Xa, Ya, Xb, Yb, Xc, Yc, G00, G01, G10, G11 (G = NaN: shape fails). */
const REF = 10;

/**
 * Fill `out` for every slot of `input` (layout in the module comment). Returns the number of slots.
 * Throws RangeError for mismatched array lengths (a programmer error).
 *
 * Angles (same conventions as principal.ts and polar.ts, with atan2.ts in place of Math.atan2):
 * - Azimuth of the major axis. With half = (Exx − Eyy)/2 and radius = √(half² + Exy²), the major axis is
 *   (half + radius, Exy) when half ≥ 0 and (Exy, radius − half) when half < 0 (the eigenvector of E,
 *   without cancellation). Both give one bounded argument t = Exy / (radius + |half|) ∈ [−1, 1] and
 *   φ = atan t ∈ [−45°, 45°]: the axis is at θ = φ from East when half ≥ 0 and θ = 90° − φ when
 *   half < 0, so the azimuth 90° − θ is 90° − φ or φ, wrapped into [0°, 180°). This is the same axis as
 *   θ = ½·atan2(2Exy, Exx − Eyy) with one division and no halving; the choice is made by arithmetic on
 *   the comparison (0 or 1), not by a branch, since its outcome is random on real data.
 * - Polar rotation atan2(F10 − F01, F00 + F11): atanTiny when |ratio| ≤ 1/32 (survey data: the branch is
 *   predictable), atanUnit when ≤ 1, atan2Fast otherwise.
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
  const withSigma = out.sigmaGreenMax !== null && out.sigmaGreenMin !== null && out.sigmaMaxShear !== null && out.sigmaArealStrain !== null;
  if (withSigma && (!sigmaRef || !sigmaCur || sigmaRef.length !== refXY.length || sigmaCur.length !== curXY.length)) {
    throw new RangeError("computeTriangleBatch: sigmaRef and sigmaCur must match refXY and curXY");
  }
  // Module constants read once into locals: the optimising JIT would otherwise reload (and type-check)
  // them from the module context in every iteration of the loops below. Read from a Float64Array, the
  // tolerances stay raw doubles in registers.
  const shapeTol = KERNEL_CONSTANTS[0], isoTol = KERNEL_CONSTANTS[1], toDeg = KERNEL_CONSTANTS[2];
  const OK = BATCH_OK, DEGENERATE = BATCH_DEGENERATE, NON_FINITE = BATCH_NON_FINITE;

  // Reference-epoch quantities once per triangle (one allocation per call, none in the slot loops):
  // the vertices and G = D_X⁻¹ row-major, one record per triangle, so that the slot loop reads one
  // array for them.
  const ref = new Float64Array(REF * nTri);
  for (let t = 0; t < nTri; t++) {
    const r = 6 * t;
    const e1x = refXY[r + 2] - refXY[r], e1y = refXY[r + 3] - refXY[r + 1];
    const e2x = refXY[r + 4] - refXY[r], e2y = refXY[r + 5] - refXY[r + 1];
    const e3x = e2x - e1x, e3y = e2y - e1y;
    const det = e1x * e2y - e2x * e1y;
    const l1 = e1x * e1x + e1y * e1y, l2 = e2x * e2x + e2y * e2y, l3 = e3x * e3x + e3y * e3y;
    const lRef = l1 > l2 ? (l1 > l3 ? l1 : l3) : l2 > l3 ? l2 : l3;
    const inv = 1 / det;
    const o = REF * t;
    for (let k = 0; k < 6; k++) ref[o + k] = refXY[r + k];
    // A reference shape that fails the test gets G = NaN: every slot of the triangle then fails the
    // tests of pass 1 and is degenerate (or non-finite), without a flag to read per slot.
    if (Math.abs(det) >= shapeTol * lRef) {
      ref[o + 6] = e2y * inv;
      ref[o + 7] = -e2x * inv;
      ref[o + 8] = -e1y * inv;
      ref[o + 9] = e1x * inv;
    } else {
      ref[o + 6] = NaN;
      ref[o + 7] = NaN;
      ref[o + 8] = NaN;
      ref[o + 9] = NaN;
    }
  }

  // Blocks of BLOCK slots. Pass 1 computes everything but the azimuth, and leaves the azimuth's
  // argument t in azimuthMaxDeg; pass 2 turns t into the azimuth. The short pass-2 loop lets the CPU
  // overlap the division → rational → division chains of neighbouring slots, while the block stays in
  // cache. With σ, pass 3 adds the precision from what passes 1 and 2 stored (same values, so the
  // same results), which keeps pass 1 short when σ is not asked for.
  // Index sums are written `(i + k) | 0` (int32 arithmetic without an overflow check; indices are
  // far below 2³¹ since typed arrays are).
  for (let s0 = 0; s0 < slots; s0 += BLOCK) {
    const s1 = s0 + BLOCK < slots ? s0 + BLOCK : slots;
    for (let s = s0, t = s0 % nTri; s < s1; s++, t = t + 1 === nTri ? 0 : t + 1) {
      const r = REF * t;
      const c = 6 * s;
      const Xa = ref[r], Ya = ref[(r + 1) | 0], Xb = ref[(r + 2) | 0], Yb = ref[(r + 3) | 0], Xc = ref[(r + 4) | 0], Yc = ref[(r + 5) | 0];
      const uxa = curXY[c] - Xa, uya = curXY[(c + 1) | 0] - Ya;
      const uxb = curXY[(c + 2) | 0] - Xb, uyb = curXY[(c + 3) | 0] - Yb;
      const uxc = curXY[(c + 4) | 0] - Xc, uyc = curXY[(c + 5) | 0] - Yc;
      const e1x = Xb - Xa, e1y = Yb - Ya, e2x = Xc - Xa, e2y = Yc - Ya;
      const d1x = uxb - uxa, d1y = uyb - uya, d2x = uxc - uxa, d2y = uyc - uya;
      // Shape test of the current epoch: |2·area| / longest² ≥ SHAPE_TOLERANCE (reference: G is NaN).
      const c1x = e1x + d1x, c1y = e1y + d1y, c2x = e2x + d2x, c2y = e2y + d2y;
      const c3x = c2x - c1x, c3y = c2y - c1y;
      const detCur = c1x * c2y - c2x * c1y;
      const k1 = c1x * c1x + c1y * c1y, k2 = c2x * c2x + c2y * c2y, k3 = c3x * c3x + c3y * c3y;
      const lCur = k1 > k2 ? (k1 > k3 ? k1 : k3) : k2 > k3 ? k2 : k3;
      const g00 = ref[(r + 6) | 0], g01 = ref[(r + 7) | 0], g10 = ref[(r + 8) | 0], g11 = ref[(r + 9) | 0];
      const h00 = d1x * g00 + d2x * g10, h01 = d1x * g01 + d2x * g11;
      const h10 = d1y * g00 + d2y * g10, h11 = d1y * g01 + d2y * g11;
      const areal = h00 + h11 + (h00 * h11 - h01 * h10);
      const o = 4 * s;
      const q = 3 * s;
      // NaN anywhere fails every comparison below and lands in the else branch.
      if (Math.abs(detCur) >= shapeTol * lCur && areal > -1) {
        const f00 = 1 + h00, f01 = h01, f10 = h10, f11 = 1 + h11;
        const exx = h00 + 0.5 * (h00 * h00 + h10 * h10);
        const eyy = h11 + 0.5 * (h01 * h01 + h11 * h11);
        const exy = 0.5 * (h01 + h10 + h00 * h01 + h10 * h11);
        const mean = 0.5 * (exx + eyy);
        const half = 0.5 * (exx - eyy);
        const radius = Math.sqrt(half * half + exy * exy);
        F[o] = f00;
        F[(o + 1) | 0] = f01;
        F[(o + 2) | 0] = f10;
        F[(o + 3) | 0] = f11;
        green[q] = exx;
        green[(q + 1) | 0] = eyy;
        green[(q + 2) | 0] = exy;
        greenMax[s] = mean + radius;
        greenMin[s] = mean - radius;
        maxShear[s] = 2 * radius;
        arealStrain[s] = areal;
        status[s] = OK;
        // Azimuth argument (function comment); NaN where isotropic, as the per-element API says null.
        if (2 * radius >= isoTol) azimuthMaxDeg[s] = exy / (radius + Math.abs(half));
        else azimuthMaxDeg[s] = NaN;
        const ry = f10 - f01, rx = f00 + f11;
        const ary = Math.abs(ry);
        if (rx > 0 && 32 * ary <= rx) {
          rotationDeg[s] = atanTiny(ry / rx) * toDeg;
        } else if (rx > 0 && ary <= rx) {
          rotationDeg[s] = atanUnit(ry / rx) * toDeg;
        } else {
          const rot = atan2Fast(ry, rx) * toDeg;
          rotationDeg[s] = rot <= -180 ? rot + 360 : rot;
        }
      } else {
        status[s] = Number.isFinite(e1x + e1y + e2x + e2y + d1x + d1y + d2x + d2y) ? DEGENERATE : NON_FINITE;
        F[o] = NaN;
        F[(o + 1) | 0] = NaN;
        F[(o + 2) | 0] = NaN;
        F[(o + 3) | 0] = NaN;
        green[q] = NaN;
        green[(q + 1) | 0] = NaN;
        green[(q + 2) | 0] = NaN;
        greenMax[s] = NaN;
        greenMin[s] = NaN;
        maxShear[s] = NaN;
        arealStrain[s] = NaN;
        azimuthMaxDeg[s] = NaN;
        rotationDeg[s] = NaN;
      }
    }
    // Pass 2: azimuth from its argument t (function comment); NaN stays NaN. half ≥ 0 ⇔ Exx ≥ Eyy.
    for (let s = s0; s < s1; s++) {
      const q = 3 * s;
      const phi = atanUnit(azimuthMaxDeg[s]) * toDeg;
      let az = phi + Number(green[q] >= green[(q + 1) | 0]) * (90 - 2 * phi);
      az += 180 * Number(az < 0);
      az -= 180 * Number(az >= 180);
      azimuthMaxDeg[s] = az;
    }
    if (withSigma) sigmaPass(s0, s1, nTri, ref, out, sigmaRef as Float64Array, sigmaCur as Float64Array);
  }
  return slots;
}

/**
 * Pass 3 of computeTriangleBatch: first-order σ of greenMax, greenMin, maxShear and the areal strain for
 * slots s0..s1 (formulas in the module comment), from F, E, the principal values and the areal strain
 * that passes 1 and 2 stored, and G from the reference records.
 */
function sigmaPass(s0: number, s1: number, nTri: number, ref: Float64Array, out: TriangleBatchOut, sr: Float64Array, sc: Float64Array): void {
  const { status, F, green, greenMax, greenMin, arealStrain, maxShear } = out;
  const sGMax = out.sigmaGreenMax as Float64Array;
  const sGMin = out.sigmaGreenMin as Float64Array;
  const sShear = out.sigmaMaxShear as Float64Array;
  const sAreal = out.sigmaArealStrain as Float64Array;
  const OK = BATCH_OK;
  for (let s = s0, t = s0 % nTri; s < s1; s++, t = t + 1 === nTri ? 0 : t + 1) {
    if (status[s] !== OK) {
      sGMax[s] = NaN;
      sGMin[s] = NaN;
      sShear[s] = NaN;
      sAreal[s] = NaN;
      continue;
    }
    const r = REF * t;
    const c = 6 * s;
    const o = 4 * s;
    const q = 3 * s;
    const g00 = ref[r + 6], g01 = ref[r + 7], g10 = ref[r + 8], g11 = ref[r + 9];
    const f00 = F[o], f01 = F[o + 1], f10 = F[o + 2], f11 = F[o + 3];
    const exy = green[q + 2];
    const half = 0.5 * (green[q] - green[q + 1]);
    const radius = 0.5 * maxShear[s]; // maxShear = 2·radius exactly
    const gMax = greenMax[s], gMin = greenMin[s], areal = arealStrain[s];
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
    const rs = 6 * t;
    let v1 = 0, v2 = 0, vs = 0, va = 0;
    // vertex a, b, c: (s1, s2, gx, gy)
    for (let i = 0; i < 3; i++) {
      const s1 = i === 0 ? sa1 : i === 1 ? sb1 : sc1;
      const s2 = i === 0 ? sa2 : i === 1 ? sb2 : sc2;
      const gx = i === 0 ? gax : i === 1 ? g00 : g10;
      const gy = i === 0 ? gay : i === 1 ? g01 : g11;
      const cex = sc[c + 2 * i], cey = sc[c + 2 * i + 1];
      const rex = sr[rs + 2 * i], rey = sr[rs + 2 * i + 1];
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
    sGMax[s] = Math.sqrt(v1);
    sGMin[s] = Math.sqrt(v2);
    sShear[s] = Math.sqrt(vs);
    sAreal[s] = Math.sqrt(va);
  }
}
