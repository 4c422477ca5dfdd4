import { describe, expect, it } from "vitest";
import { colourForValue, DIVERGING_STOPS, divergingColour, hexToRgb, inkOn, legendStops, NO_DATA_COLOUR, relativeLuminance } from "../../../lib/plan/colour.ts";

describe("divergingColour", () => {
  it("divergingColour returns the stops at −1, 0 and +1 and clamps outside", () => {
    expect(divergingColour(-1)).toBe(DIVERGING_STOPS[0]);
    expect(divergingColour(0)).toBe(DIVERGING_STOPS[3]);
    expect(divergingColour(1)).toBe(DIVERGING_STOPS[6]);
    expect(divergingColour(7)).toBe(DIVERGING_STOPS[6]);
    expect(divergingColour(-7)).toBe(DIVERGING_STOPS[0]);
    expect(divergingColour(NaN)).toBe(NO_DATA_COLOUR);
  });

  it("divergingColour passes through the Okabe–Ito blue and orange at ∓2/3", () => {
    // Okabe & Ito (2008): blue #0072B2, orange #E69F00.
    expect(divergingColour(-2 / 3)).toBe("#0072b2");
    expect(divergingColour(2 / 3)).toBe("#e69f00");
  });

  it("divergingColour gets darker monotonically away from zero on both sides", () => {
    let prevNeg = relativeLuminance(divergingColour(0));
    let prevPos = prevNeg;
    for (let i = 1; i <= 50; i++) {
      const t = i / 50;
      const lp = relativeLuminance(divergingColour(t));
      const ln = relativeLuminance(divergingColour(-t));
      expect(lp).toBeLessThanOrEqual(prevPos + 1e-9);
      expect(ln).toBeLessThanOrEqual(prevNeg + 1e-9);
      prevPos = lp;
      prevNeg = ln;
    }
  });

  it("divergingColour keeps extension and contraction apart in the red–green axis a deuteranope still sees (blue vs yellow)", () => {
    // Blue–yellow opponent difference (b − (r+g)/2) has opposite signs on the two sides.
    const by = (hex: string) => {
      const [r, g, b] = hexToRgb(hex);
      return b - (r + g) / 2;
    };
    for (const t of [0.2, 0.5, 0.8, 1]) {
      expect(by(divergingColour(-t))).toBeGreaterThan(0);
      expect(by(divergingColour(t))).toBeLessThan(0);
    }
  });
});

describe("colourForValue / legendStops / inkOn", () => {
  it("colourForValue scales by the domain and uses only the orange half when unsigned", () => {
    expect(colourForValue(0.001, 0.001)).toBe(DIVERGING_STOPS[6]);
    expect(colourForValue(-0.001, 0.001)).toBe(DIVERGING_STOPS[0]);
    expect(colourForValue(-0.001, 0.001, false)).toBe(DIVERGING_STOPS[3]);
    expect(colourForValue(null, 1)).toBe(NO_DATA_COLOUR);
    expect(colourForValue(0.5, 0)).toBe(DIVERGING_STOPS[3]);
  });

  it("legendStops spans the domain evenly", () => {
    const s = legendStops(500e-6, 5);
    expect(s.map((x) => x.value)).toEqual([-500e-6, -250e-6, 0, 250e-6, 500e-6]);
    expect(legendStops(1, 3, false).map((x) => x.value)).toEqual([0, 0.5, 1]);
    expect(() => legendStops(1, 1)).toThrow();
  });

  it("inkOn picks white on the dark ends and dark ink on the white centre", () => {
    expect(inkOn(DIVERGING_STOPS[0])).toBe("#ffffff");
    expect(inkOn(DIVERGING_STOPS[3])).toBe("#1f2a33");
    expect(inkOn(DIVERGING_STOPS[6])).toBe("#ffffff");
  });

  it("hexToRgb rejects malformed colours", () => {
    expect(() => hexToRgb("blue")).toThrow();
  });
});
