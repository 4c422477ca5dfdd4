import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { fitLinearTrend, levelCrossingTimes, type LinearTrendOk } from "../../../lib/series/trend.ts";
import { MS_PER_DAY } from "../../../lib/series/increments.ts";

function ok(t: ReturnType<typeof fitLinearTrend>): LinearTrendOk {
  if (t.status !== "ok") throw new Error(`expected ok, got ${t.status}`);
  return t;
}

describe("fitLinearTrend", () => {
  it("returns the exact slope and intercept of an exact linear series (property)", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -1e-2, max: 1e-2, noNaN: true }),
        fc.double({ min: -1, max: 1, noNaN: true }),
        fc.integer({ min: 3, max: 60 }),
        fc.double({ min: 0.01, max: 30, noNaN: true }),
        fc.integer({ min: 1_500_000_000_000, max: 1_900_000_000_000 }),
        (slope, intercept, n, stepDays, t0) => {
          const tMs = new Float64Array(n);
          const y = new Float64Array(n);
          for (let i = 0; i < n; i++) {
            tMs[i] = t0 + i * stepDays * MS_PER_DAY;
            y[i] = intercept + slope * i * stepDays;
          }
          const r = ok(fitLinearTrend(tMs, y));
          const scale = Math.abs(intercept) + Math.abs(slope) * n * stepDays + 1e-12;
          expect(Math.abs(r.slopePerDay - slope)).toBeLessThanOrEqual(1e-9 * scale / (n * stepDays) + 1e-15);
          expect(Math.abs(r.intercept - intercept)).toBeLessThanOrEqual(1e-9 * scale);
          expect(r.residualSigma).toBeLessThanOrEqual(1e-9 * scale);
        },
      ),
      { numRuns: 200 },
    );
  });

  it("matches the oxygen-purity worked example of Montgomery & Runger (Examples 11-1, 11-2; data and figures from memory)", () => {
    // Hydrocarbon level x (%) and oxygen purity y (%), n = 20. Published (rounded): β̂1 = 14.947,
    // β̂0 = 74.283, σ̂² = 1.18, se(β̂1) = 1.317 (t0 = 11.35), se(β̂0) = 1.593, R² = 0.877.
    // The data reproduce the book's intermediate sums Sxx = 0.68088 and Sxy = 10.17744.
    const x = [0.99, 1.02, 1.15, 1.29, 1.46, 1.36, 0.87, 1.23, 1.55, 1.4, 1.19, 1.15, 0.98, 1.01, 1.11, 1.2, 1.26, 1.32, 1.43, 0.95];
    const y = [90.01, 89.05, 91.43, 93.74, 96.73, 94.45, 87.59, 91.77, 99.42, 93.65, 93.54, 92.52, 90.56, 89.54, 89.85, 90.39, 93.25, 93.41, 94.98, 87.33];
    // The regression does not need sorted times; the x's are taken as days from origin 0.
    const r = ok(fitLinearTrend(Float64Array.from(x, (d) => d * MS_PER_DAY), Float64Array.from(y), 0));
    expect(r.slopePerDay).toBeCloseTo(14.947, 3);
    expect(r.intercept).toBeCloseTo(74.283, 3);
    expect(r.residualSigma ** 2).toBeCloseTo(1.18, 2);
    expect(r.sigmaSlopePerDay).toBeCloseTo(1.317, 3);
    expect(r.sigmaIntercept).toBeCloseTo(1.593, 3);
    expect(r.rSquared).toBeCloseTo(0.877, 3);
    expect(r.caution.length).toBeGreaterThan(20);
  });

  it("returns insufficient-data for fewer than three points and for points at one time", () => {
    expect(fitLinearTrend(new Float64Array([0, 1]), new Float64Array([1, 2])).status).toBe("insufficient-data");
    expect(fitLinearTrend(new Float64Array([5, 5, 5]), new Float64Array([1, 2, 3])).status).toBe("insufficient-data");
  });

  it("throws on non-finite input (programmer error: callers drop missing values first)", () => {
    expect(() => fitLinearTrend(new Float64Array([0, 1, 2]), new Float64Array([0, NaN, 1]))).toThrow(RangeError);
  });
});

describe("levelCrossingTimes", () => {
  const tMs = Float64Array.from({ length: 11 }, (_, i) => i * MS_PER_DAY);
  const rising = ok(fitLinearTrend(tMs, Float64Array.from({ length: 11 }, (_, i) => 1e-4 * i + 1e-7 * (i % 2)), 0));

  it("projects the crossing of a level ahead of a rising trend (value 0.001 at 1e-4/day from ~0.001 at day 10)", () => {
    const [c] = levelCrossingTimes(rising, [0.002]);
    expect(c.status).toBe("projected");
    if (c.status !== "projected") return;
    // Trend at day 10 ≈ 1e-3, so 0.002 is ≈ 10 days later.
    expect(c.daysFromLast).toBeCloseTo(10, 2);
    expect(c.timeMs).toBeCloseTo(20 * MS_PER_DAY, -6);
  });

  it("marks levels already passed as reached and levels on the other side as not approaching", () => {
    const [a, b] = levelCrossingTimes(rising, [0.0005, -0.001]);
    expect(a.status).toBe("reached");
    expect(b.status).toBe("not-approaching");
  });

  it("marks every level not approaching on a flat, noisy series", () => {
    const flat = ok(fitLinearTrend(tMs, Float64Array.from({ length: 11 }, (_, i) => (i % 2 ? 1e-5 : -1e-5)), 0));
    expect(levelCrossingTimes(flat, [0.001])[0].status).toBe("not-approaching");
  });
});
