import { describe, expect, it } from "vitest";
import {
  computeBaselineStrain,
  computeGroupStrain,
  computeSurfaceTriangleStrain,
  computeTriangleStrain,
  normalQuantile,
  twoSidedK,
  type SurveyPoint,
} from "../../../lib/strain/index.ts";
import { erfc } from "../../../lib/strain/normal-quantile.ts";
import { mapPlan, numericSigma, pt, relClose, type Tri } from "./helpers.ts";

/** Central differences with h = 1e-6·L agree with the analytic first-order σ to about 1e-7; allow 1e-5. */
const JACOBIAN_REL = 1e-5;

type Quantity = "greenMax" | "greenMin" | "maxShear" | "arealStrain";
const QUANTITIES: Quantity[] = ["greenMax", "greenMin", "maxShear", "arealStrain"];

function withSigmas(ps: SurveyPoint[], seed: number): SurveyPoint[] {
  // Distinct σ per coordinate so a swapped index would show.
  return ps.map((p, i) => ({ ...p, sigmaEast: 0.001 * (1 + 0.1 * ((i + seed) % 3)), sigmaNorth: 0.0012 * (1 + 0.2 * ((i + 2 * seed) % 3)), sigmaHeight: 0.0018 * (1 + 0.15 * i) }));
}

describe("computeTriangleStrain σ", () => {
  it("matches a numeric Jacobian (central differences) for greenMax, greenMin, maxShear, arealStrain", () => {
    const ref = withSigmas([pt(1000.0, 2000.0), pt(1012.0, 2001.5), pt(1004.0, 2011.0)], 1) as Tri;
    const cur = withSigmas(ref.map((p) => mapPlan(p, [[1.004, 0.0013], [-0.0021, 0.997]], [0.01, -0.02])), 2) as Tri;
    const r = computeTriangleStrain(ref, cur);
    if (r.status !== "ok") throw new Error(r.message);
    for (const q of QUANTITIES) {
      const num = numericSigma(ref, cur, (a, b) => {
        const x = computeTriangleStrain(a as Tri, b as Tri);
        return x.status === "ok" ? x[q] : NaN;
      }, 1e-5);
      expect(relClose(r.sigma[q], num, JACOBIAN_REL)).toBe(true);
    }
  });

  it("gives σ(εxx) ≈ 2σ/L for an equilateral triangle: 1 mm at 10 m is 200 µε (derived, domain.md §4)", () => {
    for (const L of [10, 50]) {
      const ref: Tri = [pt(0, 0), pt(L, 0), pt(L / 2, (L * Math.sqrt(3)) / 2)];
      // A tiny East extension fixes the major axis on East, so σ(greenMax) is σ(εxx).
      const cur = ref.map((p) => mapPlan(p, [[1 + 1e-7, 0], [0, 1]])) as Tri;
      const r = computeTriangleStrain(ref, cur);
      if (r.status !== "ok") throw new Error(r.message);
      expect(relClose(r.sigma.greenMax, (2 * 0.001) / L, 1e-5)).toBe(true);
    }
  });

  it("flags significance at |f| > k·σ with k from --confidence (default 95 %)", () => {
    const ref: Tri = [pt(0, 0), pt(10, 0), pt(5, 8.66)];
    const cur = ref.map((p) => mapPlan(p, [[1.0005, 0], [0, 1]])) as Tri; // 500 µε, σ ≈ 200 µε
    const r95 = computeTriangleStrain(ref, cur);
    const r999 = computeTriangleStrain(ref, cur, { confidence: 0.999 });
    if (r95.status !== "ok" || r999.status !== "ok") throw new Error("not ok");
    expect(r95.significant.greenMax).toBe(r95.greenMax > 1.959963984540054 * r95.sigma.greenMax);
    expect(r95.significant.greenMax).toBe(true); // 500 > 1.96·200
    expect(r999.significant.greenMax).toBe(false); // 500 < 3.29·200
  });
});

describe("computeSurfaceTriangleStrain σ", () => {
  it("matches a numeric Jacobian over all 18 coordinates", () => {
    const ref = withSigmas([pt(0, 0, 0), pt(10, 1, 0.5), pt(2, 1.5, 9)], 0) as Tri;
    const cur = withSigmas(ref.map((p) => ({ ...p, east: p.east * 1.002 + 0.001 * p.height, north: p.north + 0.0005 * p.height, height: p.height * 0.999 + 0.01 })), 1) as Tri;
    const r = computeSurfaceTriangleStrain(ref, cur);
    if (r.status !== "ok") throw new Error(r.message);
    for (const q of QUANTITIES) {
      const num = numericSigma(ref, cur, (a, b) => {
        const x = computeSurfaceTriangleStrain(a as Tri, b as Tri);
        return x.status === "ok" ? x[q] : NaN;
      }, 1e-5, 3);
      expect(relClose(r.sigma[q], num, JACOBIAN_REL)).toBe(true);
    }
  });
});

describe("computeBaselineStrain σ", () => {
  it("matches a numeric Jacobian in slope and horizontal modes", () => {
    const ref = withSigmas([pt(100, 200, 10), pt(130, 240, 14)], 0);
    const cur = withSigmas([pt(100.003, 199.998, 10.001), pt(130.02, 240.01, 13.99)], 1);
    for (const mode of ["slope", "horizontal"] as const) {
      const r = computeBaselineStrain([ref[0], ref[1]], [cur[0], cur[1]], mode);
      if (r.status !== "ok") throw new Error(r.message);
      const num = numericSigma(ref, cur, (a, b) => {
        const x = computeBaselineStrain([a[0], a[1]], [b[0], b[1]], mode);
        return x.status === "ok" ? x.engineering : NaN;
      }, 1e-4, 3);
      expect(relClose(r.sigma.engineering, num, JACOBIAN_REL)).toBe(true);
    }
  });
  it("gives σ = √2·√2·σ/L = 2σ/L for a baseline with equal σ in both epochs, along the line (derived)", () => {
    const r = computeBaselineStrain([pt(0, 0), pt(10, 0)], [pt(0, 0), pt(10, 0)], "horizontal");
    if (r.status !== "ok") throw new Error(r.message);
    expect(relClose(r.sigma.engineering, (2 * 0.001) / 10, 1e-12)).toBe(true);
  });
});

describe("computeGroupStrain σ", () => {
  const refPts = [pt(0, 0, 0), pt(20, 1, 3), pt(21, 19, 1), pt(-1, 20, 8), pt(10, 9, 15), pt(5, -8, 4)];
  const noise = [0.002, -0.001, 0.0015, -0.0025, 0.001, 0.0005];
  it("matches a numeric Jacobian for a plan group with residuals", () => {
    const ref = withSigmas(refPts, 0);
    const cur = withSigmas(ref.map((p, i) => ({ ...mapPlan(p, [[1.003, 0.002], [-0.001, 0.998]]), north: mapPlan(p, [[1.003, 0.002], [-0.001, 0.998]]).north + noise[i] })), 1);
    const group = (a: SurveyPoint[], b: SurveyPoint[]) => computeGroupStrain(a.map((p, i) => ({ code: `P${i}`, ref: p, cur: b[i] })));
    const r = group(ref, cur);
    if (r.status !== "ok" || "volumetricStrain" in r) throw new Error("not a plan ok");
    expect(r.residualRmsM).toBeGreaterThan(0);
    for (const q of QUANTITIES) {
      const num = numericSigma(ref, cur, (a, b) => {
        const x = group(a, b);
        return x.status === "ok" && !("volumetricStrain" in x) ? x[q] : NaN;
      }, 1e-5);
      expect(relClose(r.sigma[q], num, JACOBIAN_REL)).toBe(true);
    }
  });
  it("matches a numeric Jacobian for a volume group with residuals", () => {
    const ref = withSigmas(refPts, 0);
    const cur = withSigmas(ref.map((p, i) => ({ ...p, east: p.east * 1.002 + 0.001 * p.height, north: p.north - 0.0005 * p.east, height: p.height * 0.997 + noise[i] })), 2);
    const group = (a: SurveyPoint[], b: SurveyPoint[]) => computeGroupStrain(a.map((p, i) => ({ code: `P${i}`, ref: p, cur: b[i] })), { mode: "volume" });
    const r = group(ref, cur);
    if (r.status !== "ok" || !("volumetricStrain" in r)) throw new Error("not a volume ok");
    for (const q of ["greenMax", "greenMid", "greenMin", "maxShear", "volumetricStrain"] as const) {
      const num = numericSigma(ref, cur, (a, b) => {
        const x = group(a, b);
        return x.status === "ok" && "volumetricStrain" in x ? x[q] : NaN;
      }, 1e-5, 3);
      expect(relClose(r.sigma[q], num, 1e-4)).toBe(true);
    }
  });
});

describe("normalQuantile (Acklam 2003 with one Halley step)", () => {
  it("gives k = 1.959963984540054 at 95 % and 2.5758293035489 at 99 % (reference: R qnorm / scipy.stats.norm.ppf)", () => {
    expect(Math.abs(twoSidedK(0.95) - 1.959963984540054)).toBeLessThan(1e-13);
    expect(Math.abs(twoSidedK(0.99) - 2.5758293035489004)).toBeLessThan(1e-13);
    expect(Math.abs(twoSidedK(0.6826894921370859) - 1)).toBeLessThan(1e-12);
  });
  it("is accurate in the tails and symmetric (reference: scipy.stats.norm.ppf)", () => {
    expect(relClose(normalQuantile(1e-10), -6.361340902404056, 1e-12)).toBe(true);
    expect(relClose(normalQuantile(0.3), -0.5244005127080407, 1e-12)).toBe(true);
    expect(Math.abs(normalQuantile(0.5))).toBeLessThan(1e-15);
    expect(Math.abs(normalQuantile(0.975) + normalQuantile(0.025))).toBeLessThan(1e-14);
  });
  it("erfc matches reference values (scipy.special.erfc)", () => {
    expect(relClose(erfc(0.5), 0.4795001221869535, 1e-14)).toBe(true);
    expect(relClose(erfc(2), 0.004677734981047266, 1e-14)).toBe(true);
    expect(relClose(erfc(-1), 1.8427007929497148, 1e-14)).toBe(true);
  });
  it("throws RangeError for p outside (0, 1)", () => {
    expect(() => normalQuantile(0)).toThrow(RangeError);
    expect(() => twoSidedK(1)).toThrow(RangeError);
  });
});
