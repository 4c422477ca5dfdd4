import { describe, expect, it } from "vitest";
import { clientToSvg, fitViewBox, fromSvg, MIN_VIEW_SIZE_M, panView, toSvg, zoomView, ZOOM_IN_LIMIT } from "../../../lib/plan/viewbox.ts";

describe("toSvg / fromSvg", () => {
  it("toSvg maps north to up (negative SVG y) and east to the right", () => {
    expect(toSvg({ east: 5, north: 10 })).toEqual({ x: 5, y: -10 });
    expect(fromSvg(5, -10)).toEqual({ east: 5, north: 10 });
  });
});

describe("fitViewBox", () => {
  it("fitViewBox contains every point with the margin and keeps the aspect ratio", () => {
    const pts = [
      { east: 1000, north: 5000 },
      { east: 1200, north: 5100 },
      { east: 1100, north: 5050 },
    ];
    const v = fitViewBox(pts, 16 / 9, 0.05);
    expect(v.width / v.height).toBeCloseTo(16 / 9, 12);
    for (const p of pts) {
      const s = toSvg(p);
      expect(s.x).toBeGreaterThan(v.x);
      expect(s.x).toBeLessThan(v.x + v.width);
      expect(s.y).toBeGreaterThan(v.y);
      expect(s.y).toBeLessThan(v.y + v.height);
    }
    // Centred on the middle of the extent.
    expect(v.x + v.width / 2).toBeCloseTo(1100, 9);
    expect(v.y + v.height / 2).toBeCloseTo(-5050, 9);
    // The larger extent (200 m east) plus 5 % each side sets the width.
    expect(v.width).toBeCloseTo(220, 9);
  });

  it("fitViewBox widens the height for a tall aspect", () => {
    const v = fitViewBox([{ east: 0, north: 0 }, { east: 100, north: 10 }], 0.5, 0);
    expect(v.width).toBeCloseTo(100, 9);
    expect(v.height).toBeCloseTo(200, 9);
  });

  it("fitViewBox gives a 10 m box for one point, for no point, and ignores non-finite points", () => {
    const one = fitViewBox([{ east: 3, north: 4 }], 1, 0);
    expect(one).toEqual({ x: 3 - MIN_VIEW_SIZE_M / 2, y: -4 - MIN_VIEW_SIZE_M / 2, width: MIN_VIEW_SIZE_M, height: MIN_VIEW_SIZE_M });
    const none = fitViewBox([], 1, 0);
    expect(none.width).toBe(MIN_VIEW_SIZE_M);
    const withNaN = fitViewBox([{ east: NaN, north: 1 }, { east: 3, north: 4 }], 1, 0);
    expect(withNaN).toEqual(one);
  });

  it("fitViewBox scales with the data from 1e-3 m to 1e6 m offsets", () => {
    for (const scale of [1e-3, 1, 1e3]) {
      for (const shift of [0, 1e6]) {
        const pts = [
          { east: shift, north: shift },
          { east: shift + 1000 * scale, north: shift + 500 * scale },
        ];
        const v = fitViewBox(pts, 2, 0);
        // Each side is at least MIN_VIEW_SIZE_M, then the aspect (2) widens whichever is short.
        const w = Math.max(Math.max(1000 * scale, MIN_VIEW_SIZE_M), 2 * Math.max(500 * scale, MIN_VIEW_SIZE_M));
        expect(v.width).toBeCloseTo(w, 6);
        expect(v.x + v.width / 2).toBeCloseTo(shift + 500 * scale, 6);
      }
    }
  });

  it("fitViewBox throws on a non-positive aspect (programmer error)", () => {
    expect(() => fitViewBox([], 0)).toThrow();
  });
});

describe("zoomView / panView", () => {
  const home = { x: 0, y: -100, width: 100, height: 100 };

  it("zoomView keeps the anchor point fixed and divides the size by the factor", () => {
    const z = zoomView(home, 2, 25, -75, home);
    expect(z.width).toBeCloseTo(50, 12);
    expect(z.height).toBeCloseTo(50, 12);
    // Anchor at the same relative position before and after.
    expect((25 - z.x) / z.width).toBeCloseTo((25 - home.x) / home.width, 12);
    expect((-75 - z.y) / z.height).toBeCloseTo((-75 - home.y) / home.height, 12);
  });

  it("zoomView stops at the zoom limits and does not change its input", () => {
    const copy = { ...home };
    const z = zoomView(home, 1e6, 50, -50, home);
    expect(z.width).toBeCloseTo(home.width / ZOOM_IN_LIMIT, 12);
    expect(home).toEqual(copy);
    expect(zoomView(home, -1, 0, 0, home)).toBe(home);
  });

  it("panView moves the view by the given SVG units", () => {
    expect(panView(home, 10, -5)).toEqual({ x: 10, y: -105, width: 100, height: 100 });
  });

  it("clientToSvg inverts the meet layout, letterbox included", () => {
    // 200 × 100 px area showing a square view: 2 units per pixel… no: 1 unit/px, 50 px bars left and right.
    const rect = { left: 10, top: 20, width: 200, height: 100 };
    expect(clientToSvg(home, rect, 10 + 50, 20)).toEqual({ x: 0, y: -100 });
    expect(clientToSvg(home, rect, 10 + 150, 120)).toEqual({ x: 100, y: 0 });
  });
});
