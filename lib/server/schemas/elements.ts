/**
 * Boundary schemas of elements, series and trends (zod). Each failure becomes one AppError("invalid")
 * whose `errors` name the field (`points`, `mode`, `generate.minAngleDeg`, `quantity`, …).
 *
 * Points per kind (domain.md §2): triangle 3, baseline 2, group ≥ 3 (plan) or ≥ 4 (volume); no point
 * twice. Whether the points exist on the site and whether the name is free are checked by the service.
 */
import { z } from "zod";
import { Duration } from "luxon";
import { AppError, type FieldError } from "../errors.ts";
import { DISPLACEMENT_COMPONENTS } from "../../series/displacement.ts";

export const ELEMENT_KINDS = ["triangle", "baseline", "group"] as const;
const MODES = { triangle: ["plan", "surface"], baseline: ["slope", "horizontal"], group: ["plan", "volume"] } as const;
const DEFAULT_MODE = { triangle: "plan", baseline: "slope", group: "plan" } as const;

const name = z.string().trim().min(1, "name is required").max(100, "name is at most 100 characters");
const label = z.string().trim().max(200, "label is at most 200 characters");
const pointCode = z.string().trim().min(1, "a point code is empty").max(100);

export const ElementManualSchema = z
  .object({
    name,
    label: label.optional(),
    kind: z.enum(ELEMENT_KINDS),
    mode: z.string().optional(),
    points: z.array(pointCode).min(1, "points are required"),
    referenceEpochId: z.number().int().positive().nullable().optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    const mode = v.mode ?? DEFAULT_MODE[v.kind];
    if (!(MODES[v.kind] as readonly string[]).includes(mode)) {
      ctx.addIssue({ code: "custom", path: ["mode"], message: `mode "${mode}" is not a ${v.kind} mode (${MODES[v.kind].join(", ")})` });
      return;
    }
    const n = v.points.length;
    if (v.kind === "triangle" && n !== 3) ctx.addIssue({ code: "custom", path: ["points"], message: `a triangle needs exactly 3 points, got ${n}` });
    if (v.kind === "baseline" && n !== 2) ctx.addIssue({ code: "custom", path: ["points"], message: `a baseline needs exactly 2 points, got ${n}` });
    if (v.kind === "group" && mode === "plan" && n < 3) ctx.addIssue({ code: "custom", path: ["points"], message: `a plan group needs at least 3 points, got ${n}` });
    if (v.kind === "group" && mode === "volume" && n < 4) ctx.addIssue({ code: "custom", path: ["points"], message: `a volume group needs at least 4 points, got ${n}` });
    const repeated = v.points.find((p, i) => v.points.indexOf(p) !== i);
    if (repeated !== undefined) ctx.addIssue({ code: "custom", path: ["points"], message: `point ${repeated} appears twice` });
  })
  .transform((v) => ({ ...v, mode: v.mode ?? DEFAULT_MODE[v.kind] }));
export type ElementManualInput = z.output<typeof ElementManualSchema>;

export const TriangulationOptionsSchema = z
  .object({
    minAngleDeg: z.number().min(0).max(59.9).optional(),
    maxEdgeM: z.number().positive().optional(),
    /** Only points of this Point.group. */
    pointGroup: z.string().trim().min(1).max(100).optional(),
    /** Prefix of the element names; the name is the prefix and the triangle's codes joined by "-". */
    namePrefix: z.string().max(50).optional(),
  })
  .strict();
export type TriangulationOptions = z.output<typeof TriangulationOptionsSchema>;

export const ElementGenerateSchema = z.object({ generate: TriangulationOptionsSchema }).strict();

export const ElementPatchSchema = z
  .object({
    name: name.optional(),
    label: label.optional(),
    /** A number re-baselines the element on that epoch; null returns it to the site's reference. */
    referenceEpochId: z.number().int().positive().nullable().optional(),
    disabled: z.boolean().optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, { message: "nothing to change" });
export type ElementPatchInput = z.output<typeof ElementPatchSchema>;

export const ELEMENT_QUANTITIES = ["greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg", "engineering"] as const;
export type ElementQuantity = (typeof ELEMENT_QUANTITIES)[number];
export const SERIES_MODES = ["cumulative", "incremental", "rate"] as const;
export type SeriesMode = (typeof SERIES_MODES)[number];

const isoTime = z
  .string()
  .refine((s) => /(?:Z|[+-]\d{2}:?\d{2})$/.test(s) && Number.isFinite(Date.parse(s)), "must be an ISO 8601 time with Z or an offset")
  .transform((s) => new Date(s));

export const DEFAULT_MAX_POINTS = 2000;
const seriesCommon = {
  from: isoTime.optional(),
  to: isoTime.optional(),
  maxPoints: z.coerce.number().int().min(10).max(100_000).default(DEFAULT_MAX_POINTS),
  mode: z.enum(SERIES_MODES).default("cumulative"),
};
export const ElementSeriesQuerySchema = z.object({ quantity: z.enum(ELEMENT_QUANTITIES), ...seriesCommon }).strict();
export type ElementSeriesQuery = z.output<typeof ElementSeriesQuerySchema>;
export const PointSeriesQuerySchema = z.object({ component: z.enum(DISPLACEMENT_COMPONENTS), ...seriesCommon }).strict();
export type PointSeriesQuery = z.output<typeof PointSeriesQuerySchema>;

export const TrendQuerySchema = z
  .object({
    quantity: z.enum(ELEMENT_QUANTITIES),
    window: z
      .string()
      .default("P30D")
      .refine((s) => Duration.fromISO(s).isValid && Duration.fromISO(s).as("milliseconds") > 0, "must be a positive ISO 8601 duration such as P30D or PT12H")
      .transform((s) => Duration.fromISO(s).as("milliseconds")),
    /** Comma-separated levels; absent: the levels of the element's trigger rules for this quantity. */
    levels: z
      .string()
      .optional()
      .transform((s, ctx) => {
        if (s === undefined || s.trim() === "") return undefined;
        const parts = s.split(",").map((p) => Number(p.trim()));
        if (parts.some((x) => !Number.isFinite(x))) {
          ctx.addIssue({ code: "custom", message: "levels must be comma-separated numbers" });
          return z.NEVER;
        }
        return parts;
      }),
    smoothWindow: z.coerce.number().int().min(1).max(99).refine((n) => n % 2 === 1, "smoothWindow must be odd").default(5),
  })
  .strict();
export type TrendQuery = z.output<typeof TrendQuerySchema>;

export function zodFieldErrors(err: z.ZodError, prefix = ""): FieldError[] {
  return err.issues.map((i) => ({ line: null, field: [prefix, ...i.path.map(String)].filter(Boolean).join(".") || null, message: i.message }));
}

/** Parses or throws AppError("invalid") with one FieldError per issue. */
export function parseOrThrow<S extends z.ZodType>(schema: S, value: unknown, what: string): z.output<S> {
  const r = schema.safeParse(value);
  if (!r.success) {
    const errors = zodFieldErrors(r.error);
    throw new AppError("invalid", `Invalid ${what}: ${errors.map((e) => (e.field ? `${e.field}: ${e.message}` : e.message)).join("; ")}`, { errors });
  }
  return r.data;
}

/** URL search parameters as a plain object (last value wins) for the query schemas. */
export function searchParamsObject(url: string): Record<string, string> {
  return Object.fromEntries(new URL(url).searchParams.entries());
}

/** A JSON request body, or AppError("bad_request"); `emptyAs` stands in for an empty body when given. */
export async function readJsonBody(req: Request, emptyAs?: unknown): Promise<unknown> {
  const text = await req.text();
  if (text.trim() === "" && emptyAs !== undefined) return emptyAs;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    throw new AppError("bad_request", "The request body must be JSON.");
  }
}
