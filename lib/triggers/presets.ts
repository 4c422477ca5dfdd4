/**
 * Rule presets from the literature. A preset only fills in a new rule's quantity, levels and
 * suggested responses; the site's engineer sets the real levels for each structure.
 *
 * Building damage from horizontal tensile strain: Boscardin & Cording (1989), after Burland et al.
 * (1977) — the category table is lib/triggers/damage-categories.ts. The three levels are the lower
 * bounds of categories 1, 2 and 3:
 *   review = start of category 1 "very slight" (0.05 %)
 *   alert  = start of category 2 "slight"      (0.075 %)
 *   limit  = start of category 3 "moderate"    (0.15 %)
 * Hysteresis 50 µε (a tenth of the review level) is a starting point only: it should exceed the
 * element's survey noise, which for a 10 m triangle at σ = 1 mm is about 200 µε (domain notes §4).
 */
import { DAMAGE_CATEGORIES, DAMAGE_CATEGORY_CAUTION, DAMAGE_CATEGORY_SOURCE, type DamageCategory } from "./damage-categories.ts";
import type { RuleLevels, RuleQuantity } from "./rule.ts";

export type RulePreset = {
  id: string;
  name: string;
  quantity: RuleQuantity;
  /** Element kinds the preset is meant for. */
  elementKinds: readonly string[];
  levels: RuleLevels;
  hysteresis: number;
  significantOnly: boolean;
  responses: { review: string; alert: string; limit: string };
  /** The published source of the levels. */
  source: string;
  caution: string;
  /** Which damage category each level starts. */
  categories: { review: DamageCategory; alert: DamageCategory; limit: DamageCategory };
};

function category(code: string): DamageCategory {
  const c = DAMAGE_CATEGORIES.find((d) => d.category === code);
  if (!c) throw new Error(`damage category ${code} missing from the table`);
  return c;
}

const responses = {
  review: "Check the survey and the data of this epoch; inspect the building for new cracks; consider more frequent readings.",
  alert: "Inform the site's engineer; inspect and record cracks; review the works that cause the movement and the contingency measures.",
  limit: "Stop or change the works that cause the movement as the monitoring plan requires; carry out the contingency plan; inform the owner.",
};

function buildingPreset(id: string, name: string, quantity: RuleQuantity, elementKinds: readonly string[]): RulePreset {
  const review = category("1");
  const alert = category("2");
  const limit = category("3");
  return {
    id,
    name,
    quantity,
    elementKinds,
    levels: { review: review.minStrain, alert: alert.minStrain, limit: limit.minStrain },
    hysteresis: review.minStrain / 10,
    significantOnly: true,
    responses,
    source: DAMAGE_CATEGORY_SOURCE,
    caution: DAMAGE_CATEGORY_CAUTION,
    categories: { review, alert, limit },
  };
}

export const RULE_PRESETS: readonly RulePreset[] = [
  buildingPreset("building-tensile-strain", "Building: horizontal tensile strain (plan triangles)", "greenMax", ["triangle", "group"]),
  buildingPreset("building-baseline-strain", "Building: horizontal strain of a baseline (horizontal mode)", "engineering", ["baseline"]),
];

export function findPreset(id: string): RulePreset | null {
  return RULE_PRESETS.find((p) => p.id === id) ?? null;
}
