import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { enuFrame, geodeticToEnu } from "../../../lib/geodesy/enu.ts";
import { elementsGeoJson, observationsGeoJson, type ExportElement, type Position } from "../../../lib/formats/export-geojson.ts";
import { parseEpochGeoJson } from "../../../lib/formats/epoch-geojson.ts";

const site = { slug: "s", name: "Site", frameDescription: "Local grid (m)" };
const origin = { latDeg: 54.35, lonDeg: 2.95, heightM: 0 };
const frame = enuFrame(origin);

const el = (over: Partial<ExportElement>): ExportElement => ({ id: 1, name: "T", label: "", kind: "triangle", mode: "plan", pointCodes: ["A", "B", "C"], latest: null, ...over });
const positions = new Map([
  ["A", { east: 0, north: 0, height: 1 }],
  ["B", { east: 10, north: 0, height: 1 }],
  ["C", { east: 5, north: 8, height: 1 }],
  ["D", { east: 5, north: -8, height: 1 }],
]);

/** Twice the signed area of a lon/lat ring (positive: counter-clockwise). */
function area2(ring: Position[]): number {
  let s = 0;
  for (let i = 0; i + 1 < ring.length; i++) s += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
  return s;
}

describe("observationsGeoJson", () => {
  it("observationsGeoJson gives lon/lat/h that the epoch GeoJSON reader converts back to the local coordinates within 1 mm (property)", () => {
    const coord = fc.double({ min: -2000, max: 2000, noNaN: true });
    const row = fc.record({ point: fc.stringMatching(/^[A-Z][0-9]{1,3}$/), eastM: coord, northM: coord, heightM: fc.double({ min: -50, max: 50, noNaN: true }) });
    fc.assert(
      fc.property(fc.uniqueArray(row, { minLength: 1, maxLength: 10, selector: (r) => r.point }), (rows) => {
        const obs = rows.map((r) => ({ ...r, timeMs: Date.UTC(2026, 0, 1), sigmaEastM: 0.001, sigmaNorthM: 0.001, sigmaHeightM: 0.0015 }));
        const fcol = observationsGeoJson(site, frame, obs);
        const back = parseEpochGeoJson(JSON.parse(JSON.stringify(fcol)), frame);
        expect(back.ok).toBe(true);
        if (!back.ok) return;
        const got = back.epochs[0].observations;
        obs.forEach((o, i) => {
          expect(got[i].point).toBe(o.point);
          expect(Math.abs(got[i].east - o.eastM)).toBeLessThan(1e-3);
          expect(Math.abs(got[i].north - o.northM)).toBeLessThan(1e-3);
          expect(Math.abs(got[i].height - o.heightM)).toBeLessThan(1e-3);
          expect(got[i].sigmaEast).toBe(0.001);
        });
      }),
      { numRuns: 100 },
    );
  });

  it("observationsGeoJson puts longitude first (RFC 7946 §3.1.1): a point 100 m east has a larger longitude and the same latitude", () => {
    const f = observationsGeoJson(site, frame, [{ timeMs: 0, point: "E", eastM: 100, northM: 0, heightM: 0, sigmaEastM: 1, sigmaNorthM: 1, sigmaHeightM: 1 }]);
    const g = f.features[0].geometry;
    expect(g?.type).toBe("Point");
    const [lon, lat] = (g as { coordinates: Position }).coordinates;
    expect(lon).toBeGreaterThan(origin.lonDeg);
    expect(Math.abs(lat - origin.latDeg)).toBeLessThan(1e-5);
    const [e] = geodeticToEnu(frame, { lonDeg: lon, latDeg: lat, heightM: (g as { coordinates: number[] }).coordinates[2] });
    expect(Math.abs(e - 100)).toBeLessThan(1e-4);
  });

  it("observationsGeoJson without an origin has null geometries, local coordinates in properties and no crs member", () => {
    const f = observationsGeoJson(site, null, [{ timeMs: 0, point: "P", eastM: 1, northM: 2, heightM: 3, sigmaEastM: 1, sigmaNorthM: 1, sigmaHeightM: 1 }]);
    expect(f.features[0].geometry).toBeNull();
    expect(f.features[0].properties).toMatchObject({ east_m: 1, north_m: 2, height_m: 3 });
    expect(f.epochal.frame).toBe("local");
    expect("crs" in f).toBe(false);
  });
});

describe("elementsGeoJson", () => {
  it("elementsGeoJson makes triangles closed counter-clockwise polygons whatever the vertex order", () => {
    const f = elementsGeoJson(site, frame, [el({ pointCodes: ["A", "B", "C"] }), el({ id: 2, pointCodes: ["A", "C", "B"] })], positions);
    for (const feat of f.features) {
      expect(feat.geometry?.type).toBe("Polygon");
      const ring = (feat.geometry as { coordinates: Position[][] }).coordinates[0];
      expect(ring.length).toBe(4);
      expect(ring[3]).toEqual(ring[0]);
      expect(area2(ring)).toBeGreaterThan(0);
    }
  });

  it("elementsGeoJson makes baselines LineStrings and groups MultiPoints, with values in µε", () => {
    const f = elementsGeoJson(
      site,
      frame,
      [
        el({ id: 3, kind: "baseline", mode: "slope", pointCodes: ["A", "B"], latest: { timeMs: 0, status: "ok", greenMax: null, greenMin: null, maxShear: null, arealStrain: null, engineering: 0.0002, sigmaGreenMax: null, sigmaEngineering: 0.0001 } }),
        el({ id: 4, kind: "group", pointCodes: ["A", "B", "C", "D"] }),
      ],
      positions,
    );
    expect(f.features[0].geometry?.type).toBe("LineString");
    expect(f.features[0].properties.engineering_microstrain).toBeCloseTo(200, 9);
    expect(f.features[1].geometry?.type).toBe("MultiPoint");
    expect((f.features[1].geometry as { coordinates: Position[] }).coordinates.length).toBe(4);
  });

  it("elementsGeoJson gives a null geometry and lists missing points when a position is unknown, and local coordinates without an origin", () => {
    const f = elementsGeoJson(site, frame, [el({ pointCodes: ["A", "B", "Z"] })], positions);
    expect(f.features[0].geometry).toBeNull();
    expect(f.features[0].properties.missing_points).toEqual(["Z"]);
    const local = elementsGeoJson(site, null, [el({})], positions);
    expect(local.features[0].geometry).toBeNull();
    expect(local.features[0].properties.local_coordinates).toEqual([[0, 0, 1], [10, 0, 1], [5, 8, 1]]);
  });
});
