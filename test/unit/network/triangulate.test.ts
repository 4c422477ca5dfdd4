import { describe, expect, it } from "vitest";
import { nameTriangle, triangulatePlan, type PlanTriangle } from "../../../lib/network/triangulate.ts";

const GRID = [
  { code: "P1", east: 0, north: 0 },
  { code: "P2", east: 10, north: 0 },
  { code: "P3", east: 20, north: 0 },
  { code: "P4", east: 0, north: 10 },
  { code: "P5", east: 10, north: 10 },
  { code: "P6", east: 20, north: 10 },
];

function ccw(t: PlanTriangle, pts: typeof GRID): boolean {
  const [a, b, c] = t.codes.map((k) => pts.find((p) => p.code === k) as (typeof GRID)[number]);
  return (b.east - a.east) * (c.north - a.north) - (b.north - a.north) * (c.east - a.east) > 0;
}

describe("triangulatePlan", () => {
  it("triangulates a 2×3 grid into 4 right triangles, each named counter-clockwise from its smallest code", () => {
    const r = triangulatePlan(GRID);
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.triangles).toHaveLength(4);
    for (const t of r.triangles) {
      expect(t.codes[0] < t.codes[1] && t.codes[0] < t.codes[2]).toBe(true);
      expect(ccw(t, GRID)).toBe(true);
      expect(t.id).toBe(t.codes.join("-"));
      expect(t.minAngleDeg).toBeCloseTo(45, 9);
    }
    expect(r.dropped).toEqual([]);
  });
  it("drops slivers below minAngleDeg (default 20°) and lists them with their reason", () => {
    const pts = [{ code: "A", east: 0, north: 0 }, { code: "B", east: 10, north: 0 }, { code: "C", east: 5, north: 1 }];
    const r = triangulatePlan(pts);
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.triangles).toEqual([]);
    expect(r.dropped).toHaveLength(1);
    expect(r.dropped[0].reason).toBe("sliver");
    const kept = triangulatePlan(pts, { minAngleDeg: 5 });
    expect(kept.status === "ok" && kept.triangles.map((t) => t.id)).toEqual(["A-B-C"]);
  });
  it("drops triangles with an edge longer than maxEdgeM", () => {
    const r = triangulatePlan(GRID, { maxEdgeM: 12 });
    if (r.status !== "ok") throw new Error(r.message);
    expect(r.triangles).toEqual([]);
    expect(r.dropped.every((d) => d.reason === "long-edge")).toBe(true);
  });
  it("gives the same triangles at 5,000,000 m grid coordinates and scaled from 1e-3 to 1e6", () => {
    // Perturbed so that no four points are co-circular (a square grid has two valid Delaunay diagonals).
    const GRID = [
      { code: "P1", east: 0, north: 0 },
      { code: "P2", east: 10.4, north: 0.3 },
      { code: "P3", east: 20, north: -1 },
      { code: "P4", east: 0.5, north: 10 },
      { code: "P5", east: 11, north: 9.2 },
      { code: "P6", east: 19, north: 11 },
    ];
    const base = triangulatePlan(GRID);
    expect(base.status === "ok" && base.triangles.length).toBe(4);
    for (const s of [1e-3, 1, 1e6]) {
      const r = triangulatePlan(GRID.map((p) => ({ ...p, east: 5_000_000 + p.east * s, north: 5_000_000 + p.north * s })));
      // At 1e-3 m spacing a 5e6 m shift leaves only ~1e-6 of relative precision: checked unshifted only.
      if (s >= 1) expect(r.status === "ok" && r.triangles.map((t) => t.id)).toEqual(base.status === "ok" && base.triangles.map((t) => t.id));
      const unshifted = triangulatePlan(GRID.map((p) => ({ ...p, east: p.east * s, north: p.north * s })));
      expect(unshifted.status === "ok" && unshifted.triangles.map((t) => t.id)).toEqual(base.status === "ok" && base.triangles.map((t) => t.id));
    }
  });
  it("returns invalid for duplicate codes and non-finite coordinates; ok and empty for fewer than 3 points or collinear points", () => {
    expect(triangulatePlan([...GRID, { code: "P1", east: 5, north: 5 }]).status).toBe("invalid");
    expect(triangulatePlan([...GRID, { code: "P9", east: NaN, north: 5 }]).status).toBe("invalid");
    expect(triangulatePlan(GRID.slice(0, 2))).toMatchObject({ status: "ok", triangles: [] });
    expect(triangulatePlan(GRID.slice(0, 3))).toMatchObject({ status: "ok", triangles: [] });
  });
  it("lists a coincident point as skipped", () => {
    const r = triangulatePlan([...GRID, { code: "Q", east: 10, north: 10 }]);
    expect(r.status === "ok" && r.skippedPoints.map((p) => p.code)).toEqual(["Q"]);
  });
});

describe("nameTriangle", () => {
  it("starts from the smallest code and goes counter-clockwise whatever the input order", () => {
    const a = { code: "B", east: 0, north: 0 };
    const b = { code: "C", east: 10, north: 0 };
    const c = { code: "A", east: 0, north: 10 };
    for (const order of [[a, b, c], [b, c, a], [c, b, a], [a, c, b]] as const) expect(nameTriangle(order)).toEqual(["A", "B", "C"]);
  });
});
