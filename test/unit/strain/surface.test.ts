import { describe, expect, it } from "vitest";
import { computeSurfaceTriangleStrain, computeTriangleStrain, planeBasis } from "../../../lib/strain/index.ts";
import { pt, type Tri } from "./helpers.ts";

describe("planeBasis", () => {
  it("gives u horizontal in the plane and v up the slope for a face dipping 60° (derived)", () => {
    const dip = Math.PI / 3;
    const b = planeBasis([10, 0, 0], [0, 10 * Math.cos(dip), 10 * Math.sin(dip)]);
    expect(Math.abs(b.u[2])).toBeLessThan(1e-15);
    expect(b.v[2]).toBeGreaterThan(0);
    expect(b.v[2]).toBeCloseTo(Math.sin(dip), 12);
  });
  it("uses u = East on a horizontal face", () => {
    expect(planeBasis([1, 0, 0], [0, 1, 0]).u).toEqual([1, 0, 0]);
  });
});

describe("computeSurfaceTriangleStrain", () => {
  it("on a vertical wall, a 1000 µε horizontal stretch gives greenMax ½(1.001² − 1) with dip 0° (derived analytically)", () => {
    const ref: Tri = [pt(0, 0, 0), pt(10, 0, 0), pt(0, 0, 10)];
    const cur = ref.map((p) => ({ ...p, east: p.east * 1.001 })) as Tri;
    const r = computeSurfaceTriangleStrain(ref, cur);
    if (r.status !== "ok") throw new Error(r.message);
    expect(Math.abs(r.greenMax - 0.5 * (1.001 ** 2 - 1))).toBeLessThan(1e-13);
    expect(r.dipMaxDeg).toBeCloseTo(0, 9);
    expect(r.warnings).toEqual([]);
  });
  it("on a vertical wall, a vertical stretch gives dip 90°", () => {
    const ref: Tri = [pt(0, 5, 0), pt(10, 5, 0), pt(0, 5, 10)];
    const cur = ref.map((p) => ({ ...p, height: p.height * 1.002 })) as Tri;
    const r = computeSurfaceTriangleStrain(ref, cur);
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.dipMaxDeg).toBeCloseTo(90, 9);
  });
  it("on a horizontal face equals plan mode and warns that plan mode is the better choice", () => {
    const ref: Tri = [pt(0, 0, 50), pt(12, 1, 50), pt(3, 9, 50)];
    const cur = ref.map((p) => ({ ...p, east: p.east * 1.001 + 0.0005 * p.north })) as Tri;
    const s = computeSurfaceTriangleStrain(ref, cur);
    const p = computeTriangleStrain(ref, cur);
    if (s.status !== "ok" || p.status !== "ok") throw new Error("not ok");
    for (const key of ["greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg"] as const) expect(Math.abs(s[key] - p[key])).toBeLessThan(1e-12);
    expect(s.warnings.join()).toMatch(/plan mode/);
  });
});
