/**
 * Demo scenario events: the excavation milestones, the crane blocking the No. 26 gable for a day,
 * the ground target knocked by site plant and replaced under a new code, the start of the
 * accelerating zone, and the rare missed reading (see seed/scenario.ts).
 */
import { ACCELERATION, modelDisplacement } from "./movements.ts";
import { CYCLE_S, DAY_S, type ScenarioEvent, type ScenarioPoint } from "./scenario-types.ts";

/** Probability that a reading of a non-reference target is missed in an epoch. */
export const MISS_PROBABILITY = 0.002;

export function isoUtc(timeS: number): string {
  return new Date(timeS * 1000).toISOString();
}

/** What happens when, worked out once before the epochs are generated. */
export interface EventPlan {
  /** The ground target knocked by site plant, the epoch it is knocked and its offset from then on. */
  knocked: ScenarioPoint;
  knockedIndex: number;
  jump: [number, number, number];
  /** Its replacement under a new code, first read at `replacedIndex`, zeroed at its own first epoch. */
  replacement: ScenarioPoint;
  replacedIndex: number;
  replacementBase: [number, number, number];
  /** Epochs [from, to) in which the No. 26 gable is hidden. */
  obstructedFrom: number;
  obstructedTo: number;
  events: ScenarioEvent[];
}

/** Plans the events for `count` epochs from `startS` (UTC s); no random draws. */
export function planEvents(ground: ScenarioPoint[], count: number, startS: number, endDays: number): EventPlan {
  // The target by the site access at the east end is knocked by a dumper and replaced three days later.
  const knockedIndex = Math.round(count * 0.575);
  const replacedIndex = knockedIndex + 12;
  const knocked = ground.reduce((best, p) => (Math.hypot(p.east - 4288, p.north - 7124) < Math.hypot(best.east - 4288, best.north - 7124) ? p : best));
  const jump: [number, number, number] = [0.021, -0.012, -0.008];
  const replacement: ScenarioPoint = {
    code: `${knocked.code}B`,
    kind: "prism",
    group: "ground",
    isReference: false,
    note: `Replaces ${knocked.code} (knocked by site plant)`,
    east: knocked.east + 0.35,
    north: knocked.north + 0.2,
    height: knocked.height + 0.05,
  };
  // A crane jib blocks the line of sight to the No. 26 gable for a day.
  const obstructedFrom = Math.round(count * 0.33);
  const obstructedTo = obstructedFrom + 4;

  const events: ScenarioEvent[] = [];
  const dayTime = (d: number) => isoUtc(startS + Math.round(d * DAY_S));
  events.push({ time: dayTime(10), kind: "excavation", text: "Excavation starts at the west end" });
  events.push({ time: dayTime(148), kind: "excavation", text: "Formation level reached at the west end" });
  if (obstructedFrom < count) events.push({ time: isoUtc(startS + obstructedFrom * CYCLE_S), kind: "obstructed", text: "Crane jib blocks the No. 26 gable for a day" });
  if (knockedIndex < count) events.push({ time: isoUtc(startS + knockedIndex * CYCLE_S), kind: "knocked", text: `${knocked.code} knocked by site plant` });
  if (replacedIndex < count) {
    events.push({ time: isoUtc(startS + replacedIndex * CYCLE_S), kind: "replaced", text: `${knocked.code} replaced by ${replacement.code}` });
  }
  if (endDays >= ACCELERATION.startsBeforeEndDays) events.push({ time: dayTime(endDays - ACCELERATION.startsBeforeEndDays), kind: "acceleration", text: "Ground behind the north-west corner starts to accelerate" });

  const replacementBase = modelDisplacement(replacement, (replacedIndex * CYCLE_S) / DAY_S, endDays, 0);
  return { knocked, knockedIndex, jump, replacement, replacedIndex, replacementBase, obstructedFrom, obstructedTo, events };
}

/** Whether point `p` has no reading at epoch `k` (before installation, after removal, hidden or missed). */
export function readingSkipped(plan: EventPlan, p: ScenarioPoint, k: number, missed: boolean): boolean {
  if (p === plan.replacement && k < plan.replacedIndex) return true;
  if (p === plan.knocked && k >= plan.replacedIndex) return true;
  if (p.group === "house-26" && k >= plan.obstructedFrom && k < plan.obstructedTo) return true;
  if (missed && !p.isReference) return true;
  return false;
}

/** The model displacement `u` of `p` at epoch `k`, corrected for the knock and the replacement. */
export function applyEvents(plan: EventPlan, p: ScenarioPoint, k: number, u: [number, number, number]): [number, number, number] {
  const b = plan.replacementBase;
  const jump = plan.jump;
  if (p === plan.replacement) u = [u[0] - b[0], u[1] - b[1], u[2] - b[2]];
  if (p === plan.knocked && k >= plan.knockedIndex) u = [u[0] + jump[0], u[1] + jump[1], u[2] + jump[2]];
  return u;
}
