/**
 * Ingest boundary: request query schemas (zod), the documented plausibility bounds that every
 * format's epochs pass before anything is written, and the site schema of `epochal site create`.
 *
 * Bounds (a value outside is a mistake in the file, not a measurement):
 *   |east|, |north| ≤ 1e8 m     (larger than any projected grid; catches a unit or column mix-up)
 *   |height| ≤ 1e5 m
 *   0 < σ ≤ 10 m                (σ above 10 m is not a survey coordinate)
 *   1980-01-01T00:00:00Z ≤ time ≤ now + 1 day (GNSS time starts in 1980; a day covers clock and zone slips)
 *   point code: 1–100 characters, no control characters
 * The per-observation checks are plain comparisons, not zod, because a backfill runs them millions of times.
 */
import { z } from "zod";
import { IANAZone } from "luxon";
import type { EpochInput, InputError, ObservationKey } from "../../formats/epoch-json.ts";
import { normaliseIsoTime } from "../../formats/epoch-csv.ts";

export const MAX_ABS_PLAN_M = 1e8;
export const MAX_ABS_HEIGHT_M = 1e5;
export const MAX_SIGMA_M = 10;
export const MIN_TIME_MS = Date.UTC(1980, 0, 1);
export const MAX_FUTURE_MS = 24 * 3600 * 1000;
export const MAX_POINT_CODE_LENGTH = 100;
export const MAX_BOUND_ERRORS = 100;

// eslint-disable-next-line no-control-regex
// C0 and C1 controls, DEL, and the invisible direction marks and overrides that can make a code
// display as something else.
const CONTROL_RE = /[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069]/;

/** Every bound above, checked over all epochs; returns the errors (empty when all pass). */
export function checkEpochBounds(epochs: readonly EpochInput[], nowMs: number): InputError[] {
  const errors: InputError[] = [];
  let dropped = 0;
  const report = (line: number | null, field: string, message: string): void => {
    if (errors.length < MAX_BOUND_ERRORS) errors.push({ line, field, message });
    else dropped++;
  };
  const latest = nowMs + MAX_FUTURE_MS;
  // Point codes repeat in every epoch of a backfill: each distinct code is checked once.
  const goodCodes = new Set<string>();
  for (const ep of epochs) {
    const t = Date.parse(ep.time);
    if (!(t >= MIN_TIME_MS)) report(ep.timeAt.line, ep.timeAt.field ?? "time", `time ${ep.time} is before 1980-01-01: not a plausible survey time`);
    else if (t > latest) report(ep.timeAt.line, ep.timeAt.field ?? "time", `time ${ep.time} is more than one day in the future (check the clock and the offset)`);
    const obs = ep.observations;
    for (let i = 0; i < obs.length; i++) {
      const o = obs[i];
      const codeChecked = goodCodes.has(o.point);
      const inBounds =
        codeChecked &&
        Math.abs(o.east) <= MAX_ABS_PLAN_M &&
        Math.abs(o.north) <= MAX_ABS_PLAN_M &&
        Math.abs(o.height) <= MAX_ABS_HEIGHT_M &&
        (o.sigmaEast === null || (o.sigmaEast > 0 && o.sigmaEast <= MAX_SIGMA_M)) &&
        (o.sigmaNorth === null || (o.sigmaNorth > 0 && o.sigmaNorth <= MAX_SIGMA_M)) &&
        (o.sigmaHeight === null || (o.sigmaHeight > 0 && o.sigmaHeight <= MAX_SIGMA_M));
      if (inBounds) continue; // the usual row: one pass, no message built
      const f = (k: ObservationKey): string => ep.fieldOf(i, k);
      if (codeChecked) {
        // checked already
      } else if (o.point.length > MAX_POINT_CODE_LENGTH) report(o.line, f("point"), `point code is longer than ${MAX_POINT_CODE_LENGTH} characters`);
      else if (CONTROL_RE.test(o.point)) report(o.line, f("point"), "point code contains a control character");
      else goodCodes.add(o.point);
      if (!(Math.abs(o.east) <= MAX_ABS_PLAN_M)) report(o.line, f("east"), `east ${o.east} m is outside ±${MAX_ABS_PLAN_M} m`);
      if (!(Math.abs(o.north) <= MAX_ABS_PLAN_M)) report(o.line, f("north"), `north ${o.north} m is outside ±${MAX_ABS_PLAN_M} m`);
      if (!(Math.abs(o.height) <= MAX_ABS_HEIGHT_M)) report(o.line, f("height"), `height ${o.height} m is outside ±${MAX_ABS_HEIGHT_M} m`);
      if (o.sigmaEast !== null && !(o.sigmaEast > 0 && o.sigmaEast <= MAX_SIGMA_M)) report(o.line, f("sigma_east"), `sigma_east ${o.sigmaEast} m must be in (0, ${MAX_SIGMA_M}] m`);
      if (o.sigmaNorth !== null && !(o.sigmaNorth > 0 && o.sigmaNorth <= MAX_SIGMA_M)) report(o.line, f("sigma_north"), `sigma_north ${o.sigmaNorth} m must be in (0, ${MAX_SIGMA_M}] m`);
      if (o.sigmaHeight !== null && !(o.sigmaHeight > 0 && o.sigmaHeight <= MAX_SIGMA_M)) report(o.line, f("sigma_height"), `sigma_height ${o.sigmaHeight} m must be in (0, ${MAX_SIGMA_M}] m`);
    }
  }
  if (dropped > 0) errors.push({ line: null, field: null, message: `${dropped} more error${dropped === 1 ? "" : "s"} not shown` });
  return errors;
}

const isoTime = z.string().refine((s) => normaliseIsoTime(s) !== null, { message: "must be ISO 8601 with an offset or Z, e.g. 2024-03-01T08:15:00Z" });
const booleanFlag = z.enum(["true", "false", "1", "0", ""]).transform((s) => s === "true" || s === "1" || s === "");

/** Query of POST /api/v1/sites/{slug}/epochs. */
export const ingestQuerySchema = z.strictObject({
  time: isoTime.optional(),
  revise: booleanFlag.optional(),
});
export type IngestQuery = z.infer<typeof ingestQuerySchema>;

export const EPOCH_PAGE_DEFAULT = 50;
export const EPOCH_PAGE_MAX = 1000;
export const EPOCH_PAGE_MAX_WITH_OBSERVATIONS = 100;

/** Query of GET /api/v1/sites/{slug}/epochs. */
export const epochListQuerySchema = z.strictObject({
  from: isoTime.optional(),
  to: isoTime.optional(),
  limit: z.coerce.number().int().min(1).max(EPOCH_PAGE_MAX).optional(),
  cursor: z.string().max(200).optional(),
  observations: booleanFlag.optional(),
  revisions: z.enum(["current", "all"]).optional(),
});
export type EpochListQuery = z.infer<typeof epochListQuerySchema>;

/** Query of GET /api/v1/sites/{slug}/points. */
export const pointListQuerySchema = z.strictObject({});

/** zod issues as field errors for a query string (`line` null, `field` the parameter). */
export function queryIssues(error: z.ZodError): InputError[] {
  return error.issues.map((i) => {
    const key = i.code === "unrecognized_keys" ? i.keys.join(", ") : i.path.map(String).join(".");
    return { line: null, field: key || null, message: i.code === "unrecognized_keys" ? `unknown query parameter ${key}` : `${key}: ${i.message}` };
  });
}

/** `epochal site create` and the sites service. */
export const siteCreateSchema = z
  .strictObject({
    slug: z.string().regex(/^[a-z0-9](?:[a-z0-9-]{0,62}[a-z0-9])?$/, "lower-case letters, digits and inner hyphens, at most 64 characters"),
    name: z.string().trim().min(1).max(200),
    timeZone: z.string().refine((s) => IANAZone.isValidZone(s), { message: "not an IANA time zone (e.g. Europe/Zurich, UTC)" }),
    sigmaHM: z.number().positive().max(MAX_SIGMA_M).optional(),
    sigmaVM: z.number().positive().max(MAX_SIGMA_M).optional(),
    originLatDeg: z.number().min(-90).max(90).optional(),
    originLonDeg: z.number().min(-180).max(180).optional(),
    originHeightM: z.number().min(-MAX_ABS_HEIGHT_M).max(MAX_ABS_HEIGHT_M).optional(),
    refuseUnknownPoints: z.boolean().optional(),
  })
  .refine((s) => [s.originLatDeg, s.originLonDeg, s.originHeightM].every((v) => v === undefined) || [s.originLatDeg, s.originLonDeg, s.originHeightM].every((v) => v !== undefined), {
    message: "give all of origin latitude, longitude and height, or none",
    path: ["originLatDeg"],
  });
export type SiteCreateInput = z.input<typeof siteCreateSchema>;
