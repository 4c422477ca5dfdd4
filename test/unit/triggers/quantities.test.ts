import { describe, expect, it } from "vitest";
import { comparedValueOf, DEFAULT_SIGNIFICANCE_K } from "../../../lib/triggers/quantities.ts";
import { checkRuleLevels, crossedLevel, RULE_QUANTITIES } from "../../../lib/triggers/rule.ts";

const DAY = 86_400_000;

describe("comparedValueOf", () => {
  it("comparedValueOf: greenMax by value, greenMin negated, arealStrain and engineering by magnitude", () => {
    const s = { timeMs: 0, value: -0.0006, sigma: 0.0001 };
    expect(comparedValueOf("greenMax", s, null)!.compared).toBeCloseTo(-0.0006, 15);
    expect(comparedValueOf("greenMin", s, null)!.compared).toBeCloseTo(0.0006, 15);
    expect(comparedValueOf("arealStrain", s, null)!.compared).toBeCloseTo(0.0006, 15);
    expect(comparedValueOf("engineering", s, null)!.compared).toBeCloseTo(0.0006, 15);
    expect(comparedValueOf("greenMin", s, null)!.raw).toBeCloseTo(-0.0006, 15);
  });

  it("comparedValueOf: significance is |f| > 1.96σ (domain notes §4)", () => {
    expect(DEFAULT_SIGNIFICANCE_K).toBeCloseTo(1.96, 2);
    expect(comparedValueOf("greenMax", { timeMs: 0, value: 0.000197, sigma: 0.0001 }, null)!.isSignificant).toBe(true);
    expect(comparedValueOf("greenMax", { timeMs: 0, value: 0.000195, sigma: 0.0001 }, null)!.isSignificant).toBe(false);
    expect(comparedValueOf("greenMax", { timeMs: 0, value: 0.0002, sigma: null }, null)!.isSignificant).toBeNull();
  });

  it("comparedValueOf: a rate per day is the difference over days, σ = √(σ₁² + σ₂²)/Δt (derived)", () => {
    const prev = { timeMs: 0, value: 0.0001, sigma: 0.00003 };
    const cur = { timeMs: 2 * DAY, value: 0.0005, sigma: 0.00004 };
    const r = comparedValueOf("greenMax.ratePerDay", cur, prev)!;
    expect(r.raw).toBeCloseTo(0.0002, 15);
    expect(r.sigma!).toBeCloseTo(0.000025, 15);
    expect(r.isSignificant).toBe(true);
    // Contraction rate: greenMin going more negative gives a positive compared rate.
    const c = comparedValueOf("greenMin.ratePerDay", { ...cur, value: -0.0005 }, { ...prev, value: -0.0001 })!;
    expect(c.compared).toBeCloseTo(0.0002, 15);
  });

  it("comparedValueOf returns null without a value, without a previous epoch for a rate, or with no time between", () => {
    expect(comparedValueOf("greenMax", { timeMs: 0, value: null, sigma: null }, null)).toBeNull();
    expect(comparedValueOf("greenMax.ratePerDay", { timeMs: DAY, value: 0.001, sigma: 0 }, null)).toBeNull();
    expect(comparedValueOf("greenMax.ratePerDay", { timeMs: DAY, value: 0.001, sigma: 0 }, { timeMs: DAY, value: 0, sigma: 0 })).toBeNull();
    expect(comparedValueOf("greenMax", { timeMs: 0, value: Number.NaN, sigma: 0 }, null)).toBeNull();
  });
});

describe("rule levels", () => {
  it("checkRuleLevels refuses levels that do not rise, negative hysteresis and NaN", () => {
    expect(checkRuleLevels({ review: 1, alert: 2, limit: 3 }, 0)).toEqual([]);
    expect(checkRuleLevels({ review: 2, alert: 2, limit: 3 }, 0).map((e) => e.field)).toEqual(["alertLevel"]);
    expect(checkRuleLevels({ review: 1, alert: 3, limit: 2 }, 0).map((e) => e.field)).toEqual(["limitLevel"]);
    expect(checkRuleLevels({ review: 1, alert: 2, limit: 3 }, -1).map((e) => e.field)).toEqual(["hysteresis"]);
    expect(checkRuleLevels({ review: Number.NaN, alert: 2, limit: 3 }, 0).map((e) => e.field)).toEqual(["reviewLevel"]);
  });

  it("crossedLevel returns the highest level reached, null below review", () => {
    const l = { review: 1, alert: 2, limit: 3 };
    expect(crossedLevel(l, 0.99)).toBeNull();
    expect(crossedLevel(l, 1)).toBe("review");
    expect(crossedLevel(l, 2.5)).toBe("alert");
    expect(crossedLevel(l, 30)).toBe("limit");
  });

  it("RULE_QUANTITIES lists each base quantity and its rate per day", () => {
    expect(RULE_QUANTITIES).toContain("greenMin.ratePerDay");
    expect(RULE_QUANTITIES.length).toBe(10);
  });
});
