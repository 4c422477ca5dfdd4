import { describe, expect, it } from "vitest";
import { computeGroupStrain, computeTriangleStrain, type GroupPlanStrainOk } from "../../../lib/strain/index.ts";
import { mapPlan, pt, relClose, type Tri } from "./helpers.ts";

function planOk(r: ReturnType<typeof computeGroupStrain>): GroupPlanStrainOk {
  if (r.status !== "ok" || "volumetricStrain" in r) throw new Error(JSON.stringify(r));
  return r;
}

describe("computeGroupStrain (plan)", () => {
  const F = [[1.004, 0.0013], [-0.0021, 0.997]];
  it("with exactly three points equals computeTriangleStrain, σ included", () => {
    const ref: Tri = [pt(500000, 5000000), pt(500012, 5000001.5), pt(500004, 5000011)];
    const cur = ref.map((p, i) => ({ ...mapPlan(p, F, [0.01, -0.02]), sigmaEast: 0.001 * (i + 1) })) as Tri;
    const t = computeTriangleStrain(ref, cur);
    const g = planOk(computeGroupStrain(ref.map((p, i) => ({ code: `P${i}`, ref: p, cur: cur[i] }))));
    if (t.status !== "ok") throw new Error(t.message);
    for (const key of ["greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg", "almansiMax", "smallMax", "stretchMin"] as const) expect(relClose(g[key], t[key], 1e-9, 1e-15)).toBe(true);
    for (const key of ["greenMax", "greenMin", "maxShear", "arealStrain"] as const) expect(relClose(g.sigma[key], t.sigma[key], 1e-9)).toBe(true);
    expect(relClose(g.azimuthMaxDeg as number, t.azimuthMaxDeg as number, 1e-9)).toBe(true);
    expect(g.redundancy).toBe(0);
    expect(g.residualRmsM).toBeLessThan(1e-9);
  });
  it("recovers an exact affine F from six points with zero residual and redundancy 6", () => {
    const ref = [pt(0, 0), pt(20, 1), pt(21, 19), pt(-1, 20), pt(10, 9), pt(5, -8)];
    const g = planOk(computeGroupStrain(ref.map((p, i) => ({ code: `P${i}`, ref: p, cur: mapPlan(p, F, [3, 4]) }))));
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expect(Math.abs(g.F[i][j] - F[i][j])).toBeLessThan(1e-12);
    expect(g.redundancy).toBe(6);
    expect(g.residualRmsM).toBeLessThan(1e-12);
  });
  it("reports residual RMS √(Σ|r|²/N) for a misfit point (derived: one point off by d among 4 symmetric points)", () => {
    // Square corners, one corner moved by d north; the LS affine fit spreads the misfit: r_i = ±d/4 on each corner.
    const ref = [pt(0, 0), pt(10, 0), pt(10, 10), pt(0, 10)];
    const d = 0.004;
    const cur = ref.map((p, i) => (i === 2 ? { ...p, north: p.north + d } : p));
    const g = planOk(computeGroupStrain(ref.map((p, i) => ({ code: `P${i}`, ref: p, cur: cur[i] }))));
    expect(relClose(g.residualRmsM, d / 4, 1e-9)).toBe(true);
    expect(g.redundancy).toBe(2);
  });
  it("down-weights a point with large σ", () => {
    const ref = [pt(0, 0), pt(10, 0), pt(10, 10), pt(0, 10)];
    const cur = ref.map((p, i) => (i === 2 ? { ...p, north: p.north + 0.004, sigmaEast: 1, sigmaNorth: 1 } : p));
    const g = planOk(computeGroupStrain(ref.map((p, i) => ({ code: `P${i}`, ref: p, cur: cur[i] }))));
    expect(Math.abs(g.greenMax)).toBeLessThan(1e-5);
  });
  it("leaves out points absent from an epoch and lists the rest in pointsUsed; fewer than three is missing-point", () => {
    const ref = [pt(0, 0), pt(10, 0), pt(10, 10), pt(0, 10)];
    const g = planOk(computeGroupStrain([...ref.map((p, i) => ({ code: `P${i}`, ref: p, cur: p })), { code: "P9", ref: pt(5, 5), cur: undefined }]));
    expect(g.pointsUsed).toEqual(["P0", "P1", "P2", "P3"]);
    const m = computeGroupStrain([{ code: "A", ref: pt(0, 0), cur: pt(0, 0) }, { code: "B", ref: pt(1, 0), cur: undefined }, { code: "C", ref: undefined, cur: pt(0, 1) }, { code: "D", ref: pt(1, 1), cur: pt(1, 1) }]);
    expect(m.status).toBe("missing-point");
  });
  it("returns degenerate for collinear points and for a repeated point code", () => {
    const line = [pt(0, 0), pt(1, 1), pt(2, 2), pt(3, 3)].map((p, i) => ({ code: `P${i}`, ref: p, cur: p }));
    expect(computeGroupStrain(line).status).toBe("degenerate");
    const dup = [pt(0, 0), pt(1, 0), pt(0, 1)].map((p) => ({ code: "P", ref: p, cur: p }));
    expect(computeGroupStrain(dup).status).toBe("degenerate");
  });
});

describe("computeGroupStrain (volume)", () => {
  it("gives volumetricStrain = det F − 1 for a uniform stretch (derived analytically) and redundancy 3N − 12", () => {
    const c = [[0, 0, 0], [10, 0, 0], [0, 10, 0], [0, 0, 10], [10, 10, 10]];
    const r = computeGroupStrain(c.map((v, i) => ({ code: `P${i}`, ref: pt(v[0], v[1], v[2]), cur: pt(1.001 * v[0], 1.001 * v[1], 1.001 * v[2]) })), { mode: "volume" });
    if (r.status !== "ok" || !("volumetricStrain" in r)) throw new Error(JSON.stringify(r));
    expect(Math.abs(r.volumetricStrain - (1.001 ** 3 - 1))).toBeLessThan(1e-12);
    expect(Math.abs(r.greenMax - 0.5 * (1.001 ** 2 - 1))).toBeLessThan(1e-12);
    expect(r.redundancy).toBe(3);
    expect(r.rotationAxis).toBeNull();
  });
  it("returns degenerate for coplanar points and missing-point below four", () => {
    const flat = [[0, 0, 0], [10, 0, 0], [0, 10, 0], [10, 10, 0]].map((v, i) => ({ code: `P${i}`, ref: pt(v[0], v[1], v[2]), cur: pt(v[0], v[1], v[2]) }));
    expect(computeGroupStrain(flat, { mode: "volume" }).status).toBe("degenerate");
    expect(computeGroupStrain(flat.slice(0, 3), { mode: "volume" }).status).toBe("missing-point");
  });
});
