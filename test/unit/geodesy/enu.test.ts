import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { ecefToEnu, enuFrame, geodeticToEcef, geodeticToEnu, isValidGeodetic, WGS84_A_M, WGS84_E2 } from "../../../lib/geodesy/enu.ts";

const dms = (d: number, m: number, s: number): number => d + m / 60 + s / 3600;

describe("geodeticToEcef", () => {
  it("geodeticToEcef matches the worked WGS 84 example of IOGP/EPSG Guidance Note 7-2 (method 9602) to 1 mm", () => {
    // Source: IOGP Publication 373-7-2, Geomatics Guidance Note 7 part 2, geographic/geocentric
    // conversion example on WGS 84: φ = 53°48'33.820"N, λ = 2°07'46.380"E, h = 73.0 m →
    // X = 3771793.968 m, Y = 140253.342 m, Z = 5124304.349 m. (Values quoted from memory of that note.)
    const [x, y, z] = geodeticToEcef({ latDeg: dms(53, 48, 33.82), lonDeg: dms(2, 7, 46.38), heightM: 73 });
    expect(Math.abs(x - 3771793.968)).toBeLessThan(1e-3);
    expect(Math.abs(y - 140253.342)).toBeLessThan(1e-3);
    expect(Math.abs(z - 5124304.349)).toBeLessThan(1e-3);
  });

  it("geodeticToEcef puts the equator/Greenwich point at (a, 0, 0) and the pole at (0, 0, b)", () => {
    // Definition of the ellipsoid: b = a·√(1 − e²) (Hofmann-Wellenhof et al., GNSS, 2008).
    const eq = geodeticToEcef({ latDeg: 0, lonDeg: 0, heightM: 0 });
    expect(Math.abs(eq[0] - WGS84_A_M)).toBeLessThan(1e-9);
    expect(Math.abs(eq[1])).toBeLessThan(1e-9);
    const pole = geodeticToEcef({ latDeg: 90, lonDeg: 0, heightM: 0 });
    expect(Math.abs(pole[2] - WGS84_A_M * Math.sqrt(1 - WGS84_E2))).toBeLessThan(1e-6);
    // WGS 84 semi-minor axis b = 6356752.314245 m (NIMA TR8350.2, table 3.1; from memory).
    expect(Math.abs(pole[2] - 6356752.314245)).toBeLessThan(1e-5);
  });
});

describe("ecefToEnu", () => {
  it("ecefToEnu matches the topocentric example of IOGP/EPSG Guidance Note 7-2 (method 9836) to 5 mm", () => {
    // Source: IOGP Publication 373-7-2, geocentric/topocentric conversion example on WGS 84:
    // origin φ₀ = 55°N, λ₀ = 5°E, h₀ = 200 m (X₀ = 3652755.306, Y₀ = 319574.680, Z₀ = 5201547.354);
    // point X = 3771793.97, Y = 140253.34, Z = 5124304.35 → U = −189013.869, V = −128642.040,
    // W = −4220.171 m. (Quoted from memory; the tolerance allows for the last digit.)
    const f = enuFrame({ latDeg: 55, lonDeg: 5, heightM: 200 });
    expect(Math.abs(f.originEcef[0] - 3652755.306)).toBeLessThan(1e-3);
    expect(Math.abs(f.originEcef[1] - 319574.68)).toBeLessThan(1e-3);
    expect(Math.abs(f.originEcef[2] - 5201547.354)).toBeLessThan(1e-3);
    const [e, n, u] = ecefToEnu(f, [3771793.97, 140253.34, 5124304.35]);
    expect(Math.abs(e - -189013.869)).toBeLessThan(5e-3);
    expect(Math.abs(n - -128642.04)).toBeLessThan(5e-3);
    expect(Math.abs(u - -4220.171)).toBeLessThan(5e-3);
  });

  it("geodeticToEnu gives zero at the origin and the height difference straight up", () => {
    const o = { latDeg: 47.3769, lonDeg: 8.5417, heightM: 408 };
    const f = enuFrame(o);
    for (const v of geodeticToEnu(f, o)) expect(Math.abs(v)).toBeLessThan(1e-9);
    const up = geodeticToEnu(f, { ...o, heightM: 418 });
    expect(Math.abs(up[0])).toBeLessThan(1e-9);
    expect(Math.abs(up[1])).toBeLessThan(1e-9);
    expect(Math.abs(up[2] - 10)).toBeLessThan(1e-8);
  });

  it("geodeticToEnu of a small step north and east has the meridian and prime-vertical radii as scale", () => {
    // M = a(1 − e²)/(1 − e² sin²φ)^{3/2}, N = a/√(1 − e² sin²φ) (derived; any geodesy text).
    const o = { latDeg: 46, lonDeg: 7, heightM: 0 };
    const f = enuFrame(o);
    const s2 = Math.sin((46 * Math.PI) / 180) ** 2;
    const M = (WGS84_A_M * (1 - WGS84_E2)) / (1 - WGS84_E2 * s2) ** 1.5;
    const N = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * s2);
    const d = 1e-5; // degrees, about 1 m
    const north = geodeticToEnu(f, { ...o, latDeg: 46 + d });
    const east = geodeticToEnu(f, { ...o, lonDeg: 7 + d });
    const rad = (d * Math.PI) / 180;
    expect(Math.abs(north[1] - M * rad)).toBeLessThan(1e-6);
    expect(Math.abs(east[0] - N * Math.cos((46 * Math.PI) / 180) * rad)).toBeLessThan(1e-6);
  });

  it("ecefToEnu preserves distances (the rotation is orthonormal) for random points", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -89, max: 89, noNaN: true }),
        fc.double({ min: -180, max: 180, noNaN: true }),
        fc.double({ min: -1000, max: 1000, noNaN: true }),
        fc.double({ min: -0.01, max: 0.01, noNaN: true }),
        fc.double({ min: -0.01, max: 0.01, noNaN: true }),
        (lat, lon, dh, dlat, dlon) => {
          const f = enuFrame({ latDeg: lat, lonDeg: lon, heightM: 0 });
          const p = { latDeg: lat + dlat, lonDeg: lon + dlon, heightM: dh };
          const x = geodeticToEcef(p);
          const enu = ecefToEnu(f, x);
          const dist = Math.hypot(x[0] - f.originEcef[0], x[1] - f.originEcef[1], x[2] - f.originEcef[2]);
          return Math.abs(Math.hypot(...enu) - dist) < 1e-6;
        },
      ),
    );
  });
});

describe("isValidGeodetic", () => {
  it("isValidGeodetic refuses latitudes beyond ±90°, longitudes beyond ±180° and NaN", () => {
    expect(isValidGeodetic({ latDeg: 90.1, lonDeg: 0, heightM: 0 })).toBe(false);
    expect(isValidGeodetic({ latDeg: 0, lonDeg: -180.5, heightM: 0 })).toBe(false);
    expect(isValidGeodetic({ latDeg: NaN, lonDeg: 0, heightM: 0 })).toBe(false);
    expect(isValidGeodetic({ latDeg: -90, lonDeg: 180, heightM: -50 })).toBe(true);
  });
});
