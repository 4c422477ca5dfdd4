/**
 * The epoch CSV (lib/formats/epoch-csv.ts, domain.md §7) as ingest input: rows grouped into epochs by
 * time, in order of first appearance, each observation keeping its file line, and field names as the
 * header spells them (for messages such as `line 7, field "East"`).
 */
import { parseEpochCsv, normaliseIsoTime } from "../../formats/epoch-csv.ts";
import { tokenizeCsv } from "../../formats/csv.ts";
import type { EpochInput, EpochParseResult, InputError, ObservationInput, ObservationKey } from "../../formats/epoch-json.ts";

/** Header names as written, keyed by lower-case column name; found without tokenizing the whole file. */
export function headerNames(text: string): Map<string, string> {
  const names = new Map<string, string>();
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  let start = 0;
  while (start < src.length) {
    let end = src.indexOf("\n", start);
    if (end < 0) end = src.length;
    const line = src.slice(start, end).replace(/\r$/, "");
    const t = line.trim();
    if (t !== "" && !t.startsWith("#")) {
      const rec = tokenizeCsv(line).records[0];
      if (rec) for (const f of rec.fields) names.set(f.value.trim().toLowerCase(), f.value.trim());
      break;
    }
    start = end + 1;
  }
  return names;
}

const NUMBER_RE = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const BLANK_RE = /^[ \t]*$/;
const COMMENT_RE = /^[ \t]*#/;
const COLUMNS = new Set(["point", "east", "north", "height", "time", "sigma_east", "sigma_north", "sigma_height"]);

/**
 * Fast path for the common, clean file (no quotes, every row valid): a plain split instead of the
 * general tokenizer, times normalised once per distinct text. Returns null at the first thing it
 * does not handle or that is wrong; the caller then runs the full parser, which is the authority on
 * every message. So this never accepts what parseEpochCsv refuses (tested against it).
 */
export function parseCleanEpochCsv(text: string, defaultTime: string | null): EpochParseResult | null {
  if (text.includes('"')) return null;
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const lines = src.split(/\r\n|\n|\r/);
  let h = 0;
  while (h < lines.length && (BLANK_RE.test(lines[h]) || COMMENT_RE.test(lines[h]))) h++;
  if (h >= lines.length) return null;
  const names = lines[h].split(",").map((f) => f.trim());
  const col = new Map<string, number>();
  for (const [i, nm] of names.entries()) {
    const k = nm.toLowerCase();
    if (!COLUMNS.has(k) || col.has(k)) return null;
    col.set(k, i);
  }
  const cP = col.get("point"), cE = col.get("east"), cN = col.get("north"), cH = col.get("height");
  if (cP === undefined || cE === undefined || cN === undefined || cH === undefined) return null;
  const cT = col.get("time"), cSE = col.get("sigma_east"), cSN = col.get("sigma_north"), cSH = col.get("sigma_height");
  const width = names.length;
  const timeCache = new Map<string, string | null>();
  const byTime = new Map<string, { obs: ObservationInput[]; seen: Set<string> }>();
  const num = (v: string): number => {
    const t = v.trim();
    return NUMBER_RE.test(t) ? Number(t) : NaN;
  };
  const sigma = (f: string[], c: number | undefined): number | null | undefined => {
    if (c === undefined) return null;
    const t = f[c].trim();
    if (t === "") return null;
    const v = num(t);
    return Number.isFinite(v) && v > 0 ? v : undefined;
  };
  let rows = 0;
  for (let l = h + 1; l < lines.length; l++) {
    const line = lines[l];
    if (line === "" || BLANK_RE.test(line) || COMMENT_RE.test(line)) continue;
    const f = line.split(",");
    if (f.length !== width) return null;
    const point = f[cP].trim();
    const east = num(f[cE]), north = num(f[cN]), height = num(f[cH]);
    if (point === "" || !Number.isFinite(east) || !Number.isFinite(north) || !Number.isFinite(height)) return null;
    const se = sigma(f, cSE), sn = sigma(f, cSN), sh = sigma(f, cSH);
    if (se === undefined || sn === undefined || sh === undefined) return null;
    let time = defaultTime;
    if (cT !== undefined) {
      const raw = f[cT].trim();
      if (raw !== "") {
        let t = timeCache.get(raw);
        if (t === undefined) timeCache.set(raw, (t = normaliseIsoTime(raw)));
        if (t === null) return null;
        time = t;
      }
    }
    if (time === null) return null;
    let ep = byTime.get(time);
    if (!ep) byTime.set(time, (ep = { obs: [], seen: new Set() }));
    if (ep.seen.has(point)) return null;
    ep.seen.add(point);
    ep.obs.push({ point, east, north, height, sigmaEast: se, sigmaNorth: sn, sigmaHeight: sh, line: l + 1 });
    rows++;
  }
  if (rows === 0) return null;
  const nameOf = (key: string): string => names[col.get(key) ?? -1] ?? key;
  const timeName = nameOf("time");
  const fieldOf = (_i: number, key: ObservationKey): string => nameOf(key);
  const epochs: EpochInput[] = [];
  for (const [time, ep] of byTime) epochs.push({ time, timeAt: { line: ep.obs[0].line, field: timeName }, observations: ep.obs, fieldOf });
  return { ok: true, epochs };
}

export function parseEpochCsvInput(text: string, opts: { defaultTime?: string } = {}): EpochParseResult {
  let defaultTime: string | null = null;
  if (opts.defaultTime !== undefined) {
    defaultTime = normaliseIsoTime(opts.defaultTime);
    if (defaultTime === null) return { ok: false, errors: [{ line: null, field: "time", message: `?time= is not ISO 8601 with an offset or Z (e.g. 2024-03-01T08:15:00Z): ${JSON.stringify(opts.defaultTime)}` }] };
  }
  const fast = parseCleanEpochCsv(text, defaultTime);
  if (fast) return fast;
  const r = parseEpochCsv(text, opts.defaultTime === undefined ? {} : { defaultTime: opts.defaultTime });
  if (!r.ok) return { ok: false, errors: r.errors.map((e) => ({ line: e.line, field: e.field, message: e.message })) };
  const names = headerNames(text);
  const nameOf = (key: string): string => names.get(key) ?? key;
  const timeName = nameOf("time");
  const errors: InputError[] = [];
  const byTime = new Map<string, ObservationInput[]>();
  for (const row of r.rows) {
    if (row.time === null) {
      if (errors.length < 100) errors.push({ line: row.line, field: timeName, message: names.has("time") ? `${timeName} is empty and the request gives no ?time=` : "no time: add a time column or give ?time= in the request" });
      continue;
    }
    let list = byTime.get(row.time);
    if (!list) byTime.set(row.time, (list = []));
    list.push({ point: row.point, east: row.east, north: row.north, height: row.height, sigmaEast: row.sigmaEast, sigmaNorth: row.sigmaNorth, sigmaHeight: row.sigmaHeight, line: row.line });
  }
  if (r.rows.length === 0) errors.push({ line: 1, field: null, message: "the file has a header but no rows" });
  if (errors.length > 0) return { ok: false, errors };
  const fieldOf = (_i: number, key: ObservationKey): string => nameOf(key);
  const epochs: EpochInput[] = [];
  for (const [time, observations] of byTime) epochs.push({ time, timeAt: { line: observations[0].line, field: timeName }, observations, fieldOf });
  return { ok: true, epochs };
}
