import { describe, expect, it } from "vitest";
import { computeBaselineStrain, computeElementStrain, computeSurfaceTriangleStrain, computeTriangleStrain, type SurveyPoint } from "../../../lib/strain/index.ts";
import { mapPlan, pt, type Tri } from "./helpers.ts";

const GOOD: Tri = [pt(0, 0), pt(10, 0), pt(0, 10)];

describe("degenerate inputs return a tagged status, never NaN or a throw", () => {
  it("computeTriangleStrain: collinear points are degenerate", () => {
    const r = computeTriangleStrain([pt(0, 0), pt(5, 5), pt(10, 10)], [pt(0, 0), pt(5, 5), pt(10, 10)]);
    expect(r).toMatchObject({ status: "degenerate" });
    expect(r.status !== "ok" && r.message).toMatch(/collinear/);
  });
  it("computeTriangleStrain: coincident points are degenerate", () => {
    expect(computeTriangleStrain([pt(1, 1), pt(1, 1), pt(0, 10)], GOOD).status).toBe("degenerate");
  });
  it("computeTriangleStrain: a triangle that turned over (det F ≤ 0) is degenerate", () => {
    const r = computeTriangleStrain(GOOD, GOOD.map((p) => mapPlan(p, [[-1, 0], [0, 1]])) as Tri);
    expect(r.status).toBe("degenerate");
    expect(r.status !== "ok" && r.message).toMatch(/turned over/);
  });
  it("computeTriangleStrain: a current epoch collapsed to a line is degenerate", () => {
    expect(computeTriangleStrain(GOOD, [pt(0, 0), pt(10, 0), pt(20, 0)]).status).toBe("degenerate");
  });
  it("computeTriangleStrain: NaN, Infinity and negative σ are degenerate with the field named", () => {
    const r = computeTriangleStrain([pt(0, 0), { ...pt(10, 0), north: NaN }, pt(0, 10)], GOOD);
    expect(r.status).toBe("degenerate");
    expect(r.status !== "ok" && r.message).toMatch(/north/);
    expect(computeTriangleStrain(GOOD, [pt(0, 0), pt(Infinity, 0), pt(0, 10)]).status).toBe("degenerate");
    expect(computeTriangleStrain(GOOD, [pt(0, 0), { ...pt(10, 0), sigmaEast: -1 }, pt(0, 10)]).status).toBe("degenerate");
  });
  it("computeTriangleStrain: a hand-made sliver computes with a warning and its quality figure", () => {
    const r = computeTriangleStrain([pt(0, 0), pt(10, 0), pt(5, 0.5)], [pt(0, 0), pt(10, 0), pt(5, 0.5)]);
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.minAngleDeg).toBeCloseTo((Math.atan(0.1) * 180) / Math.PI, 9);
    expect(r.warnings.join()).toMatch(/below 20°/);
  });
  it("computeSurfaceTriangleStrain: collinear 3D points are degenerate", () => {
    expect(computeSurfaceTriangleStrain([pt(0, 0, 0), pt(1, 1, 1), pt(2, 2, 2)], [pt(0, 0, 0), pt(1, 1, 1), pt(2, 2, 2)]).status).toBe("degenerate");
  });
  it("computeBaselineStrain: coincident points are degenerate in either epoch", () => {
    expect(computeBaselineStrain([pt(1, 1), pt(1, 1)], [pt(0, 0), pt(1, 0)], "slope").status).toBe("degenerate");
    expect(computeBaselineStrain([pt(0, 0), pt(1, 0)], [pt(3, 3), pt(3, 3)], "slope").status).toBe("degenerate");
    expect(computeBaselineStrain([pt(0, 0, 0), pt(0, 0, 5)], [pt(0, 0, 0), pt(0, 0, 6)], "horizontal").status).toBe("degenerate");
  });
  it("no quantity of an ok result is NaN", () => {
    const r = computeTriangleStrain(GOOD, GOOD);
    const walk = (v: unknown): void => {
      if (typeof v === "number") expect(Number.isFinite(v)).toBe(true);
      else if (v && typeof v === "object") Object.values(v).forEach(walk);
    };
    walk(r);
  });
});

describe("computeElementStrain", () => {
  const ref = new Map<string, SurveyPoint>([["A", pt(0, 0)], ["B", pt(10, 0)], ["C", pt(0, 10)], ["D", pt(10, 10)]]);
  const cur = new Map<string, SurveyPoint>([["A", pt(0, 0)], ["B", pt(10.01, 0)], ["C", pt(0, 10)]]);
  it("returns missing-point naming the point and the epoch, with no quantities", () => {
    const r = computeElementStrain({ id: "T", kind: "triangle", points: ["A", "B", "D"] }, ref, cur);
    expect(r).toEqual({ id: "T", kind: "triangle", mode: "plan", points: ["A", "B", "D"], status: "missing-point", message: "point D is missing from the current epoch" });
  });
  it("returns degenerate for a repeated point and a wrong point count", () => {
    expect(computeElementStrain({ id: "T", kind: "triangle", points: ["A", "A", "B"] }, ref, cur).status).toBe("degenerate");
    expect(computeElementStrain({ id: "B", kind: "baseline", points: ["A", "B", "C"] }, ref, cur).status).toBe("degenerate");
  });
  it("returns the domain.md §7 fields for a plan triangle and a slope baseline (default modes)", () => {
    const t = computeElementStrain({ id: "T", kind: "triangle", points: ["A", "B", "C"] }, ref, cur);
    expect(t).toMatchObject({ id: "T", kind: "triangle", mode: "plan", points: ["A", "B", "C"], status: "ok" });
    for (const key of ["F", "green", "almansi", "small", "greenMax", "greenMin", "almansiMax", "almansiMin", "smallMax", "smallMin", "stretchMax", "stretchMin", "maxShear", "arealStrain", "rotationDeg", "azimuthMaxDeg", "sigma", "significant"]) expect(t).toHaveProperty(key);
    expect(Object.keys((t as { sigma: object }).sigma).sort()).toEqual(["arealStrain", "greenMax", "greenMin", "maxShear"]);
    const b = computeElementStrain({ id: "B", kind: "baseline", points: ["A", "B"] }, ref, cur);
    expect(b).toMatchObject({ mode: "slope", status: "ok", lengthRefM: 10, engineering: expect.any(Number), sigma: { engineering: expect.any(Number) }, significant: { engineering: true } });
    for (const key of ["lengthCurM", "green", "almansi", "log"]) expect(b).toHaveProperty(key);
  });
});
