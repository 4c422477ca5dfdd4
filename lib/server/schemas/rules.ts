/**
 * Trigger-rule boundary (API bodies). Levels and hysteresis are dimensionless strain (strain per day
 * for `*.ratePerDay` quantities), in the compared sense of lib/triggers/rule.ts. A `preset` fills in
 * the quantity, levels, hysteresis and responses that the body leaves out.
 */
import { z } from "zod";
import { RULE_QUANTITIES } from "../../triggers/rule.ts";

const level = z.number().finite().min(-1).max(1e3);
const response = z.string().max(4000);
const elementIds = z.array(z.number().int().positive()).min(1, "Give at least one element.").max(10_000);

export const RuleCreateBody = z
  .object({
    name: z.string().trim().min(1).max(200),
    preset: z.string().trim().min(1).max(100).optional(),
    quantity: z.enum(RULE_QUANTITIES as [string, ...string[]]).optional(),
    elementIds,
    reviewLevel: level.optional(),
    alertLevel: level.optional(),
    limitLevel: level.optional(),
    hysteresis: z.number().finite().min(0).max(1e3).optional(),
    significantOnly: z.boolean().optional(),
    responseReview: response.optional(),
    responseAlert: response.optional(),
    responseLimit: response.optional(),
    enabled: z.boolean().optional(),
  })
  .strict();
export type RuleCreateInput = z.output<typeof RuleCreateBody>;

export const RulePatchBody = z
  .object({
    name: z.string().trim().min(1).max(200).optional(),
    quantity: z.enum(RULE_QUANTITIES as [string, ...string[]]).optional(),
    elementIds: elementIds.optional(),
    reviewLevel: level.optional(),
    alertLevel: level.optional(),
    limitLevel: level.optional(),
    hysteresis: z.number().finite().min(0).max(1e3).optional(),
    significantOnly: z.boolean().optional(),
    responseReview: response.optional(),
    responseAlert: response.optional(),
    responseLimit: response.optional(),
    enabled: z.boolean().optional(),
  })
  .strict();
export type RulePatchInput = z.output<typeof RulePatchBody>;
