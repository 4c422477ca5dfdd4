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

export function parseEpochCsvInput(text: string, opts: { defaultTime?: string } = {}): EpochParseResult {
  if (opts.defaultTime !== undefined && normaliseIsoTime(opts.defaultTime) === null) {
    return { ok: false, errors: [{ line: null, field: "time", message: `?time= is not ISO 8601 with an offset or Z (e.g. 2024-03-01T08:15:00Z): ${JSON.stringify(opts.defaultTime)}` }] };
  }
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
