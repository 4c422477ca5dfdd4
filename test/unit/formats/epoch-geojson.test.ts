import { describe, expect, it } from "vitest";
import { parseEpochGeoJson } from "../../../lib/formats/epoch-geojson.ts";
import { enuFrame, geodeticToEnu } from "../../../lib/geodesy/enu.ts";

const origin = { latDeg: 47, lonDeg: 8, heightM: 500 };
const frame = enuFrame(origin);
const feature = (point: string, lon: number, lat: number, h: number, props: Record<string, unknown> = {}) => ({
  type: "Feature",
  geometry: { type: "Point", coordinates: [lon, lat, h] },
  properties: { point, time: "2024-05-01T12:00:00Z", ...props },
});

describe("parseEpochGeoJson", () => {
  it("parseEpochGeoJson converts [lon, lat, h] to east-north-up about the site origin", () => {
    const r = parseEpochGeoJson({ type: "FeatureCollection", features: [feature("P1", 8.001, 47.0005, 510, { sigma_height: 0.004, name: "ignored" })] }, frame);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const [e, n, u] = geodeticToEnu(frame, { latDeg: 47.0005, lonDeg: 8.001, heightM: 510 });
    const o = r.epochs[0].observations[0];
    expect(o.east).toBe(e);
    expect(o.north).toBe(n);
    expect(o.height).toBe(u);
    // About 76 m east and 56 m north at 47° latitude (derived from the radii of curvature).
    expect(o.east).toBeGreaterThan(75);
    expect(o.east).toBeLessThan(77);
    expect(o.north).toBeGreaterThan(55);
    expect(o.north).toBeLessThan(56);
    expect(o.sigmaHeight).toBe(0.004);
    expect(o.sigmaEast).toBe(null);
    expect(r.epochs[0].fieldOf(0, "east")).toBe("features[0].geometry.coordinates");
  });

  it("parseEpochGeoJson groups features by properties.time into epochs, in order of first appearance", () => {
    const r = parseEpochGeoJson(
      { type: "FeatureCollection", features: [feature("A", 8, 47, 500, { time: "2024-05-02T00:00:00Z" }), feature("A", 8, 47, 500), feature("B", 8, 47, 500, { time: "2024-05-02T00:00:00Z" })] },
      frame,
    );
    expect(r.ok && r.epochs.map((e) => [e.time, e.observations.map((o) => o.point)])).toEqual([
      ["2024-05-02T00:00:00.000Z", ["A", "B"]],
      ["2024-05-01T12:00:00.000Z", ["A"]],
    ]);
    if (r.ok) expect(r.epochs[0].fieldOf(1, "point")).toBe("features[2].properties.point");
  });

  it("parseEpochGeoJson names the path of a latitude out of range, a missing height and a repeated point", () => {
    const r = parseEpochGeoJson(
      {
        type: "FeatureCollection",
        features: [
          feature("A", 8, 91, 500),
          { type: "Feature", geometry: { type: "Point", coordinates: [8, 47] }, properties: { point: "B", time: "2024-05-01T12:00:00Z" } },
          feature("C", 8, 47, 500),
          feature("C", 8, 47, 501),
        ],
      },
      frame,
    );
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors.map((e) => e.field)).toEqual(["features[0].geometry.coordinates[1]", "features[1].geometry.coordinates", "features[3].properties.point"]);
  });

  it("parseEpochGeoJson refuses a body that is not a FeatureCollection, a non-Point geometry and a time without offset", () => {
    const a = parseEpochGeoJson({ type: "Feature" }, frame);
    expect(!a.ok && a.errors[0].field).toBe("type");
    const b = parseEpochGeoJson(
      { type: "FeatureCollection", features: [{ type: "Feature", geometry: { type: "LineString", coordinates: [] }, properties: { point: "A", time: "2024-05-01T12:00:00Z" } }, feature("B", 8, 47, 1, { time: "2024-05-01 12:00" })] },
      frame,
    );
    expect(!b.ok && b.errors.map((e) => e.field)).toEqual(["features[0].geometry", "features[1].properties.time"]);
  });

  it("parseEpochGeoJson uses the default time for features without properties.time", () => {
    const r = parseEpochGeoJson({ type: "FeatureCollection", features: [{ type: "Feature", geometry: { type: "Point", coordinates: [8, 47, 500] }, properties: { point: "A" } }] }, frame, { defaultTime: "2024-06-01T00:00:00Z" });
    expect(r.ok && r.epochs[0].time).toBe("2024-06-01T00:00:00.000Z");
  });
});
