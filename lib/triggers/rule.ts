/**
 * Trigger levels and the quantities a rule watches.
 *
 * A rule compares one *compared value* c against three rising levels review < alert < limit (all
 * dimensionless strain, or strain per day for rates). How c comes from the stored quantity:
 *
 *   quantity      sense       c                 why
 *   greenMax      value       greenMax          extension (tension) is what cracks buildings
 *   greenMin      negated     −greenMin         contraction: a growing compressive strain gives a growing c
 *   maxShear      value       maxShear          γ_max = E_max − E_min ≥ 0 already
 *   arealStrain   magnitude   |ΔA/A|            swelling and shrinking both matter (heave, settlement)
 *   engineering   magnitude   |(l − L)/L|       a baseline opening or closing (crack gauge, convergence)
 *
 * Rates: `<quantity>.ratePerDay` = (v_i − v_{i−1}) / Δt_days between consecutive current epochs of the
 * same reference, with the same sense applied to the rate (so `greenMin.ratePerDay` is the rate of
 * contraction and `arealStrain.ratePerDay` is |d(ΔA/A)/dt|).
 *
 * A value at or above a level's threshold (c ≥ level) has crossed it.
 */

export const LEVELS = ["review", "alert", "limit"] as const;
export type TriggerLevel = (typeof LEVELS)[number];

export const BASE_QUANTITIES = ["greenMax", "greenMin", "maxShear", "arealStrain", "engineering"] as const;
export type BaseQuantity = (typeof BASE_QUANTITIES)[number];
export type RateQuantity = `${BaseQuantity}.ratePerDay`;
export type RuleQuantity = BaseQuantity | RateQuantity;

export const RULE_QUANTITIES: readonly RuleQuantity[] = [
  ...BASE_QUANTITIES,
  ...BASE_QUANTITIES.map((q) => `${q}.ratePerDay` as RateQuantity),
];

export type Sense = "value" | "negated" | "magnitude";

export const QUANTITY_SENSE: Record<BaseQuantity, Sense> = {
  greenMax: "value",
  greenMin: "negated",
  maxShear: "value",
  arealStrain: "magnitude",
  engineering: "magnitude",
};

/** Elements each quantity exists for: baselines carry only `engineering`; triangles and groups the rest. */
export const QUANTITY_ELEMENT_KINDS: Record<BaseQuantity, readonly string[]> = {
  greenMax: ["triangle", "group"],
  greenMin: ["triangle", "group"],
  maxShear: ["triangle", "group"],
  arealStrain: ["triangle", "group"],
  engineering: ["baseline"],
};

export function isRuleQuantity(s: string): s is RuleQuantity {
  return (RULE_QUANTITIES as readonly string[]).includes(s);
}

export function isTriggerLevel(s: string): s is TriggerLevel {
  return (LEVELS as readonly string[]).includes(s);
}

/** `greenMax.ratePerDay` → { base: "greenMax", isRate: true }. */
export function parseQuantity(q: RuleQuantity): { base: BaseQuantity; isRate: boolean } {
  const isRate = q.endsWith(".ratePerDay");
  return { base: (isRate ? q.slice(0, -".ratePerDay".length) : q) as BaseQuantity, isRate };
}

/** 0 for review, 1 alert, 2 limit; −1 for no level (null). */
export function levelRank(level: TriggerLevel | null): number {
  return level === null ? -1 : LEVELS.indexOf(level);
}

export function higherLevel(a: TriggerLevel | null, b: TriggerLevel | null): TriggerLevel | null {
  return levelRank(a) >= levelRank(b) ? a : b;
}

export type RuleLevels = { review: number; alert: number; limit: number };

export type RuleSpec = {
  quantity: RuleQuantity;
  levels: RuleLevels;
  /** Absolute, in the units of the levels (strain, or strain per day for rates); ≥ 0. */
  hysteresis: number;
  /** When true, a value that is not significant never opens or escalates an alert. */
  significantOnly: boolean;
};

/** Problems with a rule's levels as plain messages keyed by field; empty when valid. */
export function checkRuleLevels(levels: RuleLevels, hysteresis: number): { field: string; message: string }[] {
  const out: { field: string; message: string }[] = [];
  for (const l of LEVELS) if (!Number.isFinite(levels[l])) out.push({ field: `${l}Level`, message: "must be a finite number" });
  if (!Number.isFinite(hysteresis) || hysteresis < 0) out.push({ field: "hysteresis", message: "must be a finite number ≥ 0" });
  if (out.length) return out;
  if (!(levels.review < levels.alert)) out.push({ field: "alertLevel", message: "must be greater than the review level" });
  if (!(levels.alert < levels.limit)) out.push({ field: "limitLevel", message: "must be greater than the alert level" });
  return out;
}

/** The highest level whose threshold c reaches (c ≥ threshold), or null below review. */
export function crossedLevel(levels: RuleLevels, c: number): TriggerLevel | null {
  let out: TriggerLevel | null = null;
  for (const l of LEVELS) if (c >= levels[l]) out = l;
  return out;
}
