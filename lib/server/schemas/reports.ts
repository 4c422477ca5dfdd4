/**
 * Boundary schemas of reports, exports and the column mapping (zod).
 *
 * Period query `?from=&to=`: each either a date `YYYY-MM-DD` in the site's time zone (from: the start
 * of that day; to: the end of that day, so `from=2026-06-01&to=2026-06-07` is seven whole days) or an
 * ISO 8601 date-time with an offset or Z. Both optional: `to` defaults to the site's latest epoch
 * (now when it has none), `from` to seven days before `to`. `from` must be before `to`.
 */
import { z } from "zod";
import { DateTime, IANAZone } from "luxon";
import { AppError, type FieldError } from "../errors.ts";
import { normaliseIsoTime } from "../../formats/epoch-csv.ts";
import { LENGTH_UNITS, MAPPED_FIELDS, TIME_FORMATS, type ColumnMapping } from "../../formats/mapped-csv.ts";

const DATE_RE = /^\d{4}-\d{2}-\d{2}$/;
export const DEFAULT_PERIOD_DAYS = 7;
/** The longest report period: a report is read by a person; longer spans are exports. */
export const MAX_REPORT_DAYS = 400;

const instant = z
  .string()
  .trim()
  .refine((s) => DATE_RE.test(s) || normaliseIsoTime(s) !== null, { message: "must be a date YYYY-MM-DD or ISO 8601 with an offset or Z" });

export const periodQuerySchema = z.object({ from: instant.optional(), to: instant.optional() });

function issues(err: z.ZodError): FieldError[] {
  return err.issues.map((i) => ({ line: null, field: i.path.join(".") || null, message: i.message }));
}

/** Milliseconds of a period bound in the site's zone; `end` makes a date mean the end of that day. */
function boundMs(s: string, zone: string, end: boolean): number {
  if (DATE_RE.test(s)) {
    const d = DateTime.fromISO(s, { zone: IANAZone.isValidZone(zone) ? zone : "UTC" });
    if (!d.isValid) throw new AppError("invalid", `Not a calendar date: ${s}.`, { errors: [{ line: null, field: end ? "to" : "from", message: `${s} is not a calendar date` }] });
    return (end ? d.plus({ days: 1 }) : d).toMillis() - (end ? 1 : 0);
  }
  return Date.parse(normaliseIsoTime(s) as string);
}

export interface Period {
  fromMs: number;
  toMs: number;
}

/**
 * The period of a request's query. `latestEpochMs` (the site's latest epoch, or null) sets the
 * default end; `maxDays` bounds the span (reports); throws AppError("invalid") naming the field.
 */
export function parsePeriod(params: URLSearchParams | Record<string, string | undefined>, opts: { timeZone: string; latestEpochMs: number | null; nowMs: number; maxDays?: number }): Period {
  const raw = params instanceof URLSearchParams ? Object.fromEntries(params) : params;
  const q = periodQuerySchema.safeParse({ from: raw.from || undefined, to: raw.to || undefined });
  if (!q.success) throw new AppError("invalid", "Bad period.", { errors: issues(q.error) });
  const toMs = q.data.to ? boundMs(q.data.to, opts.timeZone, true) : (opts.latestEpochMs ?? opts.nowMs);
  const fromMs = q.data.from ? boundMs(q.data.from, opts.timeZone, false) : toMs - DEFAULT_PERIOD_DAYS * 86_400_000;
  if (!(fromMs < toMs)) throw new AppError("invalid", "The period must start before it ends.", { errors: [{ line: null, field: "from", message: "from must be before to" }] });
  if (opts.maxDays !== undefined && toMs - fromMs > opts.maxDays * 86_400_000)
    throw new AppError("invalid", `A report covers at most ${opts.maxDays} days; use the exports for longer spans.`, { errors: [{ line: null, field: "from", message: `the period is longer than ${opts.maxDays} days` }] });
  return { fromMs, toMs };
}

// -------------------------------------------------------------------------------------------------
// Column mapping (Site.columnMapping)

const columnRef = z.union([z.string().trim().min(1).max(200), z.number().int().min(1).max(1000)]).nullable().optional();

export const columnMappingSchema = z
  .object({
    hasHeader: z.boolean(),
    columns: z.object(Object.fromEntries(MAPPED_FIELDS.map((f) => [f, columnRef])) as Record<(typeof MAPPED_FIELDS)[number], typeof columnRef>).strict(),
    coordinateUnit: z.enum(LENGTH_UNITS),
    sigmaUnit: z.enum(LENGTH_UNITS),
    timeFormat: z.enum(TIME_FORMATS),
    timePattern: z.string().max(100).nullable().optional(),
    timeZone: z
      .string()
      .refine((s) => IANAZone.isValidZone(s), { message: "must be an IANA time zone, e.g. Europe/London" })
      .nullable()
      .optional(),
  })
  .strict()
  .superRefine((m, ctx) => {
    if (m.timeFormat === "pattern" && !m.timePattern) ctx.addIssue({ code: "custom", path: ["timePattern"], message: "a pattern is required for the pattern time format" });
    if (!m.hasHeader)
      for (const f of MAPPED_FIELDS)
        if (typeof m.columns[f] === "string") ctx.addIssue({ code: "custom", path: ["columns", f], message: "without a header row, pick columns by position (1, 2, …)" });
  });

export function parseColumnMapping(input: unknown): ColumnMapping {
  const r = columnMappingSchema.safeParse(input);
  if (!r.success) throw new AppError("invalid", "Bad column mapping.", { errors: issues(r.error) });
  return r.data as ColumnMapping;
}
