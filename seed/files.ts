/**
 * The scenario as files, for trying the upload page and the command line by hand: epoch files in CSV,
 * JSON or GeoJSON (the formats ingest reads, domain.md §7 and lib/formats/), plus points.csv,
 * elements.csv (the `epochal strain --elements` format) and site.json. Pure: scenario in, a list of
 * { path, text } out; the command writes them.
 */
import { WGS84_A_M, WGS84_E2, enuFrame, type EnuFrame } from "../lib/geodesy/enu.ts";
import type { Scenario, ScenarioEpoch } from "./scenario.ts";

export const FILE_FORMATS = ["csv", "json", "geojson"] as const;
export type FileFormat = (typeof FILE_FORMATS)[number];

export interface OutputFile {
  /** Relative path with "/" separators. */
  path: string;
  text: string;
}

const DEG = 180 / Math.PI;

/**
 * WGS84 latitude, longitude (degrees) and ellipsoidal height (m) of a local east-north-up position:
 * ENU → ECEF by the transposed rotation, then ECEF → geodetic by fixed-point iteration on φ
 * (Hofmann-Wellenhof, Lichtenegger & Wasle, *GNSS*, 2008, the iterative inverse; ten rounds reach
 * far below 0.1 mm at a few kilometres from the origin).
 */
export function enuToGeodetic(frame: EnuFrame, e: number, n: number, u: number): { latDeg: number; lonDeg: number; heightM: number } {
  const [re, rn, ru] = frame.r;
  const x = frame.originEcef[0] + re[0] * e + rn[0] * n + ru[0] * u;
  const y = frame.originEcef[1] + re[1] * e + rn[1] * n + ru[1] * u;
  const z = frame.originEcef[2] + re[2] * e + rn[2] * n + ru[2] * u;
  const p = Math.hypot(x, y);
  let phi = Math.atan2(z, p * (1 - WGS84_E2));
  let h = 0;
  for (let k = 0; k < 10; k++) {
    const s = Math.sin(phi);
    const bigN = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * s * s);
    h = p / Math.cos(phi) - bigN;
    phi = Math.atan2(z, p * (1 - (WGS84_E2 * bigN) / (bigN + h)));
  }
  return { latDeg: phi * DEG, lonDeg: Math.atan2(y, x) * DEG, heightM: h };
}

function csvField(s: string): string {
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** File-name stamp of an epoch time: 2026-06-01T06:00:00.000Z → 20260601T0600Z. */
export function timeStamp(iso: string): string {
  return iso.slice(0, 16).replace(/[-:]/g, "") + "Z";
}

function hasSigma(epoch: ScenarioEpoch): boolean {
  return epoch.observations.some((o) => o.sigmaEast !== undefined);
}

/** σ keys of an observation as the JSON and GeoJSON formats spell them (absent when not given). */
function sigmaKeys(o: ScenarioEpoch["observations"][number]): Record<string, number> {
  return o.sigmaEast === undefined ? {} : { sigma_east: o.sigmaEast, sigma_north: o.sigmaNorth ?? o.sigmaEast, sigma_height: o.sigmaHeight ?? o.sigmaEast };
}

export function epochCsv(epoch: ScenarioEpoch): string {
  const withSigma = hasSigma(epoch);
  const sig = (v: number | undefined) => (v === undefined ? "" : String(v));
  const rows = epoch.observations.map(
    (o) => `${o.point},${o.east.toFixed(4)},${o.north.toFixed(4)},${o.height.toFixed(4)},${epoch.time}${withSigma ? `,${sig(o.sigmaEast)},${sig(o.sigmaNorth)},${sig(o.sigmaHeight)}` : ""}`,
  );
  return [`point,east,north,height,time${withSigma ? ",sigma_east,sigma_north,sigma_height" : ""}`, ...rows].join("\n") + "\n";
}

export function epochJson(epoch: ScenarioEpoch): string {
  return JSON.stringify({ time: epoch.time, observations: epoch.observations.map((o) => ({ point: o.point, east: o.east, north: o.north, height: o.height, ...sigmaKeys(o) })) }, null, 1) + "\n";
}

export function epochGeoJson(epoch: ScenarioEpoch, frame: EnuFrame): string {
  const features = epoch.observations.map((o) => {
    const g = enuToGeodetic(frame, o.east, o.north, o.height);
    return {
      type: "Feature",
      geometry: { type: "Point", coordinates: [Number(g.lonDeg.toFixed(10)), Number(g.latDeg.toFixed(10)), Number(g.heightM.toFixed(4))] },
      properties: { point: o.point, time: epoch.time, ...sigmaKeys(o) },
    };
  });
  return JSON.stringify({ type: "FeatureCollection", features }) + "\n";
}

export function scenarioFiles(sc: Scenario, format: FileFormat): OutputFile[] {
  const frame = enuFrame({ latDeg: sc.site.originLatDeg, lonDeg: sc.site.originLonDeg, heightM: sc.site.originHeightM });
  const ext = format === "csv" ? "csv" : format === "json" ? "json" : "geojson";
  const files: OutputFile[] = sc.epochs.map((ep, k) => ({
    path: `epochs/epoch-${String(k + 1).padStart(4, "0")}-${timeStamp(ep.time)}.${ext}`,
    text: format === "csv" ? epochCsv(ep) : format === "json" ? epochJson(ep) : epochGeoJson(ep, frame),
  }));
  files.push({
    path: "points.csv",
    text: ["point,group,is_reference,east,north,height,note", ...sc.points.map((p) => [p.code, p.group, String(p.isReference), p.east.toFixed(4), p.north.toFixed(4), p.height.toFixed(4), csvField(p.note ?? "")].join(","))].join("\n") + "\n",
  });
  files.push({
    path: "elements.csv",
    text: ["element,kind,points,mode", ...sc.elements.map((e) => `${e.name},${e.kind},${e.pointCodes.join(" ")},${e.mode}`)].join("\n") + "\n",
  });
  files.push({ path: "site.json", text: JSON.stringify({ ...sc.site, seed: sc.seed, epochs: sc.epochs.length, events: sc.events }, null, 2) + "\n" });
  return files;
}
