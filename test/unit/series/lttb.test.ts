import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { downsampleIndices } from "../../../lib/series/lttb.ts";

/** Seeded series: random walk with a few spikes (seeded by fast-check). */
const seriesArb = fc
  .record({ n: fc.integer({ min: 5, max: 3000 }), seed: fc.integer(), maxPoints: fc.integer({ min: 4, max: 400 }) })
  .map(({ n, seed, maxPoints }) => {
    let s = seed >>> 0 || 1;
    const rnd = (): number => {
      s ^= s << 13;
      s ^= s >>> 17;
      s ^= s << 5;
      return ((s >>> 0) / 4294967296) - 0.5;
    };
    const t = new Float64Array(n);
    const v = new Float64Array(n);
    let x = 0;
    for (let i = 0; i < n; i++) {
      t[i] = i * 900_000;
      x += rnd() * 1e-5;
      v[i] = x + (rnd() > 0.49 ? rnd() * 1e-3 : 0);
    }
    return { t, v, maxPoints };
  });

describe("downsampleIndices", () => {
  it("keeps the first and last points, the global max and min, and at most maxPoints points, in increasing order (property)", () => {
    fc.assert(
      fc.property(seriesArb, ({ t, v, maxPoints }) => {
        const idx = downsampleIndices(t, v, maxPoints);
        const n = t.length;
        expect(idx.length).toBeLessThanOrEqual(Math.min(n, maxPoints));
        expect(idx[0]).toBe(0);
        expect(idx[idx.length - 1]).toBe(n - 1);
        for (let i = 1; i < idx.length; i++) expect(idx[i]).toBeGreaterThan(idx[i - 1]);
        let iMax = 0;
        let iMin = 0;
        for (let i = 1; i < n; i++) {
          if (v[i] > v[iMax]) iMax = i;
          if (v[i] < v[iMin]) iMin = i;
        }
        const kept = new Set(idx);
        expect(kept.has(iMax)).toBe(true);
        expect(kept.has(iMin)).toBe(true);
      }),
      { numRuns: 150 },
    );
  });

  it("keeps a one-sample spike that plain bucket averaging would flatten", () => {
    const n = 35_040;
    const t = Float64Array.from({ length: n }, (_, i) => i * 900_000);
    const v = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 500) * 1e-4);
    v[12_345] = 5e-3;
    v[30_000] = -4e-3;
    const idx = Array.from(downsampleIndices(t, v, 500));
    expect(idx).toContain(12_345);
    expect(idx).toContain(30_000);
  });

  it("returns every index when the series is no longer than maxPoints", () => {
    const t = new Float64Array([0, 1, 2]);
    expect(Array.from(downsampleIndices(t, new Float64Array([3, 1, 2]), 10))).toEqual([0, 1, 2]);
  });

  it("picks the largest-triangle point of a bucket: a single bump in a straight line survives", () => {
    // 0..99 on a line with one bump at 50; 14 points → 5 buckets of ~20.
    const t = Float64Array.from({ length: 100 }, (_, i) => i);
    const v = Float64Array.from({ length: 100 }, (_, i) => i + (i === 50 ? 30 : 0));
    expect(Array.from(downsampleIndices(t, v, 14))).toContain(50);
  });

  it("throws for maxPoints below 4 or lengths that differ (programmer errors)", () => {
    expect(() => downsampleIndices(new Float64Array(10), new Float64Array(10), 3)).toThrow(RangeError);
    expect(() => downsampleIndices(new Float64Array(10), new Float64Array(9), 5)).toThrow(RangeError);
  });
});
