/** zod schemas at the dashboard's boundaries (query strings and small JSON bodies). */
import { z } from "zod";
import { AppError } from "../errors.ts";

const id = z.coerce.number().int().positive();

/** GET …/field?epoch=ID[&from=ID][&k=1.96] */
export const fieldQuerySchema = z.object({
  epoch: id,
  from: id.optional(),
  k: z.coerce.number().positive().max(10).optional(),
});
export type FieldQuery = z.infer<typeof fieldQuerySchema>;

/** PATCH …/points/{code}: any subset of the editable fields; σ in metres (null = use the site default). */
export const pointPatchSchema = z
  .object({
    isReference: z.boolean().optional(),
    group: z.string().trim().max(100).nullable().optional(),
    kind: z.enum(["prism", "gnss", "levelling", "other"]).optional(),
    sigmaHM: z.number().positive().max(10).nullable().optional(),
    sigmaVM: z.number().positive().max(10).nullable().optional(),
    note: z.string().max(2000).nullable().optional(),
  })
  .strict();
export type PointPatch = z.infer<typeof pointPatchSchema>;

/** Parses with a schema; failures become one 422 AppError listing every field. */
export function parseOrThrow<T>(schema: z.ZodType<T>, input: unknown, what: string): T {
  const r = schema.safeParse(input);
  if (r.success) return r.data;
  throw new AppError("invalid", `Invalid ${what}.`, {
    errors: r.error.issues.map((i) => ({ line: null, field: i.path.join(".") || null, message: i.message })),
  });
}
