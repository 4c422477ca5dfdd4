/**
 * Epoch JSON parser, and the format-neutral epoch input that the CSV, JSON and GeoJSON parsers all
 * produce for ingest. Pure: a parsed JSON value (or its text) in, epochs or field errors out.
 *
 *   { "time": "2024-03-01T08:15:00Z",
 *     "observations": [ { "point": "P1", "east": 1.0, "north": 2.0, "height": 3.0,
 *                         "sigma_east": 0.001, "sigma_north": 0.001, "sigma_height": 0.0015 } ] }
 *
 * or, for a backfill, `{ "epochs": [ { "time": …, "observations": […] }, … ] }`. Coordinates and σ in
 * metres; σ optional (absent or null: the site's default); `time` ISO 8601 with an offset or `Z`
 * (normalised to UTC, millisecond resolution), or absent when the caller gives a default time.
 * Unknown keys are errors (a misspelt `sigma_est` must not silently become the default σ).
 * Errors have `line: null` and `field` the path, e.g. `observations[3].east` or
 * `epochs[2].observations[0].point`.
 */
import { normaliseIsoTime } from "./epoch-csv.ts";

export const OBSERVATION_KEYS = ["point", "east", "north", "height", "sigma_east", "sigma_north", "sigma_height"] as const;
export type ObservationKey = (typeof OBSERVATION_KEYS)[number];

/** One point's coordinates in one epoch, metres; σ null means "not given". */
export interface ObservationInput {
  point: string;
  east: number;
  north: number;
  height: number;
  sigmaEast: number | null;
  sigmaNorth: number | null;
  sigmaHeight: number | null;
  /** 1-based line in the file (CSV), or null (JSON, GeoJSON). */
  line: number | null;
}

/** Where a value came from, for messages: a file line (or null) and a column name or path. */
export interface SourceRef {
  line: number | null;
  field: string | null;
}
export interface InputError extends SourceRef {
  message: string;
}

/** One epoch as any parser hands it to ingest. */
export interface EpochInput {
  /** UTC ISO 8601, `YYYY-MM-DDTHH:MM:SS.sssZ`. */
  time: string;
  timeAt: SourceRef;
  observations: ObservationInput[];
  /** The field of observation `i`'s `key` as the input spells it: a header name (CSV) or a path (JSON). */
  fieldOf: (i: number, key: ObservationKey) => string;
}

export type EpochParseResult = { ok: true; epochs: EpochInput[] } | { ok: false; errors: InputError[] };

export const MAX_JSON_ERRORS = 100;

export interface EpochJsonOptions {
  /** Time for epochs that give none (e.g. the request's `?time=`), ISO 8601 with an offset or Z. */
  defaultTime?: string;
}

const TOP_KEYS_SINGLE = ["time", "observations"];
const TOP_KEYS_BATCH = ["epochs"];

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

function describe(v: unknown): string {
  if (v === null) return "null";
  if (Array.isArray(v)) return "an array";
  if (typeof v === "string") return `a string ${JSON.stringify(v.length > 40 ? v.slice(0, 40) + "…" : v)}`;
  return typeof v === "object" ? "an object" : `${typeof v} ${String(v)}`;
}

/** Text → JSON value → epochs; a syntax error is one error naming the line when the engine says where. */
export function parseEpochJsonText(text: string, opts: EpochJsonOptions = {}): EpochParseResult {
  const parsed = parseJsonText(text);
  if (!parsed.ok) return { ok: false, errors: [parsed.error] };
  return parseEpochJson(parsed.value, opts);
}

/** JSON.parse with a readable error; `line` is filled when the position is known. */
export function parseJsonText(text: string): { ok: true; value: unknown } | { ok: false; error: InputError } {
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  try {
    return { ok: true, value: JSON.parse(src) as unknown };
  } catch (err) {
    const msg = (err as Error).message;
    let line: number | null = null;
    const at = locateJsonError(src);
    if (at !== null) line = src.slice(0, at).split("\n").length;
    return { ok: false, error: { line, field: null, message: `not valid JSON${line === null ? "" : ` (line ${line})`}: ${msg}` } };
  }
}

/**
 * Offset of the first JSON syntax error in `src` (RFC 8259 grammar), or null when it is valid.
 * JSON.parse in Node 20 does not always say where it failed; surveyors need the line.
 */
export function locateJsonError(src: string): number | null {
  let i = 0;
  const n = src.length;
  const ws = (): void => {
    while (i < n && (src[i] === " " || src[i] === "\t" || src[i] === "\n" || src[i] === "\r")) i++;
  };
  const NUM = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
  const STR = /"(?:[^"\\\u0000-\u001f]|\\(?:["\\/bfnrt]|u[0-9a-fA-F]{4}))*"/y;
  class Stop extends Error {}
  const fail = (): never => {
    throw new Stop();
  };
  const value = (depth: number): void => {
    if (depth > 512) fail();
    ws();
    const c = src[i];
    if (c === "{") {
      i++;
      ws();
      if (src[i] === "}") {
        i++;
        return;
      }
      for (;;) {
        ws();
        STR.lastIndex = i;
        if (!STR.test(src)) fail();
        i = STR.lastIndex;
        ws();
        if (src[i] !== ":") fail();
        i++;
        value(depth + 1);
        ws();
        if (src[i] === ",") i++;
        else if (src[i] === "}") {
          i++;
          return;
        } else fail();
      }
    } else if (c === "[") {
      i++;
      ws();
      if (src[i] === "]") {
        i++;
        return;
      }
      for (;;) {
        value(depth + 1);
        ws();
        if (src[i] === ",") i++;
        else if (src[i] === "]") {
          i++;
          return;
        } else fail();
      }
    } else if (c === '"') {
      STR.lastIndex = i;
      if (!STR.test(src)) fail();
      i = STR.lastIndex;
    } else if (src.startsWith("true", i)) i += 4;
    else if (src.startsWith("false", i)) i += 5;
    else if (src.startsWith("null", i)) i += 4;
    else {
      NUM.lastIndex = i;
      if (!NUM.test(src)) fail();
      i = NUM.lastIndex;
    }
  };
  try {
    value(0);
    ws();
    return i === n ? null : i;
  } catch (e) {
    if (e instanceof Stop) return i;
    throw e;
  }
}

export function parseEpochJson(value: unknown, opts: EpochJsonOptions = {}): EpochParseResult {
  let defaultTime: string | null = null;
  if (opts.defaultTime !== undefined) {
    defaultTime = normaliseIsoTime(opts.defaultTime);
    if (defaultTime === null) throw new RangeError(`parseEpochJson: defaultTime is not ISO 8601 with an offset or Z: ${opts.defaultTime}`);
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

  if (!isObject(value)) {
    report(null, `the body must be a JSON object { "time", "observations" } or { "epochs": [...] }, got ${describe(value)}`);
    return fail();
  }
  let items: { raw: unknown; prefix: string }[];
  if ("epochs" in value) {
    for (const k of Object.keys(value)) if (!TOP_KEYS_BATCH.includes(k)) report(k, `unknown key ${JSON.stringify(k)}: a backfill body holds only "epochs"`);
    const list = value.epochs;
    if (!Array.isArray(list)) {
      report("epochs", `epochs must be an array of { time, observations }, got ${describe(list)}`);
      return fail();
    }
    if (list.length === 0) report("epochs", "epochs is empty");
    items = list.map((raw, i) => ({ raw, prefix: `epochs[${i}].` }));
  } else items = [{ raw: value, prefix: "" }];

  const epochs: EpochInput[] = [];
  const timeFirstSeen = new Map<string, string>();
  for (const { raw, prefix } of items) {
    const where = prefix === "" ? null : prefix.slice(0, -1);
    if (!isObject(raw)) {
      report(where, `${where} must be an object { time, observations }, got ${describe(raw)}`);
      continue;
    }
    for (const k of Object.keys(raw)) if (!TOP_KEYS_SINGLE.includes(k)) report(`${prefix}${k}`, `unknown key ${JSON.stringify(k)} (allowed: time, observations)`);
    // Time.
    let time: string | null = defaultTime;
    const timeField = `${prefix}time`;
    if (raw.time !== undefined && raw.time !== null) {
      if (typeof raw.time !== "string") report(timeField, `${timeField} must be an ISO 8601 string with an offset or Z, got ${describe(raw.time)}`);
      else {
        time = normaliseIsoTime(raw.time);
        if (time === null) report(timeField, `${timeField} is not ISO 8601 with an offset or Z (e.g. 2024-03-01T08:15:00Z): ${JSON.stringify(raw.time)}`);
      }
    } else if (time === null) report(timeField, `${timeField} is missing: give "time" in the body or ?time= in the request`);
    if (time !== null) {
      const first = timeFirstSeen.get(time);
      if (first !== undefined) report(timeField, `two epochs at the same time ${time} (also ${first})`);
      else timeFirstSeen.set(time, timeField);
    }
    // Observations.
    const obsField = `${prefix}observations`;
    const list = raw.observations;
    if (!Array.isArray(list)) {
      report(obsField, `${obsField} must be an array of { point, east, north, height }, got ${describe(list)}`);
      continue;
    }
    if (list.length === 0) report(obsField, `${obsField} is empty`);
    const observations: ObservationInput[] = [];
    const seen = new Map<string, number>();
    list.forEach((o, i) => {
      const at = `${obsField}[${i}]`;
      if (!isObject(o)) {
        report(at, `${at} must be an object { point, east, north, height }, got ${describe(o)}`);
        return;
      }
      let bad = false;
      for (const k of Object.keys(o))
        if (!(OBSERVATION_KEYS as readonly string[]).includes(k)) {
          report(`${at}.${k}`, `unknown key ${JSON.stringify(k)} (allowed: ${OBSERVATION_KEYS.join(", ")})`);
          bad = true;
        }
      let point = "";
      const p = o.point;
      if (typeof p === "string" && p.trim() !== "") point = p.trim();
      else if (typeof p === "number" && Number.isInteger(p)) point = String(p);
      else {
        report(`${at}.point`, p === undefined ? `${at}.point is missing` : `${at}.point must be a non-empty string, got ${describe(p)}`);
        bad = true;
      }
      const coord = (k: "east" | "north" | "height"): number => {
        const v = o[k];
        if (typeof v === "number" && Number.isFinite(v)) return v;
        report(`${at}.${k}`, v === undefined ? `${at}.${k} is missing` : `${at}.${k} must be a finite number of metres, got ${describe(v)}`);
        bad = true;
        return NaN;
      };
      const sigma = (k: "sigma_east" | "sigma_north" | "sigma_height"): number | null => {
        const v = o[k];
        if (v === undefined || v === null) return null;
        if (typeof v === "number" && Number.isFinite(v) && v > 0) return v;
        report(`${at}.${k}`, typeof v === "number" ? `${at}.${k} must be > 0 metres, got ${v}` : `${at}.${k} must be a number of metres > 0, got ${describe(v)}`);
        bad = true;
        return null;
      };
      const east = coord("east");
      const north = coord("north");
      const height = coord("height");
      const sigmaEast = sigma("sigma_east");
      const sigmaNorth = sigma("sigma_north");
      const sigmaHeight = sigma("sigma_height");
      if (point !== "") {
        const first = seen.get(point);
        if (first !== undefined) {
          report(`${at}.point`, `point ${JSON.stringify(point)} appears twice in one epoch (first at ${obsField}[${first}])`);
          bad = true;
        } else seen.set(point, i);
      }
      if (!bad) observations.push({ point, east, north, height, sigmaEast, sigmaNorth, sigmaHeight, line: null });
    });
    if (time !== null && observations.length === list.length) {
      epochs.push({ time, timeAt: { line: null, field: timeField }, observations, fieldOf: (i, key) => `${obsField}[${i}].${key}` });
    }
  }
  if (errors.length > 0) return fail();
  return { ok: true, epochs };
}
