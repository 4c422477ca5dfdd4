/**
 * The scenario written as files reads back through the project's own parsers (lib/formats/) to the
 * same coordinates: CSV and JSON exactly, GeoJSON within 0.1 mm after the WGS84 round trip.
 */
import { describe, expect, it } from "vitest";
import { generateScenario } from "../../../seed/scenario.ts";
import { enuToGeodetic, scenarioFiles, timeStamp } from "../../../seed/files.ts";
import { parseEpochCsv } from "../../../lib/formats/epoch-csv.ts";
import { parseEpochJsonText } from "../../../lib/formats/epoch-json.ts";
import { parseEpochGeoJsonText } from "../../../lib/formats/epoch-geojson.ts";
import { parseElementsCsv } from "../../../lib/formats/elements-csv.ts";
import { enuFrame, geodeticToEnu } from "../../../lib/geodesy/enu.ts";

const sc = generateScenario({ epochs: 6 });
const frame = enuFrame({ latDeg: sc.site.originLatDeg, lonDeg: sc.site.originLonDeg, heightM: sc.site.originHeightM });

describe("scenarioFiles", () => {
  it("scenarioFiles(csv) writes one epoch file per epoch that parseEpochCsv reads back exactly", () => {
    const files = scenarioFiles(sc, "csv");
    const epochs = files.filter((f) => f.path.startsWith("epochs/"));
    expect(epochs).toHaveLength(6);
    expect(epochs[1].path).toBe(`epochs/epoch-0002-${timeStamp(sc.epochs[1].time)}.csv`);
    const r = parseEpochCsv(epochs[1].text);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    expect(r.rows).toHaveLength(sc.epochs[1].observations.length);
    expect(r.rows[3]).toMatchObject({ ...sc.epochs[1].observations[3], time: sc.epochs[1].time });
    const first = parseEpochCsv(epochs[0].text);
    if (!first.ok) throw new Error(JSON.stringify(first.errors));
    expect(first.rows[0]).toMatchObject({ sigmaEast: sc.epochs[0].observations[0].sigmaEast, sigmaHeight: sc.epochs[0].observations[0].sigmaHeight });
  });

  it("scenarioFiles(json) round-trips through parseEpochJsonText", () => {
    const f = scenarioFiles(sc, "json").find((x) => x.path.startsWith("epochs/epoch-0003"))!;
    const r = parseEpochJsonText(f.text);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    expect(r.epochs[0].time).toBe(sc.epochs[2].time);
    expect(r.epochs[0].observations.map((o) => [o.point, o.east, o.north, o.height])).toEqual(sc.epochs[2].observations.map((o) => [o.point, o.east, o.north, o.height]));
  });

  it("scenarioFiles(geojson) gives WGS84 positions that come back to the local grid within 0.1 mm", () => {
    const f = scenarioFiles(sc, "geojson").find((x) => x.path.startsWith("epochs/epoch-0001"))!;
    const r = parseEpochGeoJsonText(f.text, frame);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    const obs = sc.epochs[0].observations;
    expect(r.epochs[0].observations).toHaveLength(obs.length);
    r.epochs[0].observations.forEach((o, k) => {
      expect(o.point).toBe(obs[k].point);
      expect(Math.abs(o.east - obs[k].east)).toBeLessThan(1e-4);
      expect(Math.abs(o.north - obs[k].north)).toBeLessThan(1e-4);
      expect(Math.abs(o.height - obs[k].height)).toBeLessThan(1e-4);
    });
  });

  it("enuToGeodetic inverts geodeticToEnu to 1e-6 m at 5 km from the origin", () => {
    const g = enuToGeodetic(frame, 4321.1234, -5012.5, 37.25);
    const back = geodeticToEnu(frame, g);
    expect(Math.abs(back[0] - 4321.1234)).toBeLessThan(1e-6);
    expect(Math.abs(back[1] + 5012.5)).toBeLessThan(1e-6);
    expect(Math.abs(back[2] - 37.25)).toBeLessThan(1e-6);
  });

  it("scenarioFiles writes elements.csv that parseElementsCsv accepts, and points.csv and site.json", () => {
    const files = scenarioFiles(sc, "csv");
    const el = files.find((f) => f.path === "elements.csv")!;
    const r = parseElementsCsv(el.text);
    expect(r.ok).toBe(true);
    const pts = files.find((f) => f.path === "points.csv")!.text.trim().split("\n");
    expect(pts.length - 1).toBe(sc.points.length);
    const site = JSON.parse(files.find((f) => f.path === "site.json")!.text) as { slug: string; epochs: number };
    expect(site).toMatchObject({ slug: sc.site.slug, epochs: 6 });
  });
});
