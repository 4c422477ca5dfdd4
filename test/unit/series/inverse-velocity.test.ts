import { describe, expect, it } from "vitest";
import { inverseVelocityForecast, movingAverageCentred } from "../../../lib/series/inverse-velocity.ts";
import { MS_PER_DAY } from "../../../lib/series/increments.ts";

const T0 = Date.UTC(2026, 0, 1);

/**
 * Derived analytically: displacement y(t) = −A·ln(t_f − t) + C has velocity v = A / (t_f − t), so 1/v =
 * (t_f − t)/A is linear in t with its root at t_f (Fukuzono 1985, Voight's α = 2).
 */
function accelerating(tfDays: number, A: number, n: number, stepDays: number, noise = 0, seed = 7): { tMs: Float64Array; y: Float64Array } {
  let s = seed;
  const rnd = (): number => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return s / 2147483648 - 0.5;
  };
  const tMs = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i * stepDays;
    tMs[i] = T0 + t * MS_PER_DAY;
    y[i] = -A * Math.log(tfDays - t) + A * Math.log(tfDays) + noise * rnd();
  }
  return { tMs, y };
}

describe("inverseVelocityForecast", () => {
  it("recovers the failure time of an exact v = A/(t_f − t) series within 0.1 day (t_f = 100 d, data to day 80)", () => {
    const { tMs, y } = accelerating(100, 0.002, 81, 1);
    const r = inverseVelocityForecast(tMs, y, { smoothWindow: 1 });
    expect(r.status).toBe("ok");
    expect(r.isAccelerating).toBe(true);
    expect(r.poorFit).toBe(false);
    expect(r.rSquared).toBeGreaterThan(0.999);
    expect(Math.abs((r.failureTimeMs! - T0) / MS_PER_DAY - 100)).toBeLessThan(0.1);
    expect(r.caution).toMatch(/not a prediction/);
  });

  it("recovers the failure time from noisy data within 5 days with the default smoothing (noise 5 % of the final movement rate per epoch)", () => {
    // Velocity at day 80 is 1e-4/day; noise ±2.5e-6 on each value.
    const { tMs, y } = accelerating(100, 0.002, 161, 0.5, 5e-6);
    const r = inverseVelocityForecast(tMs, y);
    expect(r.status).toBe("ok");
    expect(Math.abs((r.failureTimeMs! - T0) / MS_PER_DAY - 100)).toBeLessThan(5);
    expect(r.rSquared).toBeGreaterThan(0.8);
  });

  it("flags a decelerating series (v = A/(t + c)) as not accelerating, with no forecast time", () => {
    const n = 60;
    const tMs = Float64Array.from({ length: n }, (_, i) => T0 + i * MS_PER_DAY);
    const y = Float64Array.from({ length: n }, (_, i) => 0.002 * Math.log(1 + i / 5));
    const r = inverseVelocityForecast(tMs, y);
    expect(r.status).toBe("not-accelerating");
    expect(r.isAccelerating).toBe(false);
    expect(r.failureTimeMs).toBeNull();
    expect(r.caution.length).toBeGreaterThan(20);
  });

  it("flags steady (constant-velocity) movement as not accelerating", () => {
    const n = 40;
    const tMs = Float64Array.from({ length: n }, (_, i) => T0 + i * MS_PER_DAY);
    const y = Float64Array.from({ length: n }, (_, i) => 1e-4 * i + (i % 3 === 0 ? 2e-6 : -1e-6));
    expect(inverseVelocityForecast(tMs, y).isAccelerating).toBe(false);
  });

  it("works the same for movement in the negative direction", () => {
    const { tMs, y } = accelerating(100, 0.002, 81, 1);
    const r = inverseVelocityForecast(tMs, y.map((v) => -v), { smoothWindow: 1 });
    expect(Math.abs((r.failureTimeMs! - T0) / MS_PER_DAY - 100)).toBeLessThan(0.1);
  });

  it("returns insufficient-data for too short a series", () => {
    expect(inverseVelocityForecast(new Float64Array([0, 1, 2]), new Float64Array([0, 1, 3])).status).toBe("insufficient-data");
  });
});

describe("movingAverageCentred", () => {
  it("averages centred windows that shrink symmetrically at the ends", () => {
    expect(Array.from(movingAverageCentred(new Float64Array([1, 2, 3, 4, 10]), 3))).toEqual([1, 2, 3, 17 / 3, 10]);
  });
  it("throws for an even window", () => {
    expect(() => movingAverageCentred(new Float64Array(3), 2)).toThrow(RangeError);
  });
});
