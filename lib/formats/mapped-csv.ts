/**
 * Other people's CSV files: a column mapping turns a file whose columns are named or ordered
 * differently (and may be in millimetres, with its own time format) into our epoch CSV
 * (lib/formats/epoch-csv.ts, domain.md §7), keeping the source line of every row so that errors,
 * ours or the server's, point at the line of the file the user has.
 *
 *   source.csv ──applyColumnMapping(text, mapping)──▶ { rows, errors, csv, lineMap }
 *                                                      lineMap[line in csv] = line in source.csv
 *
 * Columns are picked by header name (trimmed, case-insensitive) or by 1-based position (files
 * without a header row). Columns not picked are ignored. Coordinates and σ are converted from the
 * chosen unit to metres. Time: ISO 8601 with an offset or Z (`iso`), ISO 8601 without an offset in a
 * given time zone (`iso-local`), a luxon format pattern in a time zone (`pattern`, e.g.
 * `dd.MM.yyyy HH:mm:ss`; tokens: https://moment.github.io/luxon/#/parsing), or Unix seconds or
 * milliseconds. Without a time column, every row belongs to one epoch whose time is given at upload.
 * Pure apart from luxon (time zones).
 */
import { DateTime, IANAZone } from "luxon";
import { tokenizeCsv, type CsvRecord } from "./csv.ts";
import { normaliseIsoTime, parseDecimal, type CsvError } from "./epoch-csv.ts";

export const MAPPED_FIELDS = ["point", "east", "north", "height", "time", "sigmaEast", "sigmaNorth", "sigmaHeight"] as const;
export type MappedField = (typeof MAPPED_FIELDS)[number];
export const REQUIRED_FIELDS: readonly MappedField[] = ["point", "east", "north", "height"];
/** Our epoch CSV column of each field. */
export const EPOCH_COLUMN_OF: Record<MappedField, string> = {
  point: "point",
  east: "east",
  north: "north",
  height: "height",
  time: "time",
  sigmaEast: "sigma_east",
  sigmaNorth: "sigma_north",
  sigmaHeight: "sigma_height",
};

export const LENGTH_UNITS = ["m", "mm"] as const;
export type LengthUnit = (typeof LENGTH_UNITS)[number];
export const TIME_FORMATS = ["iso", "iso-local", "pattern", "unix-s", "unix-ms"] as const;
export type TimeFormat = (typeof TIME_FORMATS)[number];

/** A header name (as the file spells it) or a 1-based column position. */
export type ColumnRef = string | number;

export interface ColumnMapping {
  hasHeader: boolean;
  columns: Partial<Record<MappedField, ColumnRef | null>>;
  /** Unit of east, north, height. */
  coordinateUnit: LengthUnit;
  /** Unit of the σ columns. */
  sigmaUnit: LengthUnit;
  timeFormat: TimeFormat;
  /** luxon pattern for `pattern`. */
  timePattern?: string | null;
  /** IANA zone for `iso-local` and `pattern`. */
  timeZone?: string | null;
}

export interface MappedRow {
  /** Line of the record in the source file (1-based, as an editor shows it). */
  sourceLine: number;
  point: string;
  east: number;
  north: number;
  height: number;
  /** UTC ISO 8601 with milliseconds and Z, or null (no time column). */
  time: string | null;
  sigmaEast: number | null;
  sigmaNorth: number | null;
  sigmaHeight: number | null;
}

export interface MappedCsv {
  /** Rows that converted without error (the preview shows them beside the errors). */
  rows: MappedRow[];
  /** Errors with source lines and the source column's name; empty when the file converted. */
  errors: CsvError[];
  /** Our epoch CSV of the rows (LF line ends), or null when there are errors. */
  csv: string | null;
  /** lineMap[n] = source line of line n of `csv` (1-based; [0] unused, [1] the header). */
  lineMap: number[];
}

export const MAX_MAPPING_ERRORS = 200;

/** Header and the first rows of a file, for the mapping step. */
export function previewColumns(text: string, maxRows = 5): { header: string[]; sample: string[][]; syntaxErrors: CsvError[] } {
  const { records, errors } = tokenizeCsv(text);
  const header = records[0]?.fields.map((f) => f.value.trim()) ?? [];
  const sample = records.slice(1, 1 + maxRows).map((r) => r.fields.map((f) => f.value));
  return { header, sample, syntaxErrors: errors.map((e) => ({ line: e.line, field: null, message: e.message })) };
}

/** Common names of each field in other tools' files (lowercase, spaces and punctuation removed). */
const SYNONYMS: Record<MappedField, string[]> = {
  point: ["point", "pointid", "pointname", "name", "id", "code", "target", "pt", "station", "prism"],
  east: ["east", "easting", "e", "x", "eastm", "eastingm", "y_east", "rechtswert"],
  north: ["north", "northing", "n", "y", "northm", "northingm", "hochwert"],
  height: ["height", "h", "z", "elevation", "elev", "heightm", "rl", "level", "hoehe"],
  time: ["time", "timeutc", "datetime", "timestamp", "date", "epoch", "epochtime", "measured", "measuredat"],
  sigmaEast: ["sigmaeast", "sigmae", "se", "sdeast", "stdeast", "sigmaeastm", "sigmax"],
  sigmaNorth: ["sigmanorth", "sigman", "sn", "sdnorth", "stdnorth", "sigmanorthm", "sigmay"],
  sigmaHeight: ["sigmaheight", "sigmah", "sh", "sdheight", "stdheight", "sigmaheightm", "sigmaz"],
};

/** Lowercase, unit suffixes such as ` (mm)`, `[m]`, `_mm` dropped, then only letters and digits. */
const squash = (s: string): string =>
  s
    .toLowerCase()
    .replace(/\s*[([]\s*(mm|m)\s*[)\]]\s*$|[_ ](mm|m)$/, "")
    .replace(/[^a-z0-9]/g, "");

/** A first guess of the mapping from header names (the user checks and changes it). */
export function suggestMapping(header: readonly string[]): ColumnMapping {
  const used = new Set<number>();
  const columns: Partial<Record<MappedField, ColumnRef | null>> = {};
  for (const field of MAPPED_FIELDS) {
    let i = -1;
    // Synonyms in order of preference: "easting" before a bare "e".
    for (const name of SYNONYMS[field]) {
      i = header.findIndex((h, k) => !used.has(k) && squash(h) === name);
      if (i >= 0) break;
    }
    if (i >= 0) {
      used.add(i);
      columns[field] = header[i];
    }
  }
  const mm = header.some((h) => /\bmm\b|_mm$|\(mm\)/i.test(h));
  return { hasHeader: true, columns, coordinateUnit: mm ? "mm" : "m", sigmaUnit: mm ? "mm" : "m", timeFormat: "iso", timePattern: null, timeZone: null };
}

/** The 0-based column index of a reference, or an error sentence. */
function resolveColumn(ref: ColumnRef, header: CsvRecord | null): number | string {
  if (typeof ref === "number") return Number.isInteger(ref) && ref >= 1 ? ref - 1 : `column position ${ref} is not a whole number ≥ 1`;
  if (!header) return `column ${JSON.stringify(ref)} is named, but the file has no header row (pick columns by position)`;
  const key = ref.trim().toLowerCase();
  const i = header.fields.findIndex((f) => f.value.trim().toLowerCase() === key);
  return i >= 0 ? i : `the file has no column ${JSON.stringify(ref)}`;
}

const UNIT_FACTOR: Record<LengthUnit, number> = { m: 1, mm: 1e-3 };

/** Text of one CSV field of our output (quoted when needed; a leading `#` would read as a comment). */
function outField(v: string): string {
  return /[",\r\n]/.test(v) || /^\s*#/.test(v) || v !== v.trim() ? `"${v.replace(/"/g, '""')}"` : v;
}

/** Milliseconds of a time cell under the mapping, or an error sentence. */
export function parseMappedTime(text: string, m: Pick<ColumnMapping, "timeFormat" | "timePattern" | "timeZone">): number | string {
  const t = text.trim();
  if (t === "") return "is empty";
  switch (m.timeFormat) {
    case "iso": {
      const iso = normaliseIsoTime(t);
      return iso === null ? `is not ISO 8601 with an offset or Z: ${JSON.stringify(t)} (pick "ISO 8601 without offset" and a time zone if it has none)` : Date.parse(iso);
    }
    case "iso-local":
    case "pattern": {
      const zone = m.timeZone ?? "UTC";
      if (!IANAZone.isValidZone(zone)) return `time zone ${JSON.stringify(zone)} is not an IANA zone`;
      if (m.timeFormat === "pattern" && !m.timePattern) return "no time pattern is set";
      const dt = m.timeFormat === "iso-local" ? DateTime.fromISO(t, { zone, setZone: false }) : DateTime.fromFormat(t, m.timePattern as string, { zone });
      if (!dt.isValid) return m.timeFormat === "pattern" ? `does not match the pattern ${JSON.stringify(m.timePattern)}: ${JSON.stringify(t)}` : `is not an ISO 8601 date-time: ${JSON.stringify(t)}`;
      return dt.toMillis();
    }
    case "unix-s":
    case "unix-ms": {
      const v = parseDecimal(t);
      if (typeof v === "string") return v;
      return m.timeFormat === "unix-s" ? Math.round(v * 1000) : Math.round(v);
    }
  }
}

/**
 * Converts a file under a mapping. Every problem is reported with the source line and the source
 * column's name (or `column N`), up to MAX_MAPPING_ERRORS.
 */
export function applyColumnMapping(text: string, mapping: ColumnMapping): MappedCsv {
  const errors: CsvError[] = [];
  let dropped = 0;
  const report = (e: CsvError): void => {
    if (errors.length < MAX_MAPPING_ERRORS) errors.push(e);
    else dropped++;
  };
  const { records, errors: syntax } = tokenizeCsv(text);
  for (const e of syntax) report({ line: e.line, field: null, message: e.message });
  const header = mapping.hasHeader ? (records[0] ?? null) : null;
  const body = mapping.hasHeader ? records.slice(1) : records;
  const headerLine = header?.line ?? 0;

  const cols = new Map<MappedField, { index: number; name: string }>();
  for (const field of MAPPED_FIELDS) {
    const ref = mapping.columns[field];
    if (ref === undefined || ref === null || ref === "") {
      if (REQUIRED_FIELDS.includes(field)) report({ line: headerLine || 1, field: EPOCH_COLUMN_OF[field], message: `no column is picked for ${EPOCH_COLUMN_OF[field]}` });
      continue;
    }
    const r = resolveColumn(ref, header);
    if (typeof r === "string") {
      report({ line: headerLine || 1, field: EPOCH_COLUMN_OF[field], message: r });
      continue;
    }
    const name = header?.fields[r]?.value.trim() || `column ${r + 1}`;
    const twice = [...cols.entries()].find(([, c]) => c.index === r);
    if (twice) report({ line: headerLine || 1, field: name, message: `${name} is picked for both ${EPOCH_COLUMN_OF[twice[0]]} and ${EPOCH_COLUMN_OF[field]}` });
    cols.set(field, { index: r, name });
  }
  if (errors.length) return { rows: [], errors, csv: null, lineMap: [] };

  const rows: MappedRow[] = [];
  for (const rec of body) {
    const cell = (field: MappedField): { text: string; name: string } | null => {
      const c = cols.get(field);
      if (!c) return null;
      return { text: rec.fields[c.index]?.value ?? "", name: c.name };
    };
    let bad = false;
    const num = (field: MappedField, unit: LengthUnit, optional: boolean): number | null => {
      const c = cell(field);
      if (!c) return null;
      if (optional && c.text.trim() === "") return null;
      const v = parseDecimal(c.text);
      if (typeof v === "string") {
        report({ line: rec.line, field: c.name, message: `${c.name} ${v}` });
        bad = true;
        return null;
      }
      return v * UNIT_FACTOR[unit];
    };
    // Trailing optional (σ) cells may be missing; the required and time columns must be there.
    const width = Math.max(...[...cols.entries()].filter(([f]) => !f.startsWith("sigma")).map(([, c]) => c.index)) + 1;
    if (rec.fields.length < width) {
      report({ line: rec.line, field: null, message: `the row has ${rec.fields.length} field${rec.fields.length === 1 ? "" : "s"}; the mapping needs at least ${width}` });
      continue;
    }
    const pc = cell("point") as { text: string; name: string };
    const point = pc.text.trim();
    if (point === "") {
      report({ line: rec.line, field: pc.name, message: `${pc.name} (point code) is empty` });
      bad = true;
    }
    const east = num("east", mapping.coordinateUnit, false);
    const north = num("north", mapping.coordinateUnit, false);
    const height = num("height", mapping.coordinateUnit, false);
    const sigmaEast = num("sigmaEast", mapping.sigmaUnit, true);
    const sigmaNorth = num("sigmaNorth", mapping.sigmaUnit, true);
    const sigmaHeight = num("sigmaHeight", mapping.sigmaUnit, true);
    let time: string | null = null;
    const tc = cell("time");
    if (tc) {
      const ms = parseMappedTime(tc.text, mapping);
      if (typeof ms === "string") {
        report({ line: rec.line, field: tc.name, message: `${tc.name} ${ms}` });
        bad = true;
      } else time = new Date(ms).toISOString();
    }
    if (bad) continue;
    rows.push({ sourceLine: rec.line, point, east: east as number, north: north as number, height: height as number, time, sigmaEast, sigmaNorth, sigmaHeight });
  }
  if (rows.length === 0 && errors.length === 0) report({ line: headerLine || 1, field: null, message: "the file has no data rows" });
  if (dropped > 0) errors.push({ line: errors[errors.length - 1].line, field: null, message: `${dropped} more error${dropped === 1 ? "" : "s"} not shown` });
  if (errors.length) return { rows, errors, csv: null, lineMap: [] };

  const present = MAPPED_FIELDS.filter((f) => cols.has(f));
  const lineMap: number[] = [0, headerLine];
  const out: string[] = [present.map((f) => EPOCH_COLUMN_OF[f]).join(",")];
  for (const r of rows) {
    const cells = present.map((f) => {
      const v = r[f];
      if (f === "point") return outField(v as string);
      if (v === null) return "";
      return typeof v === "number" ? String(v) : outField(v as string);
    });
    out.push(cells.join(","));
    lineMap.push(r.sourceLine);
  }
  return { rows, errors, csv: out.join("\n") + "\n", lineMap };
}

/** The source line of a line of the converted CSV (server errors name converted lines). */
export function sourceLineOf(lineMap: readonly number[], convertedLine: number | null): number | null {
  if (convertedLine === null) return null;
  const v = lineMap[convertedLine];
  return v === undefined || v === 0 ? null : v;
}
