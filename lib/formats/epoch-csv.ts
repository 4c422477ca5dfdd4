/**
 * Epoch CSV parser (domain.md §7), shared by the command line and HTTP ingest. Pure: text in, result out.
 *
 *   point,east,north,height[,time][,sigma_east][,sigma_north][,sigma_height]
 *
 * Columns are matched by name, case-insensitively, in any order; any other column is an error.
 * Coordinates and σ in metres; σ must be > 0; empty σ means "not given" (null). `time` is ISO 8601 with
 * an offset or `Z` and comes back normalised to UTC (`YYYY-MM-DDTHH:MM:SS.sssZ`, millisecond
 * resolution); an empty time takes `opts.defaultTime`, else null. Several times in one file are several
 * epochs; a point may appear once per time. Every error names the 1-based line as an editor shows it
 * (the header is line 1 unless comments precede it) and the field as the header spells it; all errors
 * are reported, up to MAX_ERRORS plus one line saying how many more there were.
 */
import { tokenizeCsv, type CsvField } from "./csv.ts";

export interface EpochCsvRow {
  line: number;
  point: string;
  east: number;
  north: number;
  height: number;
  time: string | null;
  sigmaEast: number | null;
  sigmaNorth: number | null;
  sigmaHeight: number | null;
}
export interface CsvError {
  line: number;
  field: string | null;
  message: string;
}
export type EpochCsvResult = { ok: true; rows: EpochCsvRow[] } | { ok: false; errors: CsvError[] };

export const MAX_ERRORS = 100;
export const EPOCH_COLUMNS = ["point", "east", "north", "height", "time", "sigma_east", "sigma_north", "sigma_height"] as const;
export type EpochColumn = (typeof EPOCH_COLUMNS)[number];
const REQUIRED: readonly EpochColumn[] = ["point", "east", "north", "height"];

const NUMBER_RE = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A finite decimal number, or a sentence saying why not. */
export function parseDecimal(text: string): number | string {
  const t = text.trim();
  if (t === "") return "is empty";
  if (!NUMBER_RE.test(t)) return `is not a number: ${JSON.stringify(t)}`;
  const v = Number(t);
  if (!Number.isFinite(v)) return `is not a finite number: ${JSON.stringify(t)}`;
  return v;
}

const TIME_RE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d+))?)?(Z|[+-]\d{2}(?::?\d{2})?)$/i;

/**
 * Milliseconds since 1970 UTC for an ISO 8601 date-time with an offset or Z (extended format,
 * e.g. 2024-03-01T08:15:00+01:00), or null when the text is not one (missing offset, impossible date).
 */
export function parseIsoTimeMs(text: string): number | null {
  const m = TIME_RE.exec(text.trim());
  if (!m) return null;
  const [, ys, mos, ds, hs, mis, ss, frac, off] = m;
  const y = Number(ys);
  const mo = Number(mos);
  const d = Number(ds);
  const h = Number(hs);
  const mi = Number(mis);
  const s = ss === undefined ? 0 : Number(ss);
  const ms = frac === undefined ? 0 : Math.floor(Number(`0.${frac}`) * 1000);
  if (mo < 1 || mo > 12 || d < 1 || h > 23 || mi > 59 || s > 59) return null;
  const daysInMonth = new Date(Date.UTC(y, mo, 0)).getUTCDate();
  if (d > daysInMonth) return null;
  let offsetMin = 0;
  if (off.toUpperCase() !== "Z") {
    const sign = off[0] === "-" ? -1 : 1;
    const digits = off.slice(1).replace(":", "");
    const oh = Number(digits.slice(0, 2));
    const om = digits.length > 2 ? Number(digits.slice(2, 4)) : 0;
    if (oh > 23 || om > 59) return null;
    offsetMin = sign * (oh * 60 + om);
  }
  const utc = Date.UTC(y, mo - 1, d, h, mi, s, ms);
  const shifted = utc - offsetMin * 60_000;
  // Date.UTC maps years 0–99 to 1900–1999; reject them rather than guess.
  return y < 100 ? null : shifted;
}

/** Normalised UTC ISO string of `parseIsoTimeMs`, or null. */
export function normaliseIsoTime(text: string): string | null {
  const ms = parseIsoTimeMs(text);
  return ms === null ? null : new Date(ms).toISOString();
}

export function parseEpochCsv(text: string, opts: { defaultTime?: string } = {}): EpochCsvResult {
  let defaultTime: string | null = null;
  if (opts.defaultTime !== undefined) {
    defaultTime = normaliseIsoTime(opts.defaultTime);
    if (defaultTime === null) throw new RangeError(`parseEpochCsv: defaultTime is not ISO 8601 with an offset or Z: ${opts.defaultTime}`);
  }
  const errors: CsvError[] = [];
  let dropped = 0;
  const report = (e: CsvError): void => {
    if (errors.length < MAX_ERRORS) errors.push(e);
    else dropped++;
  };
  const finish = (): EpochCsvResult => {
    if (dropped > 0) errors.push({ line: errors[errors.length - 1].line, field: null, message: `${dropped} more error${dropped === 1 ? "" : "s"} not shown` });
    return { ok: false, errors };
  };

  const { records, errors: syntax } = tokenizeCsv(text);
  for (const e of syntax) report({ line: e.line, field: null, message: e.message });
  if (records.length === 0) {
    report({ line: 1, field: null, message: `no header row: expected columns ${REQUIRED.join(",")}` });
    return finish();
  }
  const [header, ...body] = records;
  const index = new Map<EpochColumn, { col: number; name: string }>();
  header.fields.forEach((f: CsvField, col: number) => {
    const name = f.value.trim();
    const key = name.toLowerCase();
    if (!(EPOCH_COLUMNS as readonly string[]).includes(key)) {
      report({ line: f.line, field: name, message: `unknown column ${JSON.stringify(name)} (allowed: ${EPOCH_COLUMNS.join(", ")})` });
      return;
    }
    const c = key as EpochColumn;
    const prev = index.get(c);
    if (prev) report({ line: f.line, field: name, message: `column ${JSON.stringify(name)} appears twice (also column ${prev.col + 1})` });
    else index.set(c, { col, name });
  });
  for (const c of REQUIRED) if (!index.has(c)) report({ line: header.line, field: c, message: `required column "${c}" is missing` });
  if (errors.length > 0) return finish();

  const rows: EpochCsvRow[] = [];
  const firstSeen = new Map<string, number>();
  const width = header.fields.length;
  for (const rec of body) {
    if (rec.fields.length !== width) {
      report({ line: rec.line, field: null, message: `expected ${width} fields as in the header, found ${rec.fields.length}` });
      continue;
    }
    let bad = false;
    const fieldOf = (c: EpochColumn): { f: CsvField; name: string } | null => {
      const at = index.get(c);
      return at ? { f: rec.fields[at.col], name: at.name } : null;
    };
    const num = (c: EpochColumn): number => {
      const x = fieldOf(c) as { f: CsvField; name: string };
      const v = parseDecimal(x.f.value);
      if (typeof v === "string") {
        report({ line: x.f.line, field: x.name, message: `${x.name} ${v}` });
        bad = true;
        return NaN;
      }
      return v;
    };
    const sigma = (c: EpochColumn): number | null => {
      const x = fieldOf(c);
      if (!x || x.f.value.trim() === "") return null;
      const v = parseDecimal(x.f.value);
      if (typeof v === "string" || v <= 0) {
        report({ line: x.f.line, field: x.name, message: typeof v === "string" ? `${x.name} ${v}` : `${x.name} must be > 0 metres, got ${x.f.value.trim()}` });
        bad = true;
        return null;
      }
      return v;
    };
    const pf = fieldOf("point") as { f: CsvField; name: string };
    const point = pf.f.value.trim();
    if (point === "") {
      report({ line: pf.f.line, field: pf.name, message: `${pf.name} is empty` });
      bad = true;
    }
    const east = num("east");
    const north = num("north");
    const height = num("height");
    const sigmaEast = sigma("sigma_east");
    const sigmaNorth = sigma("sigma_north");
    const sigmaHeight = sigma("sigma_height");
    let time = defaultTime;
    const tf = fieldOf("time");
    if (tf && tf.f.value.trim() !== "") {
      time = normaliseIsoTime(tf.f.value);
      if (time === null) {
        report({ line: tf.f.line, field: tf.name, message: `${tf.name} is not ISO 8601 with an offset or Z (e.g. 2024-03-01T08:15:00Z): ${JSON.stringify(tf.f.value.trim())}` });
        bad = true;
      }
    }
    if (point !== "" && !(tf && time === null && tf.f.value.trim() !== "")) {
      const key = `${time ?? ""}\u0000${point}`;
      const first = firstSeen.get(key);
      if (first !== undefined) {
        report({ line: pf.f.line, field: pf.name, message: `point ${JSON.stringify(point)} appears twice in one epoch${time ? ` (time ${time})` : ""}; first on line ${first}` });
        bad = true;
      } else firstSeen.set(key, rec.line);
    }
    if (!bad) rows.push({ line: rec.line, point, east, north, height, time, sigmaEast, sigmaNorth, sigmaHeight });
  }
  if (errors.length > 0) return finish();
  return { ok: true, rows };
}
