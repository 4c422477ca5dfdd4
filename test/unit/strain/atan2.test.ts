import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { atan2Fast, atanTiny, atanUnit } from "../../../lib/strain/atan2.ts";
import { mulberry32 } from "../../../seed/random.ts";

// Reference: Math.atan / Math.atan2 (V8's port of fdlibm, within 1 ulp), and exact angles from
// tan(π/4) = 1, tan(π/6) = 1/√3, tan(π/8) = √2 − 1, tan(π/12) = 2 − √3.

/** Angular distance, treating −π and π as the same angle (the branch cut). */
function angleDiff(a: number, b: number): number {
  const d = Math.abs(a - b);
  return d > Math.PI ? 2 * Math.PI - d : d;
}


describe("atanUnit (minimax rational on [−1, 1])", () => {
  it("equals Math.atan to 1e-15 relative over 200,000 seeded arguments in [−1, 1], at all scales", () => {
    const rnd = mulberry32(11);
    let worst = 0;
    for (let i = 0; i < 200_000; i++) {
      // half uniform on [−1, 1], half spread over 2⁻⁶⁰…1 so that small arguments are covered too
      const t = (2 * rnd() - 1) * (i % 2 === 0 ? 1 : 2 ** (-60 * rnd()));
      const ref = Math.atan(t);
      worst = Math.max(worst, Math.abs(atanUnit(t) - ref) / Math.abs(ref));
    }
    expect(worst).toBeLessThan(1e-15);
    expect(worst).toBeGreaterThan(0); // the sweep compared something
  });
  it("gives the exact angles π/4, π/6, π/8, π/12 (and their negatives) to 2 ulp", () => {
    const cases: [number, number][] = [
      [1, Math.PI / 4],
      [1 / Math.sqrt(3), Math.PI / 6],
      [Math.SQRT2 - 1, Math.PI / 8],
      [2 - Math.sqrt(3), Math.PI / 12],
    ];
    for (const [t, angle] of cases) {
      // the argument itself is rounded: allow its effect, |d atan/dt| ≤ 1, plus 2 ulp of the angle
      const tol = 2 * Number.EPSILON * angle + Number.EPSILON * t;
      expect(Math.abs(atanUnit(t) - angle)).toBeLessThanOrEqual(tol);
      expect(Math.abs(atanUnit(-t) + angle)).toBeLessThanOrEqual(tol);
    }
  });
  it("keeps the sign of zero and is odd", () => {
    expect(Object.is(atanUnit(0), 0)).toBe(true);
    expect(Object.is(atanUnit(-0), -0)).toBe(true);
    expect(atanUnit(-0.37)).toBe(-atanUnit(0.37));
    expect(Math.abs(atanUnit(1e-300) - 1e-300)).toBeLessThanOrEqual(2 * Number.EPSILON * 1e-300);
  });
});

describe("atanTiny (Taylor series to t⁹, |t| ≤ 1/32)", () => {
  it("equals Math.atan to 1e-15 relative over 100,000 seeded arguments in [−1/32, 1/32]", () => {
    const rnd = mulberry32(12);
    let worst = 0;
    for (let i = 0; i < 100_000; i++) {
      const t = ((2 * rnd() - 1) / 32) * (i % 2 === 0 ? 1 : 2 ** (-40 * rnd()));
      worst = Math.max(worst, Math.abs(atanTiny(t) - Math.atan(t)) / Math.abs(Math.atan(t)));
    }
    expect(worst).toBeLessThan(1e-15);
  });
  it("keeps the sign of zero", () => {
    expect(Object.is(atanTiny(0), 0)).toBe(true);
    expect(Object.is(atanTiny(-0), -0)).toBe(true);
  });
});

describe("atan2Fast", () => {
  it("equals Math.atan2 to 1e-15 relative (1e-300 absolute) for finite (x, y) over the whole double range", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e300, max: 1e300, noNaN: true }), fc.double({ min: -1e300, max: 1e300, noNaN: true }), (y, x) => {
        fc.pre(x !== 0 || y !== 0); // (0, 0) is outside the documented domain
        const b = Math.atan2(y, x);
        // On the branch cut (y = −0, x < 0) Math.atan2 gives −π and atan2Fast π: the same angle.
        expect(angleDiff(atan2Fast(y, x), b)).toBeLessThanOrEqual(1e-15 * Math.abs(b) + 1e-300);
      }),
      { numRuns: 20000, seed: 7 },
    );
  });
  it("equals Math.atan2 to 1e-15 relative over 200,000 seeded points with magnitudes 1e-6…1e6 in each quadrant", () => {
    const rnd = mulberry32(13);
    let worst = 0;
    for (let i = 0; i < 200_000; i++) {
      const x = (2 * rnd() - 1) * 10 ** (12 * rnd() - 6);
      const y = (2 * rnd() - 1) * 10 ** (12 * rnd() - 6);
      const b = Math.atan2(y, x);
      worst = Math.max(worst, angleDiff(atan2Fast(y, x), b) / Math.abs(b));
    }
    expect(worst).toBeLessThan(1e-15);
  });
  it("gives ±π/2 on the y axis, 0 and π on the x axis, keeps −0, and the diagonals", () => {
    expect(atan2Fast(1, 0)).toBe(Math.PI / 2);
    expect(atan2Fast(-1, 0)).toBe(-Math.PI / 2);
    expect(atan2Fast(1, -0)).toBe(Math.PI / 2);
    expect(atan2Fast(0, 1)).toBe(0);
    expect(Object.is(atan2Fast(-0, 1), -0)).toBe(true);
    expect(atan2Fast(0, -1)).toBe(Math.PI);
    expect(atan2Fast(-0, -1)).toBe(Math.PI); // branch cut: the same angle as −π
    expect(atan2Fast(1, 1)).toBeCloseTo(Math.PI / 4, 15);
    expect(atan2Fast(1, -1)).toBeCloseTo((3 * Math.PI) / 4, 15);
    expect(atan2Fast(-1, -1)).toBeCloseTo((-3 * Math.PI) / 4, 15);
    expect(atan2Fast(-1, 1)).toBeCloseTo(-Math.PI / 4, 15);
  });
  it("handles very large and very small magnitudes (no squares are formed)", () => {
    expect(atan2Fast(1e-300, 1e300)).toBe(Math.atan2(1e-300, 1e300)); // 1e-600 underflows to 0 in both
    expect(atan2Fast(1e300, 1e-300)).toBe(Math.PI / 2);
    expect(angleDiff(atan2Fast(-1e300, -1e-300), -Math.PI / 2)).toBeLessThanOrEqual(1e-15);
    expect(angleDiff(atan2Fast(3e-310, -4e-310), Math.atan2(3e-310, -4e-310))).toBeLessThanOrEqual(4e-16 * Math.PI);
    expect(angleDiff(atan2Fast(3e305, 4e305), Math.atan2(3e305, 4e305))).toBeLessThanOrEqual(1e-15);
  });
});
