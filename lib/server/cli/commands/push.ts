/**
 * `epochal push --url U --site S --token T FILE...`: post epoch files to a server's ingest API.
 * The content type comes from the extension (.csv, .json, .geojson). A CSV with several epochs is
 * split into chunks of whole epochs, posted in order, with a progress bar; the server's row errors are
 * mapped back to the lines of the original file and printed as `file:line field: message`.
 * Re-running after a failure is safe: epochs already stored are answered "unchanged".
 */
import { readFile } from "node:fs/promises";
import { extname } from "node:path";
import { parseEpochCsv } from "../../../formats/epoch-csv.ts";
import { tokenizeCsv } from "../../../formats/csv.ts";

export const help = `Usage: epochal push --url URL --site SLUG --token TOKEN [options] FILE...

Posts epoch files to POST {URL}/api/v1/sites/{SLUG}/epochs.
  .csv      epoch CSV (point,east,north,height[,time,sigma_east,sigma_north,sigma_height])
  .json     { time, observations: [...] } or { epochs: [...] }
  .geojson  FeatureCollection of WGS84 points with properties.point and properties.time

Options:
  --url URL            server, e.g. https://monitoring.example.org (or EPOCHAL_URL)
  --site SLUG          site slug
  --token TOKEN        API token of scope ingest (or EPOCHAL_TOKEN)
  --time ISO           time for CSV files without a time column (sent as ?time=)
  --revise             store a new revision where an epoch at that time holds other coordinates
  --chunk-observations N   split multi-epoch CSVs into posts of about N observations (default 50000)
  --quiet              no progress bar
  --mqtt URL           publish over MQTT to the live feed instead of --url (lib/server/live/publish.ts)

Exit status: 0 all stored (or already stored), 2 a file or the request was refused (errors printed
as file:line field: message), 1 the server could not be reached or failed.`;

export interface PushOptions {
  url: string;
  site: string;
  token: string;
  files: string[];
  time?: string;
  revise: boolean;
  chunkObservations: number;
  quiet: boolean;
}

export interface PushIo {
  out: (line: string) => void;
  err: (line: string) => void;
  /** Progress on one line (carriage return), or null for none. */
  progress: ((text: string) => void) | null;
  fetch: typeof fetch;
}

type FieldError = { line: number | null; field: string | null; message: string };

interface Chunk {
  body: string;
  epochs: number;
  /** Original line of each line of the chunk (index = chunk line − 1). */
  lineMap: number[] | null;
}

const TYPES: Record<string, string> = { ".csv": "text/csv", ".json": "application/json", ".geojson": "application/geo+json" };

/** Splits a valid multi-epoch CSV into chunks of whole epochs; one chunk (the file) otherwise. */
export function chunkCsv(text: string, maxObservations: number, defaultTime?: string): Chunk[] {
  const whole: Chunk[] = [{ body: text, epochs: 1, lineMap: null }];
  const parsed = parseEpochCsv(text, defaultTime ? { defaultTime } : {});
  if (!parsed.ok) return whole; // the server reports the errors with the file's own lines
  const timeOfLine = new Map(parsed.rows.map((r) => [r.line, r.time]));
  const order: string[] = [];
  const count = new Map<string, number>();
  for (const r of parsed.rows) {
    const t = r.time ?? "";
    if (!count.has(t)) order.push(t);
    count.set(t, (count.get(t) ?? 0) + 1);
  }
  if (order.length <= 1) return [{ ...whole[0], epochs: order.length }];
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const lines = src.split(/\r\n|\n|\r/);
  const { records } = tokenizeCsv(text);
  const header = records[0];
  const span = (k: number): [number, number] => [records[k].line, k + 1 < records.length ? records[k + 1].line - 1 : lines.length];
  const [h0, h1] = span(0);
  const headLines: number[] = [];
  for (let l = h0; l <= Math.min(h1, header.line); l++) headLines.push(l);
  const byTime = new Map<string, number[]>();
  for (let k = 1; k < records.length; k++) {
    const t = timeOfLine.get(records[k].line) ?? "";
    const [a, b] = span(k);
    let list = byTime.get(t);
    if (!list) byTime.set(t, (list = []));
    for (let l = a; l <= b; l++) list.push(l);
  }
  const chunks: Chunk[] = [];
  let cur: string[] = [];
  let obs = 0;
  const flush = (): void => {
    if (cur.length === 0) return;
    const map = [...headLines];
    for (const t of cur) map.push(...(byTime.get(t) ?? []));
    chunks.push({ body: map.map((l) => lines[l - 1]).join("\n") + "\n", epochs: cur.length, lineMap: map });
    cur = [];
    obs = 0;
  };
  for (const t of order) {
    const n = count.get(t) ?? 0;
    if (cur.length > 0 && obs + n > maxObservations) flush();
    cur.push(t);
    obs += n;
  }
  flush();
  return chunks;
}

export function formatFieldError(file: string, e: FieldError, lineMap: number[] | null): string {
  const line = e.line === null ? null : lineMap ? (lineMap[e.line - 1] ?? e.line) : e.line;
  const where = `${file}${line === null ? "" : `:${line}`}`;
  return `${where}${e.field ? ` ${e.field}` : ""}: ${e.message}`;
}

function bar(done: number, total: number): string {
  const width = 30;
  const k = total === 0 ? width : Math.round((done / total) * width);
  return `[${"#".repeat(k)}${".".repeat(width - k)}] ${done}/${total} epochs`;
}

/** Posts every file; returns the exit status. */
export async function pushFiles(o: PushOptions, io: PushIo): Promise<number> {
  const base = o.url.replace(/\/+$/, "");
  const q = new URLSearchParams();
  if (o.time) q.set("time", o.time);
  if (o.revise) q.set("revise", "true");
  const endpoint = `${base}/api/v1/sites/${encodeURIComponent(o.site)}/epochs${q.size ? `?${q}` : ""}`;
  let status = 0;
  for (const file of o.files) {
    const type = TYPES[extname(file).toLowerCase()];
    if (!type) {
      io.err(`${file}: unknown file type; use .csv, .json or .geojson`);
      status = 2;
      continue;
    }
    let text: string;
    try {
      text = await readFile(file, "utf8");
    } catch (err) {
      io.err(`${file}: cannot read: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}`);
      status = 2;
      continue;
    }
    const chunks = type === "text/csv" ? chunkCsv(text, o.chunkObservations, o.time) : [{ body: text, epochs: 1, lineMap: null }];
    const total = chunks.reduce((s, c) => s + c.epochs, 0);
    const showBar = io.progress !== null && chunks.length > 1 && !o.quiet;
    let done = 0;
    const tally = { created: 0, revised: 0, unchanged: 0, newPoints: 0 };
    let failed = false;
    for (const [k, c] of chunks.entries()) {
      if (showBar) io.progress?.(`${file} ${bar(done, total)}`);
      let res: Response;
      try {
        res = await io.fetch(endpoint, { method: "POST", headers: { "content-type": type, authorization: `Bearer ${o.token}` }, body: c.body });
      } catch (err) {
        io.err(`${file}: cannot reach ${base}: ${(err as Error).message}`);
        return 1;
      }
      let json: { epochs?: { outcome: string }[]; newPoints?: string[]; errors?: FieldError[]; error?: { message: string } } = {};
      try {
        json = (await res.json()) as typeof json;
      } catch {
        /* not JSON */
      }
      if (res.ok) {
        for (const e of json.epochs ?? []) tally[e.outcome === "created" ? "created" : e.outcome === "revised" ? "revised" : "unchanged"]++;
        tally.newPoints += json.newPoints?.length ?? 0;
        done += c.epochs;
        continue;
      }
      if (showBar) io.progress?.("");
      const stored = k > 0 ? ` (the ${done} epochs before were stored; re-running is safe: they will be reported unchanged)` : "";
      io.err(`${file}: refused (HTTP ${res.status}): ${json.error?.message ?? res.statusText}${stored}`);
      for (const e of json.errors ?? []) io.err(formatFieldError(file, e, c.lineMap));
      status = res.status >= 500 ? 1 : Math.max(status, 2);
      failed = true;
      break;
    }
    if (showBar) io.progress?.(`${file} ${bar(done, total)}\n`);
    if (!failed) io.out(`${file}: ${tally.created} stored, ${tally.revised} revised, ${tally.unchanged} already stored; ${tally.newPoints} new points`);
  }
  return status;
}

class UsageError extends Error {}

function parseArgs(args: string[]): PushOptions {
  const o: Partial<PushOptions> & { files: string[] } = { files: [], revise: false, quiet: false, chunkObservations: 50_000 };
  const need = (i: number, flag: string): string => {
    const v = args[i];
    if (v === undefined || v.startsWith("--")) throw new UsageError(`option ${flag} needs a value`);
    return v;
  };
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === "--url") o.url = need(++i, a);
    else if (a === "--site") o.site = need(++i, a);
    else if (a === "--token") o.token = need(++i, a);
    else if (a === "--time") o.time = need(++i, a);
    else if (a === "--revise") o.revise = true;
    else if (a === "--quiet") o.quiet = true;
    else if (a === "--chunk-observations") {
      const n = Number(need(++i, a));
      if (!Number.isInteger(n) || n < 1) throw new UsageError("--chunk-observations must be a whole number ≥ 1");
      o.chunkObservations = n;
    } else if (a.startsWith("--")) throw new UsageError(`unknown option ${JSON.stringify(a)}`);
    else o.files.push(a);
  }
  o.url ??= process.env.EPOCHAL_URL;
  o.token ??= process.env.EPOCHAL_TOKEN;
  if (!o.url) throw new UsageError("--url is required (or set EPOCHAL_URL)");
  if (!o.site) throw new UsageError("--site is required");
  if (!o.token) throw new UsageError("--token is required (or set EPOCHAL_TOKEN)");
  if (o.files.length === 0) throw new UsageError("give at least one FILE");
  return o as PushOptions;
}

export async function run(args: string[]): Promise<number> {
  // Live feed: `--mqtt URL` publishes the files to the broker instead (lib/server/live/publish.ts).
  if (args.includes("--mqtt")) return (await import("../../live/publish.ts")).runMqttPush(args);
  let o: PushOptions;
  try {
    o = parseArgs(args);
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`epochal push: ${err.message}\n\n${help}`);
      return 2;
    }
    throw err;
  }
  const tty = process.stderr.isTTY === true;
  return pushFiles(o, {
    out: (l) => console.log(l),
    err: (l) => console.error(l),
    progress: tty ? (t) => process.stderr.write(`\r\x1b[2K${t}`) : null,
    fetch,
  });
}
