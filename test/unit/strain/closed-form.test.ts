import { describe, expect, it } from "vitest";
import { computeBaselineStrain, computeTriangleStrain } from "../../../lib/strain/index.ts";
import { mapPlan, pt, type Tri } from "./helpers.ts";

const REF: Tri = [pt(0, 0), pt(10, 0), pt(0, 10)];
const TOL = 1e-12;

function ok<T extends { status: string }>(r: T): Extract<T, { status: "ok" }> {
  if (r.status !== "ok") throw new Error(`expected ok, got ${JSON.stringify(r)}`);
  return r as Extract<T, { status: "ok" }>;
}

describe("computeBaselineStrain on a uniaxial stretch λ = 1.1", () => {
  it("gives engineering 0.1, Green 0.105, Almansi 0.0867768595, log 0.0953101798 (derived analytically, domain.md §8)", () => {
    const r = ok(computeBaselineStrain([pt(0, 0), pt(10, 0)], [pt(0, 0), pt(11, 0)], "slope"));
    expect(r.lengthRefM).toBeCloseTo(10, 12);
    expect(r.lengthCurM).toBeCloseTo(11, 12);
    expect(Math.abs(r.engineering - 0.1)).toBeLessThan(TOL);
    expect(Math.abs(r.green - 0.105)).toBeLessThan(TOL);
    expect(Math.abs(r.almansi - 0.0867768595)).toBeLessThan(1e-10); // 0.105/1.21
    expect(Math.abs(r.log - 0.0953101798)).toBeLessThan(1e-10); // ln 1.1
  });
  it("horizontal mode ignores heights, slope mode uses the 3D distance (derived analytically)", () => {
    const h = ok(computeBaselineStrain([pt(0, 0, 0), pt(3, 0, 4)], [pt(0, 0, 0), pt(3, 0, 5)], "horizontal"));
    expect(h.engineering).toBe(0);
    const s = ok(computeBaselineStrain([pt(0, 0, 0), pt(3, 0, 4)], [pt(0, 0, 0), pt(3, 0, 5)], "slope"));
    expect(Math.abs(s.engineering - (Math.sqrt(34) - 5) / 5)).toBeLessThan(TOL);
  });
});

describe("computeTriangleStrain on simple shear F = [[1, 0.5], [0, 1]]", () => {
  const r = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[1, 0.5], [0, 1]])) as Tri));
  it("gives Green [[0, 0.25], [0.25, 0.125]] and Almansi [[0, 0.25], [0.25, −0.125]] (derived analytically, domain.md §8)", () => {
    const g = [[0, 0.25], [0.25, 0.125]];
    const a = [[0, 0.25], [0.25, -0.125]];
    for (let i = 0; i < 2; i++)
      for (let j = 0; j < 2; j++) {
        expect(Math.abs(r.green[i][j] - g[i][j])).toBeLessThan(TOL);
        expect(Math.abs(r.almansi[i][j] - a[i][j])).toBeLessThan(TOL);
        expect(Math.abs(r.F[i][j] - [[1, 0.5], [0, 1]][i][j])).toBeLessThan(TOL);
      }
  });
  it("gives stretches 1.2807764 and 0.7807764, rotation −14.036°, zero areal strain (derived analytically)", () => {
    expect(Math.abs(r.stretchMax - 1.2807764064)).toBeLessThan(1e-9); // (√17 + 1)/4
    expect(Math.abs(r.stretchMin - 0.7807764064)).toBeLessThan(1e-9); // (√17 − 1)/4
    expect(Math.abs(r.rotationDeg - (-Math.atan(0.25) * 180) / Math.PI)).toBeLessThan(1e-10); // −14.036°
    expect(r.rotationDeg).toBeCloseTo(-14.036, 3);
    expect(Math.abs(r.arealStrain)).toBeLessThan(TOL);
    expect(Math.abs(r.maxShear - (r.greenMax - r.greenMin))).toBeLessThan(TOL);
    expect(Math.abs(r.greenMax - 0.5 * (r.stretchMax ** 2 - 1))).toBeLessThan(TOL);
    expect(Math.abs(r.almansiMin - 0.5 * (1 - r.stretchMin ** -2))).toBeLessThan(TOL);
  });
});

describe("computeTriangleStrain on a rigid rotation by 30°", () => {
  const c = Math.cos(Math.PI / 6);
  const s = Math.sin(Math.PI / 6);
  const r = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[c, -s], [s, c]], [5, -3])) as Tri));
  it("gives zero Green and Almansi strain but small strain −0.1339746 on the diagonal (derived analytically, domain.md §8)", () => {
    for (let i = 0; i < 2; i++)
      for (let j = 0; j < 2; j++) {
        expect(Math.abs(r.green[i][j])).toBeLessThan(TOL);
        expect(Math.abs(r.almansi[i][j])).toBeLessThan(TOL);
      }
    expect(Math.abs(r.small[0][0] - (c - 1))).toBeLessThan(TOL); // cos 30° − 1 = −0.1339746
    expect(r.small[1][1]).toBeCloseTo(-0.1339746, 7);
    expect(Math.abs(r.small[0][1])).toBeLessThan(TOL);
  });
  it("reports rotation +30° counter-clockwise and no major-axis azimuth (isotropic)", () => {
    expect(Math.abs(r.rotationDeg - 30)).toBeLessThan(1e-10);
    expect(r.azimuthMaxDeg).toBeNull();
  });
});

describe("computeTriangleStrain conventions", () => {
  it("gives azimuth 90° for an East extension and 0° for a North extension (grid azimuth, clockwise from north)", () => {
    const e = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[1.001, 0], [0, 1]])) as Tri));
    expect(e.azimuthMaxDeg).toBeCloseTo(90, 9);
    const n = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[1, 0], [0, 1.001]])) as Tri));
    expect(n.azimuthMaxDeg).toBeCloseTo(0, 9);
  });
  it("gives azimuth 45° for extension along the NE diagonal and 135° along SE–NW (derived analytically)", () => {
    // F = I + ε·n nᵀ, n = (1, 1)/√2 → major axis NE.
    const eps = 0.002;
    const ne = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[1 + eps / 2, eps / 2], [eps / 2, 1 + eps / 2]])) as Tri));
    expect(ne.azimuthMaxDeg).toBeCloseTo(45, 9);
    const nw = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[1 + eps / 2, -eps / 2], [-eps / 2, 1 + eps / 2]])) as Tri));
    expect(nw.azimuthMaxDeg).toBeCloseTo(135, 9);
  });
  it("gives positive strain for extension and negative for contraction", () => {
    const r = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[1.002, 0], [0, 0.999]])) as Tri));
    expect(r.greenMax).toBeGreaterThan(0);
    expect(r.greenMin).toBeLessThan(0);
    expect(Math.abs(r.greenMax - (1.002 ** 2 - 1) / 2)).toBeLessThan(TOL);
    expect(Math.abs(r.greenMin - (0.999 ** 2 - 1) / 2)).toBeLessThan(TOL);
    expect(Math.abs(r.arealStrain - (1.002 * 0.999 - 1))).toBeLessThan(TOL);
  });
  it("reports rotation in (−180°, 180°]: a half turn is +180°", () => {
    const r = ok(computeTriangleStrain(REF, REF.map((p) => mapPlan(p, [[-1, 0], [0, -1]])) as Tri));
    expect(r.rotationDeg).toBe(180);
  });
});
