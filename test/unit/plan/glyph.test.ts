import { describe, expect, it } from "vitest";
import { displacementArrow, glyphScale, polygonCentroid, principalAxesSvg, principalGlyph } from "../../../lib/plan/glyph.ts";

const close = (a: number, b: number) => expect(a).toBeCloseTo(b, 12);

describe("principalAxesSvg", () => {
  it("principalAxesSvg points the major axis up the screen (−y) for azimuth 0° (grid north)", () => {
    const { major, minor } = principalAxesSvg(0);
    close(major[0], 0);
    close(major[1], -1);
    // Minor axis east: +x.
    close(minor[0], 1);
    close(minor[1], 0);
  });

  it("principalAxesSvg turns clockwise on screen: azimuth 90° is east (+x), 45° is up-right", () => {
    const e = principalAxesSvg(90).major;
    close(e[0], 1);
    close(e[1], 0);
    const ne = principalAxesSvg(45).major;
    close(ne[0], Math.SQRT1_2);
    close(ne[1], -Math.SQRT1_2);
  });
});

describe("principalGlyph", () => {
  it("principalGlyph draws bars |value|·scale long through the centroid with outward heads for extension", () => {
    const [maj, min] = principalGlyph({ cx: 10, cy: -20, azimuthMaxDeg: 0, major: 400e-6, minor: -100e-6, scale: 10_000, headSize: 0.5 });
    // Major: 4 m long, vertical on screen.
    close(maj.x1, 10);
    close(maj.x2, 10);
    close(maj.y2 - maj.y1, -4);
    expect(maj.sense).toBe("extension");
    expect(min.sense).toBe("contraction");
    close(Math.hypot(min.x2 - min.x1, min.y2 - min.y1), 1);
    // Extension: the head at (x2, y2) has its tip at the end and its wings nearer the centroid.
    const [w1, tip, w2] = maj.heads[0];
    close(tip[0], maj.x2);
    close(tip[1], maj.y2);
    const dTip = Math.hypot(tip[0] - 10, tip[1] + 20);
    expect(Math.hypot(w1[0] - 10, w1[1] + 20)).toBeLessThan(dTip);
    expect(Math.hypot(w2[0] - 10, w2[1] + 20)).toBeLessThan(dTip);
    // Contraction: wings farther from the centroid than the tip → arrows point inward.
    const [cw1, ctip] = min.heads[0];
    expect(Math.hypot(cw1[0] - 10, cw1[1] + 20)).toBeGreaterThan(Math.hypot(ctip[0] - 10, ctip[1] + 20));
    expect(maj.heads).toHaveLength(2);
  });

  it("principalGlyph draws no heads for a zero value and takes north for an isotropic (null) azimuth", () => {
    const [maj, min] = principalGlyph({ cx: 0, cy: 0, azimuthMaxDeg: null, major: 1e-4, minor: 0, scale: 1e4, headSize: 1 });
    expect(min.heads).toHaveLength(0);
    expect(min.sense).toBe("none");
    close(maj.x2, 0);
    close(maj.y2, -0.5);
  });

  it("glyphScale maps the largest magnitude to the target length and is 0 for no strain", () => {
    expect(glyphScale(500e-6, 5)).toBeCloseTo(10_000, 9);
    expect(glyphScale(0, 5)).toBe(0);
  });
});

describe("displacementArrow / polygonCentroid", () => {
  it("displacementArrow exaggerates the displacement and flips north to −y", () => {
    const a = displacementArrow(100, -200, 0.003, 0.004, 1000, 0.5);
    expect(a).not.toBeNull();
    close(a!.shaft.x2, 103);
    close(a!.shaft.y2, -204);
    close(a!.head[1][0], 103);
    expect(displacementArrow(0, 0, 0, 0, 1000, 1)).toBeNull();
  });

  it("polygonCentroid of a triangle is the vertex mean; a collinear one falls back to the mean", () => {
    const c = polygonCentroid([{ x: 0, y: 0 }, { x: 3, y: 0 }, { x: 0, y: 3 }]);
    close(c.x, 1);
    close(c.y, 1);
    const d = polygonCentroid([{ x: 0, y: 0 }, { x: 1, y: 1 }, { x: 2, y: 2 }]);
    close(d.x, 1);
    close(d.y, 1);
  });
});

describe("convexHull", () => {
  it("convexHull drops interior points and keeps the corners", async () => {
    const { convexHull } = await import("../../../lib/plan/hull.ts");
    const h = convexHull([{ x: 0, y: 0 }, { x: 2, y: 0 }, { x: 1, y: 1 }, { x: 2, y: 2 }, { x: 0, y: 2 }]);
    expect(h).toHaveLength(4);
    expect(h).not.toContainEqual({ x: 1, y: 1 });
  });
});
