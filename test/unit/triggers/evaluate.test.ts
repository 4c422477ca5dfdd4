import { describe, expect, it } from "vitest";
import { evaluateTransition, heldLevel, nextState, type AlertState, type Transition } from "../../../lib/triggers/evaluate.ts";
import type { RuleSpec } from "../../../lib/triggers/rule.ts";
import type { ComparedValue } from "../../../lib/triggers/quantities.ts";

// Levels in µε for readability: review 500, alert 750, limit 1500, hysteresis 50.
const U = 1e-6;
const rule: RuleSpec = { quantity: "greenMax", levels: { review: 500 * U, alert: 750 * U, limit: 1500 * U }, hysteresis: 50 * U, significantOnly: true };
const sig = (ue: number): ComparedValue => ({ compared: ue * U, raw: ue * U, sigma: 10 * U, isSignificant: true });
const nsig = (ue: number): ComparedValue => ({ compared: ue * U, raw: ue * U, sigma: 1000 * U, isSignificant: false });
const none: AlertState = { status: "none" };
const open = (level: "review" | "alert" | "limit"): AlertState => ({ status: "open", level });
const watch = (level: "review" | "alert" | "limit"): AlertState => ({ status: "watch", level });

const table: [string, AlertState, ComparedValue | null, Transition][] = [
  ["no alert, below review", none, sig(499), { kind: "none" }],
  ["no alert, exactly at review opens (c ≥ level)", none, sig(500), { kind: "open", level: "review" }],
  ["no alert, jump straight past limit opens at limit", none, sig(2000), { kind: "open", level: "limit" }],
  ["no alert, not significant crossing is a watch", none, nsig(800), { kind: "watch", level: "alert" }],
  ["no alert, missing value", none, null, { kind: "no-value" }],
  ["open review, rise to alert escalates", open("review"), sig(760), { kind: "escalate", from: "review", level: "alert" }],
  ["open review, not significant rise is held", open("review"), nsig(1600), { kind: "held", level: "review", wouldBe: "limit" }],
  ["open alert, within hysteresis below alert stays", open("alert"), sig(701), { kind: "stay", level: "alert" }],
  ["open alert, exactly alert − h stays", open("alert"), sig(700), { kind: "stay", level: "alert" }],
  ["open alert, past hysteresis below alert de-escalates to review", open("alert"), sig(699), { kind: "de-escalate", from: "alert", level: "review" }],
  ["open limit, fall to 600 de-escalates to review", open("limit"), sig(600), { kind: "de-escalate", from: "limit", level: "review" }],
  ["open review, within hysteresis below review stays", open("review"), sig(460), { kind: "stay", level: "review" }],
  ["open review, below review − h clears", open("review"), sig(449), { kind: "clear", from: "review" }],
  ["open limit, collapse to zero clears at once", open("limit"), sig(0), { kind: "clear", from: "limit" }],
  ["open alert, not significant fall still clears", open("alert"), nsig(10), { kind: "clear", from: "alert" }],
  ["open alert, missing value changes nothing", open("alert"), null, { kind: "no-value" }],
  ["watch review, significant value at review opens", watch("review"), sig(520), { kind: "open", level: "review" }],
  ["watch review, not significant rise to limit stays a watch", watch("review"), nsig(1600), { kind: "watch", level: "limit" }],
  ["watch alert, within hysteresis stays a watch", watch("alert"), nsig(720), { kind: "stay", level: "alert" }],
  ["watch alert, falls to review level", watch("alert"), nsig(600), { kind: "watch", level: "review" }],
  ["watch review, falls away clears", watch("review"), nsig(100), { kind: "clear", from: "review" }],
];

describe("evaluateTransition", () => {
  it.each(table)("evaluateTransition: %s", (_title, state, v, expected) => {
    expect(evaluateTransition(rule, state, v)).toEqual(expected);
  });

  it("evaluateTransition with significantOnly=false opens on a non-significant crossing", () => {
    expect(evaluateTransition({ ...rule, significantOnly: false }, none, nsig(800))).toEqual({ kind: "open", level: "alert" });
    expect(evaluateTransition({ ...rule, significantOnly: false }, open("review"), nsig(800))).toEqual({ kind: "escalate", from: "review", level: "alert" });
  });

  it("evaluateTransition treats unknown σ as significant (never hides a crossing)", () => {
    expect(evaluateTransition(rule, none, { compared: 800 * U, raw: 800 * U, sigma: null, isSignificant: null })).toEqual({ kind: "open", level: "alert" });
  });

  it("evaluateTransition: a value wobbling ±40 µε around the alert level escalates once and never flaps", () => {
    let state: AlertState = open("review");
    const kinds: string[] = [];
    for (const ue of [760, 715, 790, 712, 745, 751, 705, 780]) {
      const t = evaluateTransition(rule, state, sig(ue));
      kinds.push(t.kind);
      state = nextState(state, t);
    }
    expect(kinds).toEqual(["escalate", "stay", "stay", "stay", "stay", "stay", "stay", "stay"]);
    expect(state).toEqual(open("alert"));
  });

  it("evaluateTransition with zero hysteresis follows the value down at once", () => {
    const r0 = { ...rule, hysteresis: 0 };
    expect(evaluateTransition(r0, open("alert"), sig(749.9))).toEqual({ kind: "de-escalate", from: "alert", level: "review" });
    expect(evaluateTransition(r0, open("review"), sig(499.9))).toEqual({ kind: "clear", from: "review" });
  });

  it("evaluateTransition does not change its inputs", () => {
    const s: AlertState = open("alert");
    const v = sig(100);
    const copy = JSON.stringify([rule, s, v]);
    evaluateTransition(rule, s, v);
    expect(JSON.stringify([rule, s, v])).toBe(copy);
  });
});

describe("heldLevel", () => {
  it("heldLevel returns the highest level at or below the current one within the hysteresis band", () => {
    expect(heldLevel(rule, "limit", 1460 * U)).toBe("limit");
    expect(heldLevel(rule, "limit", 1449 * U)).toBe("alert");
    expect(heldLevel(rule, "alert", 5000 * U)).toBe("alert");
    expect(heldLevel(rule, "review", 449 * U)).toBeNull();
  });
});

describe("nextState", () => {
  it("nextState keeps a watch a watch when it stays, and clears to none", () => {
    expect(nextState(watch("alert"), { kind: "stay", level: "alert" })).toEqual(watch("alert"));
    expect(nextState(open("alert"), { kind: "clear", from: "alert" })).toEqual(none);
    expect(nextState(watch("review"), { kind: "open", level: "alert" })).toEqual(open("alert"));
    expect(nextState(open("alert"), { kind: "no-value" })).toEqual(open("alert"));
  });
});
