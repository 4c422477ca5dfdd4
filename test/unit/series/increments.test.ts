import { describe, expect, it } from "vitest";
import { incrementalSeries, isSignificant, MS_PER_DAY, rateSeries } from "../../../lib/series/increments.ts";
import { displacementComponent } from "../../../lib/series/displacement.ts";

const s = {
  tMs: new Float64Array([0, 0.5 * MS_PER_DAY, 2.5 * MS_PER_DAY]),
  value: new Float64Array([0, 3e-4, 1e-4]),
  sigma: new Float64Array([3e-5, 4e-5, 12e-5]),
};

describe("incrementalSeries", () => {
  it("returns consecutive differences stamped at the later epoch with σ = √(σ₁² + σ₂²) (hand-computed)", () => {
    const inc = incrementalSeries(s);
    expect(Array.from(inc.tMs)).toEqual([0.5 * MS_PER_DAY, 2.5 * MS_PER_DAY]);
    expect(inc.value[0]).toBeCloseTo(3e-4, 15);
    expect(inc.value[1]).toBeCloseTo(-2e-4, 15);
    expect(inc.sigma[0]).toBeCloseTo(5e-5, 15); // 3-4-5
    expect(inc.sigma[1]).toBeCloseTo(Math.sqrt(16e-10 + 144e-10), 15);
  });

  it("returns an empty series for one point and leaves the input unchanged", () => {
    const one = { tMs: new Float64Array([1]), value: new Float64Array([2]), sigma: new Float64Array([3]) };
    expect(incrementalSeries(one).tMs.length).toBe(0);
    incrementalSeries(s);
    expect(Array.from(s.value)).toEqual([0, 3e-4, 1e-4]);
  });
});

describe("rateSeries", () => {
  it("divides each increment and its σ by the interval in days", () => {
    const r = rateSeries(s);
    expect(r.value[0]).toBeCloseTo(6e-4, 15); // 3e-4 over half a day
    expect(r.sigma[0]).toBeCloseTo(1e-4, 15);
    expect(r.value[1]).toBeCloseTo(-1e-4, 15); // −2e-4 over two days
    expect(r.sigma[1]).toBeCloseTo(Math.sqrt(160e-10) / 2, 15);
  });

  it("leaves out pairs of epochs at the same time instead of dividing by zero", () => {
    const r = rateSeries({ tMs: new Float64Array([0, 0, MS_PER_DAY]), value: new Float64Array([0, 1, 2]), sigma: new Float64Array([1, 1, 1]) });
    expect(r.tMs.length).toBe(1);
    expect(r.value[0]).toBe(1);
  });
});

describe("isSignificant", () => {
  it("is |v| > k·σ and false when σ is unknown", () => {
    expect(isSignificant(2, 1, 1.96)).toBe(true);
    expect(isSignificant(-1.9, 1, 1.96)).toBe(false);
    expect(isSignificant(5, NaN, 1.96)).toBe(false);
  });
});

describe("displacementComponent", () => {
  const ref = { east: 100, north: 200, height: 10, sigmaEast: 0.001, sigmaNorth: 0.001, sigmaHeight: 0.0015 };
  it("gives dE, d2D and d3D with first-order σ (3-4-5 displacement, hand-computed)", () => {
    const cur = { ...ref, east: 100.003, north: 200.004, height: 10.012 };
    const e = displacementComponent(ref, cur, "dE");
    expect(e.value).toBeCloseTo(0.003, 12);
    expect(e.sigma).toBeCloseTo(Math.SQRT2 * 0.001, 12);
    const d2 = displacementComponent(ref, cur, "d2D");
    expect(d2.value).toBeCloseTo(0.005, 12);
    // σ² = (dE² σE² + dN² σN²)/d² with σE = σN = √2 mm → σ = √2 mm.
    expect(d2.sigma).toBeCloseTo(Math.SQRT2 * 0.001, 12);
    // χ²: (9 + 16)/2 = 12.5 > 5.991.
    expect(d2.significant).toBe(true);
    const d3 = displacementComponent(ref, cur, "d3D");
    expect(d3.value).toBeCloseTo(0.013, 12);
  });
  it("gives a finite σ and no significance for zero displacement", () => {
    const z = displacementComponent(ref, ref, "d3D");
    expect(z.value).toBe(0);
    expect(Number.isFinite(z.sigma)).toBe(true);
    expect(z.significant).toBe(false);
  });
});
