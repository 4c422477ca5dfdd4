import { describe, expect, it } from "vitest";
import { BATCH_DEGENERATE, BATCH_NON_FINITE, BATCH_OK, computeTriangleBatch, computeTriangleStrain, createTriangleBatchOut } from "../../../lib/strain/index.ts";
import type { SurveyPoint } from "../../../lib/strain/types.ts";
import { mulberry32 } from "../../../seed/random.ts";

/** Same formulas, two code paths: agreement to 1e-12 relative (1e-15 absolute near zero). */
const AGREE_REL = 1e-12;
const AGREE_ABS = 1e-15;


function close(a: number, b: number, rel = AGREE_REL, abs = AGREE_ABS): boolean {
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b)) + abs;
}

function makeData(nTri: number, nEpochs: number, seed: number) {
  const rnd = mulberry32(seed);
  const refXY = new Float64Array(6 * nTri);
  const sigmaRef = new Float64Array(6 * nTri);
  for (let t = 0; t < nTri; t++) {
    const x0 = 500000 + 1000 * rnd();
    const y0 = 5000000 + 1000 * rnd();
    const s = 5 + 50 * rnd();
    const v = [0, 0, s, 0.1 * s * (rnd() - 0.5), 0.5 * s + 0.2 * s * (rnd() - 0.5), 0.8 * s + 0.2 * s * rnd()];
    for (let k = 0; k < 6; k += 2) {
      refXY[6 * t + k] = x0 + v[k];
      refXY[6 * t + k + 1] = y0 + v[k + 1];
      sigmaRef[6 * t + k] = 0.001 + 0.001 * rnd();
      sigmaRef[6 * t + k + 1] = 0.001 + 0.001 * rnd();
    }
  }
  const curXY = new Float64Array(6 * nTri * nEpochs);
  const sigmaCur = new Float64Array(6 * nTri * nEpochs);
  for (let e = 0; e < nEpochs; e++)
    for (let t = 0; t < nTri; t++) {
      const h = [0.002 * (rnd() - 0.5), 0.002 * (rnd() - 0.5), 0.002 * (rnd() - 0.5), 0.002 * (rnd() - 0.5)];
      const s = 6 * (e * nTri + t);
      for (let k = 0; k < 6; k += 2) {
        const dx = refXY[6 * t + k] - refXY[6 * t];
        const dy = refXY[6 * t + k + 1] - refXY[6 * t + 1];
        curXY[s + k] = refXY[6 * t + k] + h[0] * dx + h[1] * dy + 0.01 * rnd();
        curXY[s + k + 1] = refXY[6 * t + k + 1] + h[2] * dx + h[3] * dy + 0.01 * rnd();
        sigmaCur[s + k] = 0.001 + 0.001 * rnd();
        sigmaCur[s + k + 1] = 0.001 + 0.001 * rnd();
      }
    }
  return { refXY, curXY, sigmaRef, sigmaCur };
}

function toPoints(xy: Float64Array, sig: Float64Array, o: number): [SurveyPoint, SurveyPoint, SurveyPoint] {
  const p = (k: number): SurveyPoint => ({ east: xy[o + k], north: xy[o + k + 1], height: 0, sigmaEast: sig[o + k], sigmaNorth: sig[o + k + 1], sigmaHeight: 0.0015 });
  return [p(0), p(2), p(4)];
}

describe("computeTriangleBatch", () => {
  it("equals computeTriangleStrain slot by slot for 50 triangles × 20 epochs at grid coordinates", () => {
    const nTri = 50;
    const nEp = 20;
    const d = makeData(nTri, nEp, 7);
    const out = createTriangleBatchOut(nTri * nEp);
    expect(computeTriangleBatch(d, out)).toBe(nTri * nEp);
    for (let s = 0; s < nTri * nEp; s++) {
      const t = s % nTri;
      const r = computeTriangleStrain(toPoints(d.refXY, d.sigmaRef, 6 * t), toPoints(d.curXY, d.sigmaCur, 6 * s));
      if (r.status !== "ok") throw new Error(r.message);
      expect(out.status[s]).toBe(BATCH_OK);
      const F = r.F.flat();
      for (let k = 0; k < 4; k++) expect(close(out.F[4 * s + k], F[k])).toBe(true);
      expect(close(out.green[3 * s], r.green[0][0])).toBe(true);
      expect(close(out.green[3 * s + 1], r.green[1][1])).toBe(true);
      expect(close(out.green[3 * s + 2], r.green[0][1])).toBe(true);
      expect(close(out.greenMax[s], r.greenMax)).toBe(true);
      expect(close(out.greenMin[s], r.greenMin)).toBe(true);
      expect(close(out.maxShear[s], r.maxShear)).toBe(true);
      expect(close(out.arealStrain[s], r.arealStrain)).toBe(true);
      expect(close(out.rotationDeg[s], r.rotationDeg, 1e-10, 1e-12)).toBe(true);
      expect(r.azimuthMaxDeg).not.toBeNull();
      expect(close(out.azimuthMaxDeg[s], r.azimuthMaxDeg as number, 1e-10, 1e-9)).toBe(true);
      expect(close((out.sigmaGreenMax as Float64Array)[s], r.sigma.greenMax, 1e-10)).toBe(true);
      expect(close((out.sigmaGreenMin as Float64Array)[s], r.sigma.greenMin, 1e-10)).toBe(true);
      expect(close((out.sigmaMaxShear as Float64Array)[s], r.sigma.maxShear, 1e-10)).toBe(true);
      expect(close((out.sigmaArealStrain as Float64Array)[s], r.sigma.arealStrain, 1e-10)).toBe(true);
    }
  });

  it("tags collinear, turned-over and non-finite slots and fills them with NaN, leaving the others intact", () => {
    const refXY = Float64Array.of(0, 0, 10, 0, 0, 10, /* collinear */ 0, 0, 5, 0, 10, 0, 0, 0, 10, 0, 0, 10, 0, 0, 10, 0, 0, 10);
    const curXY = Float64Array.of(0, 0, 10, 0, 0, 10, 0, 0, 5, 0, 10, 0, /* mirrored */ 0, 0, -10, 0, 0, 10, /* NaN */ 0, 0, 10, NaN, 0, 10);
    const out = createTriangleBatchOut(4, false);
    computeTriangleBatch({ refXY, curXY }, out);
    expect(Array.from(out.status)).toEqual([BATCH_OK, BATCH_DEGENERATE, BATCH_DEGENERATE, BATCH_NON_FINITE]);
    expect(out.greenMax[0]).toBe(0);
    expect(Number.isNaN(out.azimuthMaxDeg[0])).toBe(true); // isotropic: no axis
    for (const s of [1, 2, 3]) expect(Number.isNaN(out.greenMax[s]) && Number.isNaN(out.F[4 * s])).toBe(true);
    expect(out.sigmaGreenMax).toBeNull();
  });

  it("throws RangeError for arrays that do not match", () => {
    const out = createTriangleBatchOut(2);
    expect(() => computeTriangleBatch({ refXY: new Float64Array(6), curXY: new Float64Array(7) }, out)).toThrow(RangeError);
    expect(() => computeTriangleBatch({ refXY: new Float64Array(6), curXY: new Float64Array(12) }, out)).toThrow(RangeError); // σ required
  });
});
