import { describe, expect, it } from "vitest";
import { RULE_PRESETS, findPreset } from "../../../lib/triggers/presets.ts";
import { checkRuleLevels } from "../../../lib/triggers/rule.ts";

// Reference: Boscardin & Cording (1989), Table 2, after Burland et al. (1977), as quoted in the domain
// notes §6: category 1 very slight 0.05–0.075 %, 2 slight 0.075–0.15 %, 3 moderate 0.15–0.3 %.
describe("RULE_PRESETS", () => {
  it("building-tensile-strain levels are the starts of categories 1, 2 and 3 (0.05 %, 0.075 %, 0.15 %)", () => {
    const p = findPreset("building-tensile-strain");
    expect(p).not.toBeNull();
    expect(p!.quantity).toBe("greenMax");
    expect(p!.levels.review).toBeCloseTo(0.0005, 15);
    expect(p!.levels.alert).toBeCloseTo(0.00075, 15);
    expect(p!.levels.limit).toBeCloseTo(0.0015, 15);
    expect(p!.categories.review.label).toBe("very slight");
    expect(p!.categories.alert.label).toBe("slight");
    expect(p!.categories.limit.label).toBe("moderate");
  });

  it("every preset names its source and the caution, and has valid rising levels", () => {
    for (const p of RULE_PRESETS) {
      expect(p.source).toMatch(/Boscardin & Cording \(1989\)/);
      expect(p.source).toMatch(/Burland/);
      expect(p.caution).toMatch(/engineer sets the real levels/);
      expect(checkRuleLevels(p.levels, p.hysteresis)).toEqual([]);
      expect(p.hysteresis).toBeLessThan(p.levels.alert - p.levels.review);
    }
  });

  it("findPreset returns null for an unknown id", () => {
    expect(findPreset("nope")).toBeNull();
  });
});
