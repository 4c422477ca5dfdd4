import { describe, expect, it } from "vitest";
import { DAMAGE_CATEGORIES, DAMAGE_CATEGORY_SOURCE, damageCategoryOf } from "../../../lib/triggers/damage-categories.ts";

describe("DAMAGE_CATEGORIES (Boscardin & Cording 1989, after Burland et al. 1977)", () => {
  it("holds the published limits of horizontal tensile strain: 0.05, 0.075, 0.15, 0.3 % (values in domain.md §6)", () => {
    expect(DAMAGE_CATEGORIES.map((c) => [c.category, c.label, c.minStrain, c.maxStrain])).toEqual([
      ["0", "negligible", 0, 0.0005],
      ["1", "very slight", 0.0005, 0.00075],
      ["2", "slight", 0.00075, 0.0015],
      ["3", "moderate", 0.0015, 0.003],
      ["4-5", "severe to very severe", 0.003, null],
    ]);
    expect(DAMAGE_CATEGORY_SOURCE).toMatch(/Boscardin & Cording \(1989\).*Burland et al\. \(1977\)/);
  });
  it("damageCategoryOf puts a strain in the category whose band holds it (lower bound inclusive)", () => {
    expect(damageCategoryOf(0.0004)?.category).toBe("0");
    expect(damageCategoryOf(0.0005)?.category).toBe("1");
    expect(damageCategoryOf(0.001)?.category).toBe("2");
    expect(damageCategoryOf(0.002)?.category).toBe("3");
    expect(damageCategoryOf(0.01)?.category).toBe("4-5");
    expect(damageCategoryOf(-0.002)?.category).toBe("0");
    expect(damageCategoryOf(NaN)).toBeNull();
  });
});
