import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { atan2Fast } from "../../../lib/strain/atan2.ts";

describe("atan2Fast (half-angle reduction + fdlibm polynomial)", () => {
  it("equals Math.atan2 to 1e-15 relative (2e-15 absolute) for |(x, y)| above 1e-150", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: -1e6, max: 1e6, noNaN: true }), (y, x) => {
        fc.pre(Math.hypot(x, y) > 1e-150); // x² + y² would underflow below (documented domain)
        const a = atan2Fast(y, x);
        const b = Math.atan2(y, x);
        // On the branch cut (y = −0, x < 0) Math.atan2 gives −π and atan2Fast π: the same angle.
        let d = Math.abs(a - b);
        if (d > Math.PI) d = 2 * Math.PI - d;
        expect(d).toBeLessThanOrEqual(1e-15 * Math.abs(b) + 2e-15);
      }),
      { numRuns: 5000, seed: 7 },
    );
  });
  it("gives ±π/2 on the y axis and π on the negative x axis", () => {
    expect(atan2Fast(1, 0)).toBeCloseTo(Math.PI / 2, 15);
    expect(atan2Fast(-1, 0)).toBeCloseTo(-Math.PI / 2, 15);
    expect(atan2Fast(0, -1)).toBe(Math.PI);
  });
});
