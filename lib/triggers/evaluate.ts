/**
 * One step of the alert state machine for one rule and one element: previous state + new value →
 * transition. Pure; the server applies the transition (lib/server/alerts/evaluate.ts).
 *
 * States: `none` (no alert), `watch` at L (crossings seen, but no significant one yet, so no alert is
 * open: recorded and shown as "not significant", never mailed), `open` at L.
 *
 * Rising (threshold t_L, compared value c, crossed = highest L with c ≥ t_L):
 *   none  → open at crossed                 when the value counts (significant, or the rule counts all)
 *   none  → watch at crossed                when significantOnly and the value is not significant
 *   watch → open at crossed                 as soon as a counting value crosses any level
 *   open at L → escalate to crossed > L     when the value counts
 *   open at L, crossed > L, value does not count → `held`: level stays L, the crossing is recorded
 * Falling, with hysteresis h (the same for every level):
 *   the level follows the value down only past the hysteresis: new level = highest M ≤ L with
 *   c ≥ t_M − h; none such (c < t_review − h) → clear. So a value wobbling within h below a level
 *   neither drops the level nor, on coming back, re-escalates it: no flapping.
 * A value that does not count may lower or clear an alert (it is consistent with no movement) but
 * never raise one. A missing value (element degenerate, point missing, no previous epoch for a rate)
 * changes nothing. Unknown σ counts as significant: a missing precision never hides a crossing.
 */
import { crossedLevel, levelRank, LEVELS, type RuleSpec, type TriggerLevel } from "./rule.ts";
import type { ComparedValue } from "./quantities.ts";

export type AlertState = { status: "none" } | { status: "watch" | "open"; level: TriggerLevel };

export type Transition =
  | { kind: "none" }
  | { kind: "no-value" }
  | { kind: "open"; level: TriggerLevel }
  | { kind: "watch"; level: TriggerLevel }
  | { kind: "escalate"; from: TriggerLevel; level: TriggerLevel }
  | { kind: "held"; level: TriggerLevel; wouldBe: TriggerLevel }
  | { kind: "stay"; level: TriggerLevel }
  | { kind: "de-escalate"; from: TriggerLevel; level: TriggerLevel }
  | { kind: "clear"; from: TriggerLevel };

/** Whether a value counts for opening and escalating under the rule. */
export function valueCounts(rule: Pick<RuleSpec, "significantOnly">, v: Pick<ComparedValue, "isSignificant">): boolean {
  return !rule.significantOnly || v.isSignificant !== false;
}

/** Highest level M ≤ L with c ≥ t_M − h, or null (clear). */
export function heldLevel(rule: Pick<RuleSpec, "levels" | "hysteresis">, current: TriggerLevel, c: number): TriggerLevel | null {
  for (let i = levelRank(current); i >= 0; i--) {
    const m = LEVELS[i];
    if (c >= rule.levels[m] - rule.hysteresis) return m;
  }
  return null;
}

export function evaluateTransition(rule: RuleSpec, state: AlertState, v: ComparedValue | null): Transition {
  if (v === null || !Number.isFinite(v.compared)) return { kind: "no-value" };
  const crossed = crossedLevel(rule.levels, v.compared);
  const counts = valueCounts(rule, v);

  if (state.status === "none") {
    if (crossed === null) return { kind: "none" };
    return counts ? { kind: "open", level: crossed } : { kind: "watch", level: crossed };
  }

  const L = state.level;
  if (state.status === "watch" && counts && crossed !== null) return { kind: "open", level: crossed };
  if (crossed !== null && levelRank(crossed) > levelRank(L)) {
    if (state.status === "watch") return { kind: "watch", level: crossed };
    return counts ? { kind: "escalate", from: L, level: crossed } : { kind: "held", level: L, wouldBe: crossed };
  }
  const held = heldLevel(rule, L, v.compared);
  if (held === null) return { kind: "clear", from: L };
  if (levelRank(held) < levelRank(L)) {
    // A watch follows the same way down; it stays a watch.
    return state.status === "watch" ? { kind: "watch", level: held } : { kind: "de-escalate", from: L, level: held };
  }
  return { kind: "stay", level: L };
}

/** The state after a transition. */
export function nextState(state: AlertState, t: Transition): AlertState {
  switch (t.kind) {
    case "none":
    case "clear":
      return { status: "none" };
    case "no-value":
      return state;
    case "stay":
      return state.status === "none" ? state : { status: state.status, level: t.level };
    case "open":
    case "escalate":
    case "de-escalate":
    case "held":
      return { status: "open", level: t.level };
    case "watch":
      return { status: "watch", level: t.level };
  }
}
