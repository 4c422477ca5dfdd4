/**
 * GeoJSON builders of the data exports (RFC 7946). Pure: rows in, plain objects out (the caller
 * serialises them).
 *
 * Coordinates: RFC 7946 §4 allows only WGS84 longitude, latitude (degrees) and an optional height
 * (metres; we give the ellipsoidal height). A site with a geodetic origin has its local east-north-up
 * coordinates converted back with lib/geodesy/enu-inverse.ts (the inverse of what ingest does), so an
 * exported file posted to a site with the same origin gives the same local coordinates (to well
 * below 1 mm; longitude and latitude are rounded to 1e-10°, about 0.01 mm; heights to 0.01 mm).
 *
 * A site without an origin works in a local grid that GeoJSON cannot name (RFC 7946 removed the
 * `crs` member and forbids other reference systems). Its features then have `geometry: null` (an
 * "unlocated" feature, RFC 7946 §3.2) and carry the local coordinates in their properties:
 * `east_m`, `north_m`, `height_m` for observations and `local_coordinates` ([[E, N, H], …] metres)
 * for elements. The collection's foreign member `epochal.frame` says which case it is and
 * describes the local frame.
 *
 * Observation features use the property names the epoch GeoJSON reader (lib/formats/epoch-geojson.ts)
 * takes back: `point`, `time`, `sigma_east`, `sigma_north`, `sigma_height` (σ in metres, local frame).
 */
import type { EnuFrame } from "../geodesy/enu.ts";
import { enuToGeodetic } from "../geodesy/enu-inverse.ts";
import type { ExportObservation } from "./export-csv.ts";

export type Position = [number, number] | [number, number, number];
export type Geometry =
  | { type: "Point"; coordinates: Position }
  | { type: "LineString"; coordinates: Position[] }
  | { type: "Polygon"; coordinates: Position[][] }
  | { type: "MultiPoint"; coordinates: Position[] };
export interface Feature {
  type: "Feature";
  id?: string | number;
  geometry: Geometry | null;
  properties: Record<string, unknown>;
}
export interface FeatureCollection {
  type: "FeatureCollection";
  features: Feature[];
  /** Foreign member (RFC 7946 §6.1): what the file holds and in which frame. */
  epochal: ExportMeta;
}

export interface ExportSite {
  slug: string;
  name: string;
  frameDescription: string;
}
export interface ExportMeta {
  site: string;
  siteName: string;
  /** `wgs84`: geometries are lon/lat/h; `local`: geometry null, local coordinates in properties. */
  frame: "wgs84" | "local";
  frameDescription: string;
  origin: { latDeg: number; lonDeg: number; heightM: number } | null;
  note: string;
  /** Period of the export (ISO 8601 UTC), when it has one. */
  from?: string;
  to?: string;
}

const LONLAT_DIGITS = 1e10;
const HEIGHT_DIGITS = 1e5;
const round = (v: number, f: number): number => Math.round(v * f) / f;

/** RFC 7946 position [lon, lat, h] of a local E, N, H point about the frame's origin. */
export function localToPosition(frame: EnuFrame, eastM: number, northM: number, heightM: number): [number, number, number] {
  const g = enuToGeodetic(frame, [eastM, northM, heightM]);
  return [round(g.lonDeg, LONLAT_DIGITS), round(g.latDeg, LONLAT_DIGITS), round(g.heightM, HEIGHT_DIGITS)];
}

function meta(site: ExportSite, frame: EnuFrame | null, what: string, period?: { fromMs: number; toMs: number }): ExportMeta {
  return {
    site: site.slug,
    siteName: site.name,
    frame: frame ? "wgs84" : "local",
    frameDescription: site.frameDescription,
    origin: frame ? { ...frame.origin } : null,
    note: frame
      ? `${what}: geometries are WGS84 longitude, latitude (degrees) and ellipsoidal height (m), converted from the site's local east-north-up frame about its origin; local coordinates are also given in the properties (metres).`
      : `${what}: the site has no geodetic origin, so positions cannot be given in WGS84 (the only reference system RFC 7946 allows); geometries are null and the local coordinates (metres, ${site.frameDescription}) are in the properties.`,
    ...(period ? { from: new Date(period.fromMs).toISOString(), to: new Date(period.toMs).toISOString() } : {}),
  };
}

/** One Point feature per observation. */
export function observationsGeoJson(site: ExportSite, frame: EnuFrame | null, rows: readonly ExportObservation[], period?: { fromMs: number; toMs: number }): FeatureCollection {
  const features: Feature[] = rows.map((o) => ({
    type: "Feature",
    geometry: frame ? { type: "Point", coordinates: localToPosition(frame, o.eastM, o.northM, o.heightM) } : null,
    properties: {
      point: o.point,
      time: new Date(o.timeMs).toISOString(),
      east_m: o.eastM,
      north_m: o.northM,
      height_m: o.heightM,
      sigma_east: o.sigmaEastM,
      sigma_north: o.sigmaNorthM,
      sigma_height: o.sigmaHeightM,
    },
  }));
  return { type: "FeatureCollection", features, epochal: meta(site, frame, "observations", period) };
}

export interface ExportElement {
  id: number;
  name: string;
  label: string;
  kind: string;
  mode: string;
  pointCodes: readonly string[];
  /** Values at the end of the period (dimensionless strain), or null when the element has none. */
  latest: {
    timeMs: number;
    status: string;
    greenMax: number | null;
    greenMin: number | null;
    maxShear: number | null;
    arealStrain: number | null;
    engineering: number | null;
    sigmaGreenMax: number | null;
    sigmaEngineering: number | null;
  } | null;
}

export interface LocalPoint {
  east: number;
  north: number;
  height: number;
}

/** Twice the signed area of a ring in plan (E, N): positive when counter-clockwise. */
function signedArea2(pts: readonly LocalPoint[]): number {
  let s = 0;
  for (let i = 0; i < pts.length; i++) {
    const a = pts[i];
    const b = pts[(i + 1) % pts.length];
    s += a.east * b.north - b.east * a.north;
  }
  return s;
}

const micro = (v: number | null | undefined): number | null => (v === null || v === undefined || !Number.isFinite(v) ? null : v * 1e6);

/**
 * Elements: a triangle is a Polygon (exterior ring counter-clockwise, first position repeated last,
 * RFC 7946 §3.1.6), a baseline a LineString, a group a MultiPoint. An element with a point that has
 * no known position gets `geometry: null` and lists the missing codes.
 */
export function elementsGeoJson(site: ExportSite, frame: EnuFrame | null, elements: readonly ExportElement[], positions: ReadonlyMap<string, LocalPoint>, period?: { fromMs: number; toMs: number }): FeatureCollection {
  const features: Feature[] = elements.map((el) => {
    const missing = el.pointCodes.filter((c) => !positions.has(c));
    let pts = el.pointCodes.filter((c) => positions.has(c)).map((c) => positions.get(c) as LocalPoint);
    let codes = [...el.pointCodes];
    if (el.kind === "triangle" && missing.length === 0 && signedArea2(pts) < 0) {
      pts = [pts[0], pts[2], pts[1]];
      codes = [codes[0], codes[2], codes[1]];
    }
    const pos = frame ? pts.map((p) => localToPosition(frame, p.east, p.north, p.height)) : [];
    let geometry: Geometry | null = null;
    if (frame && missing.length === 0) {
      if (el.kind === "triangle") geometry = { type: "Polygon", coordinates: [[...pos, pos[0]]] };
      else if (el.kind === "baseline") geometry = { type: "LineString", coordinates: pos };
      else geometry = { type: "MultiPoint", coordinates: pos };
    }
    const l = el.latest;
    return {
      type: "Feature",
      id: el.id,
      geometry,
      properties: {
        element: el.name,
        label: el.label,
        kind: el.kind,
        mode: el.mode,
        points: el.kind === "triangle" && missing.length === 0 ? codes : [...el.pointCodes],
        local_coordinates: missing.length === 0 ? pts.map((p) => [p.east, p.north, p.height]) : null,
        ...(missing.length ? { missing_points: missing } : {}),
        time: l ? new Date(l.timeMs).toISOString() : null,
        status: l?.status ?? null,
        green_max_microstrain: micro(l?.greenMax),
        sigma_green_max_microstrain: micro(l?.sigmaGreenMax),
        green_min_microstrain: micro(l?.greenMin),
        max_shear_microstrain: micro(l?.maxShear),
        areal_strain_microstrain: micro(l?.arealStrain),
        engineering_microstrain: micro(l?.engineering),
        sigma_engineering_microstrain: micro(l?.sigmaEngineering),
      },
    };
  });
  return { type: "FeatureCollection", features, epochal: meta(site, frame, "elements at their reference positions, values at the end of the period", period) };
}
