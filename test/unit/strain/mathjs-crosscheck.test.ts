/** Cross-checks against mathjs, a general-purpose reference library (eigs, sqrtm, inv). */
import { describe, expect, it } from "vitest";
import { eigs, inv, multiply, sqrtm, transpose } from "mathjs";
import { computeGroupStrain, computeTriangleStrain } from "../../../lib/strain/index.ts";
import { polarDecompose2 } from "../../../lib/strain/polar.ts";
import { mapPlan, pt, type Tri } from "./helpers.ts";

const REF: Tri = [pt(0, 0), pt(12, 1), pt(3, 9)];
const CASES: number[][][] = [
  [[1.2, 0.3], [-0.1, 0.9]],
  [[1, 0.5], [0, 1]],
  [[0.8, -0.6], [0.6, 0.8]],
  [[1.0003, 0.0002], [-0.0004, 0.9998]],
  [[2, 1], [0.5, 1.5]],
];

function sortedEigs(m: number[][]): number[] {
  const { values } = eigs(m);
  return (values as number[]).slice().sort((a, b) => b - a);
}

describe("computeTriangleStrain against mathjs", () => {
  for (const F of CASES) {
    it(`principal Green, Almansi and small strains equal mathjs eigs for F = ${JSON.stringify(F)}`, () => {
      const r = computeTriangleStrain(REF, REF.map((p) => mapPlan(p, F)) as Tri);
      if (r.status !== "ok") throw new Error(r.message);
      const [gMax, gMin] = sortedEigs(r.green);
      expect(Math.abs(r.greenMax - gMax)).toBeLessThan(1e-12);
      expect(Math.abs(r.greenMin - gMin)).toBeLessThan(1e-12);
      const [aMax, aMin] = sortedEigs(r.almansi);
      expect(Math.abs(r.almansiMax - aMax)).toBeLessThan(1e-12);
      expect(Math.abs(r.almansiMin - aMin)).toBeLessThan(1e-12);
      const [sMax, sMin] = sortedEigs(r.small);
      expect(Math.abs(r.smallMax - sMax)).toBeLessThan(1e-12);
      expect(Math.abs(r.smallMin - sMin)).toBeLessThan(1e-12);
      // Almansi tensor from its definition ½(I − b⁻¹) with mathjs inv.
      const b = multiply(F, transpose(F)) as number[][];
      const bi = inv(b) as number[][];
      for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expect(Math.abs(r.almansi[i][j] - 0.5 * ((i === j ? 1 : 0) - bi[i][j]))).toBeLessThan(1e-12);
    });
    it(`polar rotation and U equal mathjs sqrtm(FᵀF) for F = ${JSON.stringify(F)}`, () => {
      const U = sqrtm(multiply(transpose(F), F) as number[][]) as number[][];
      const R = multiply(F, inv(U)) as number[][];
      const ours = polarDecompose2([[F[0][0], F[0][1]], [F[1][0], F[1][1]]]);
      for (let i = 0; i < 2; i++)
        for (let j = 0; j < 2; j++) {
          expect(Math.abs(ours.U[i][j] - U[i][j])).toBeLessThan(1e-10);
          expect(Math.abs(ours.R[i][j] - R[i][j])).toBeLessThan(1e-10);
        }
      const angle = (Math.atan2(R[1][0], R[0][0]) * 180) / Math.PI;
      expect(Math.abs(ours.rotationDeg - angle)).toBeLessThan(1e-9);
      // R orthogonal, det +1 (identity check, tolerance 1e-12).
      const RtR = multiply(transpose(ours.R), ours.R) as number[][];
      expect(Math.abs(RtR[0][0] - 1) + Math.abs(RtR[0][1]) + Math.abs(RtR[1][1] - 1)).toBeLessThan(1e-12);
    });
  }
});

describe("computeGroupStrain (volume) against mathjs", () => {
  it("3×3 principal Green strains equal mathjs eigs, and R = F·sqrtm(FᵀF)⁻¹ gives the same rotation angle", () => {
    const F = [[1.01, 0.02, -0.01], [0.015, 0.99, 0.03], [-0.02, 0.01, 1.005]];
    const pts = [[0, 0, 0], [10, 0, 0], [0, 10, 0], [0, 0, 10], [7, 6, 5]];
    const group = pts.map((c, i) => ({
      code: `P${i}`,
      ref: pt(c[0], c[1], c[2]),
      cur: pt(F[0][0] * c[0] + F[0][1] * c[1] + F[0][2] * c[2], F[1][0] * c[0] + F[1][1] * c[1] + F[1][2] * c[2], F[2][0] * c[0] + F[2][1] * c[1] + F[2][2] * c[2]),
    }));
    const r = computeGroupStrain(group, { mode: "volume" });
    if (r.status !== "ok" || !("volumetricStrain" in r)) throw new Error("not volume ok");
    const vals = (eigs(r.green).values as number[]).slice().sort((a, b) => b - a);
    expect(Math.abs(r.greenMax - vals[0])).toBeLessThan(1e-12);
    expect(Math.abs(r.greenMid - vals[1])).toBeLessThan(1e-12);
    expect(Math.abs(r.greenMin - vals[2])).toBeLessThan(1e-12);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(Math.abs(r.F[i][j] - F[i][j])).toBeLessThan(1e-12);
    const U = sqrtm(multiply(transpose(F), F) as number[][]) as number[][];
    const R = multiply(F, inv(U)) as number[][];
    const angle = (Math.acos((R[0][0] + R[1][1] + R[2][2] - 1) / 2) * 180) / Math.PI;
    expect(Math.abs(r.rotationDeg - angle)).toBeLessThan(1e-8);
    expect(r.redundancy).toBe(3);
    expect(r.residualRmsM).toBeLessThan(1e-12);
  });
});
