import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { ecefToEnu, enuFrame, geodeticToEcef, geodeticToEnu } from "../../../lib/geodesy/enu.ts";
import { ecefToGeodetic, enuToEcef, enuToGeodetic } from "../../../lib/geodesy/enu-inverse.ts";

const dms = (d: number, m: number, s: number): number => d + m / 60 + s / 3600;
/** 1e-9° of latitude is about 0.11 mm on the ground. */
const DEG_1E9 = 1e-9;

describe("ecefToGeodetic", () => {
  it("ecefToGeodetic inverts the worked WGS 84 example of IOGP/EPSG Guidance Note 7-2 (method 9602)", () => {
    // Source: IOGP Publication 373-7-2, geographic/geocentric conversion example on WGS 84:
    // X = 3771793.968 m, Y = 140253.342 m, Z = 5124304.349 m ↔ φ = 53°48'33.820"N, λ = 2°07'46.380"E,
    // h = 73.0 m (quoted to the note's printed precision: 0.001" ≈ 3 cm, 1 mm in height).
    const g = ecefToGeodetic([3771793.968, 140253.342, 5124304.349]);
    expect(Math.abs(g.latDeg - dms(53, 48, 33.82))).toBeLessThan(0.001 / 3600);
    expect(Math.abs(g.lonDeg - dms(2, 7, 46.38))).toBeLessThan(0.001 / 3600);
    expect(Math.abs(g.heightM - 73)).toBeLessThan(2e-3);
  });

  it("ecefToGeodetic gives the poles and the equator from the ellipsoid's axes", () => {
    // Definition: (a, 0, 0) is φ = 0, λ = 0, h = 0; (0, 0, b + 10) is the north pole at h = 10 m.
    const eq = ecefToGeodetic([6378137, 0, 0]);
    expect(Math.abs(eq.latDeg)).toBeLessThan(1e-12);
    expect(Math.abs(eq.heightM)).toBeLessThan(1e-6);
    const pole = ecefToGeodetic([0, 0, 6356752.314245 + 10]);
    expect(pole.latDeg).toBe(90);
    expect(Math.abs(pole.heightM - 10)).toBeLessThan(1e-5);
  });

  it("ecefToGeodetic(geodeticToEcef(p)) returns p to 1e-9° and 0.1 mm anywhere from −9 km to +20 km height", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -89.9, max: 89.9, noNaN: true }),
        fc.double({ min: -180, max: 180, noNaN: true }),
        fc.double({ min: -9000, max: 20000, noNaN: true }),
        (latDeg, lonDeg, heightM) => {
          const g = ecefToGeodetic(geodeticToEcef({ latDeg, lonDeg, heightM }));
          expect(Math.abs(g.latDeg - latDeg)).toBeLessThan(DEG_1E9);
          const dLon = Math.abs(((g.lonDeg - lonDeg + 540) % 360) - 180);
          expect(dLon).toBeLessThan(DEG_1E9);
          expect(Math.abs(g.heightM - heightM)).toBeLessThan(1e-4);
        },
      ),
      { numRuns: 500 },
    );
  });
});

describe("enuToEcef and enuToGeodetic", () => {
  it("enuToEcef inverts ecefToEnu to 1 µm for points within 50 km of the origin", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -80, max: 80, noNaN: true }),
        fc.double({ min: -180, max: 180, noNaN: true }),
        fc.tuple(fc.double({ min: -5e4, max: 5e4, noNaN: true }), fc.double({ min: -5e4, max: 5e4, noNaN: true }), fc.double({ min: -500, max: 500, noNaN: true })),
        (latDeg, lonDeg, enu) => {
          const f = enuFrame({ latDeg, lonDeg, heightM: 50 });
          const back = ecefToEnu(f, enuToEcef(f, enu));
          for (let i = 0; i < 3; i++) expect(Math.abs(back[i] - enu[i])).toBeLessThan(1e-6);
        },
      ),
      { numRuns: 300 },
    );
  });

  it("geodeticToEnu(enuToGeodetic(enu)) returns the local coordinates to 0.01 mm (site-sized grids)", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -80, max: 80, noNaN: true }),
        fc.double({ min: -180, max: 180, noNaN: true }),
        fc.tuple(fc.double({ min: -3000, max: 3000, noNaN: true }), fc.double({ min: -3000, max: 3000, noNaN: true }), fc.double({ min: -100, max: 100, noNaN: true })),
        (latDeg, lonDeg, enu) => {
          const f = enuFrame({ latDeg, lonDeg, heightM: 0 });
          const back = geodeticToEnu(f, enuToGeodetic(f, enu));
          for (let i = 0; i < 3; i++) expect(Math.abs(back[i] - enu[i])).toBeLessThan(1e-5);
        },
      ),
      { numRuns: 300 },
    );
  });

  it("enuToGeodetic of the origin is the origin, and 1000 m north moves latitude by about 1000 m / M", () => {
    // Meridian radius of curvature M = a(1 − e²) / (1 − e² sin²φ)^1.5 (Hofmann-Wellenhof et al. 2008).
    const origin = { latDeg: 54.35, lonDeg: 2.95, heightM: 0 };
    const f = enuFrame(origin);
    const o = enuToGeodetic(f, [0, 0, 0]);
    expect(Math.abs(o.latDeg - origin.latDeg)).toBeLessThan(1e-12);
    expect(Math.abs(o.lonDeg - origin.lonDeg)).toBeLessThan(1e-12);
    expect(Math.abs(o.heightM)).toBeLessThan(1e-6);
    const e2 = 0.0066943799901413165;
    const s = Math.sin(origin.latDeg * (Math.PI / 180));
    const M = (6378137 * (1 - e2)) / Math.pow(1 - e2 * s * s, 1.5);
    const north = enuToGeodetic(f, [0, 1000, 0]);
    // Over 1 km the curvature term is below 1e-6 of the arc: compare to 1e-5 relative.
    expect(Math.abs((north.latDeg - origin.latDeg) * (Math.PI / 180) * M - 1000)).toBeLessThan(1e-2);
  });
});
