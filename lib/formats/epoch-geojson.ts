/**
 * Epoch GeoJSON parser: an RFC 7946 FeatureCollection of Point features in WGS84,
 * `coordinates: [longitude°, latitude°, ellipsoidal height m]` (RFC 7946 §3.1.1: longitude first), with
 * `properties.point` (code) and `properties.time` (ISO 8601 with an offset or Z; or the caller's default),
 * optional `properties.sigma_east|sigma_north|sigma_height` (metres, in the local frame).
 * Each position is converted to the site's local east-north-up frame about its fixed origin
 * (lib/geodesy/enu.ts). Features at several times are several epochs (a backfill).
 *
 * Other properties are ignored (GeoJSON producers add their own); a height is required, since
 * strain in 3D and surface mode needs it and a silent 0 would be wrong. Errors have `line: null` and
 * `field` the path, e.g. `features[3].geometry.coordinates[1]`.
 */
import { normaliseIsoTime } from "./epoch-csv.ts";
import { geodeticToEnu, type EnuFrame } from "../geodesy/enu.ts";
import { MAX_JSON_ERRORS, parseJsonText, type EpochInput, type EpochParseResult, type InputError, type ObservationInput, type ObservationKey } from "./epoch-json.ts";

export interface EpochGeoJsonOptions {
  defaultTime?: string;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

function describe(v: unknown): string {
  if (v === null) return "null";
  if (Array.isArray(v)) return "an array";
  if (typeof v === "string") return `a string ${JSON.stringify(v.length > 40 ? v.slice(0, 40) + "…" : v)}`;
  return typeof v === "object" ? "an object" : `${typeof v} ${String(v)}`;
}

export function parseEpochGeoJsonText(text: string, frame: EnuFrame, opts: EpochGeoJsonOptions = {}): EpochParseResult {
  const parsed = parseJsonText(text);
  if (!parsed.ok) return { ok: false, errors: [parsed.error] };
  return parseEpochGeoJson(parsed.value, frame, opts);
}

export function parseEpochGeoJson(value: unknown, frame: EnuFrame, opts: EpochGeoJsonOptions = {}): EpochParseResult {
  let defaultTime: string | null = null;
  if (opts.defaultTime !== undefined) {
    defaultTime = normaliseIsoTime(opts.defaultTime);
    if (defaultTime === null) throw new RangeError(`parseEpochGeoJson: defaultTime is not ISO 8601 with an offset or Z: ${opts.defaultTime}`);
  }
  const errors: InputError[] = [];
  let dropped = 0;
  const report = (field: string | null, message: string): void => {
    if (errors.length < MAX_JSON_ERRORS) errors.push({ line: null, field, message });
    else dropped++;
  };
  const fail = (): EpochParseResult => {
    if (dropped > 0) errors.push({ line: null, field: null, message: `${dropped} more error${dropped === 1 ? "" : "s"} not shown` });
    return { ok: false, errors };
  };
  if (!isObject(value) || value.type !== "FeatureCollection") {
    report(isObject(value) ? "type" : null, `the body must be a GeoJSON FeatureCollection (RFC 7946), got ${isObject(value) ? `type ${describe(value.type)}` : describe(value)}`);
    return fail();
  }
  const features = value.features;
  if (!Array.isArray(features)) {
    report("features", `features must be an array, got ${describe(features)}`);
    return fail();
  }
  if (features.length === 0) report("features", "features is empty");

  // Epochs by time, in order of first appearance; each observation remembers its feature index.
  const byTime = new Map<string, { obs: ObservationInput[]; featureIndex: number[]; seen: Map<string, number>; firstTimeField: string }>();
  features.forEach((f, i) => {
    const at = `features[${i}]`;
    if (!isObject(f) || f.type !== "Feature") {
      report(at, `${at} must be a GeoJSON Feature, got ${isObject(f) ? `type ${describe(f.type)}` : describe(f)}`);
      return;
    }
    let bad = false;
    const g = f.geometry;
    let lon = NaN, lat = NaN, h = NaN;
    if (!isObject(g) || g.type !== "Point") {
      report(`${at}.geometry`, `${at}.geometry must be a Point, got ${isObject(g) ? `type ${describe(g.type)}` : describe(g)}`);
      bad = true;
    } else {
      const c = g.coordinates;
      if (!Array.isArray(c) || c.length !== 3) {
        report(`${at}.geometry.coordinates`, `${at}.geometry.coordinates must be [longitude, latitude, ellipsoidal height], got ${Array.isArray(c) ? `${c.length} numbers` : describe(c)}`);
        bad = true;
      } else {
        const names = ["longitude", "latitude", "ellipsoidal height"];
        const limits = [180, 90, Infinity];
        const vals = c.map((v: unknown, k: number) => {
          const field = `${at}.geometry.coordinates[${k}]`;
          if (typeof v !== "number" || !Number.isFinite(v)) {
            report(field, `${names[k]} must be a finite number, got ${describe(v)}`);
            bad = true;
            return NaN;
          }
          if (Math.abs(v) > limits[k]) {
            report(field, `${names[k]} must be within ±${limits[k]}°, got ${v}`);
            bad = true;
          }
          return v;
        });
        [lon, lat, h] = vals;
      }
    }
    const props = f.properties;
    if (!isObject(props)) {
      report(`${at}.properties`, `${at}.properties must be an object with "point" and "time", got ${describe(props)}`);
      return;
    }
    let point = "";
    const p = props.point;
    if (typeof p === "string" && p.trim() !== "") point = p.trim();
    else if (typeof p === "number" && Number.isInteger(p)) point = String(p);
    else {
      report(`${at}.properties.point`, p === undefined ? `${at}.properties.point is missing` : `${at}.properties.point must be a non-empty string, got ${describe(p)}`);
      bad = true;
    }
    let time = defaultTime;
    const timeField = `${at}.properties.time`;
    if (props.time !== undefined && props.time !== null) {
      time = typeof props.time === "string" ? normaliseIsoTime(props.time) : null;
      if (time === null) {
        report(timeField, `${timeField} is not ISO 8601 with an offset or Z (e.g. 2024-03-01T08:15:00Z): ${describe(props.time)}`);
        bad = true;
      }
    } else if (time === null) {
      report(timeField, `${timeField} is missing: give properties.time or ?time= in the request`);
      bad = true;
    }
    const sigma = (k: "sigma_east" | "sigma_north" | "sigma_height"): number | null => {
      const v = props[k];
      if (v === undefined || v === null) return null;
      if (typeof v === "number" && Number.isFinite(v) && v > 0) return v;
      report(`${at}.properties.${k}`, `${at}.properties.${k} must be a number of metres > 0, got ${describe(v)}`);
      bad = true;
      return null;
    };
    const sigmaEast = sigma("sigma_east");
    const sigmaNorth = sigma("sigma_north");
    const sigmaHeight = sigma("sigma_height");
    if (time === null) return;
    let ep = byTime.get(time);
    if (!ep) {
      ep = { obs: [], featureIndex: [], seen: new Map(), firstTimeField: timeField };
      byTime.set(time, ep);
    }
    if (point !== "") {
      const first = ep.seen.get(point);
      if (first !== undefined) {
        report(`${at}.properties.point`, `point ${JSON.stringify(point)} appears twice in one epoch (time ${time}; first at features[${first}])`);
        bad = true;
      } else ep.seen.set(point, i);
    }
    if (bad) return;
    const [east, north, height] = geodeticToEnu(frame, { latDeg: lat, lonDeg: lon, heightM: h });
    ep.obs.push({ point, east, north, height, sigmaEast, sigmaNorth, sigmaHeight, line: null });
    ep.featureIndex.push(i);
  });
  if (errors.length > 0) return fail();
  const epochs: EpochInput[] = [];
  for (const [time, ep] of byTime) {
    const idx = ep.featureIndex;
    const fieldOf = (i: number, key: ObservationKey): string => {
      const at = `features[${idx[i]}]`;
      if (key === "point" || key.startsWith("sigma_")) return `${at}.properties.${key}`;
      return `${at}.geometry.coordinates`;
    };
    epochs.push({ time, timeAt: { line: null, field: ep.firstTimeField }, observations: ep.obs, fieldOf });
  }
  return { ok: true, epochs };
}
