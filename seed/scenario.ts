/**
 * The demo scenario: an invented site, built from a seed, the same on every run.
 *
 * "Copperwick Lane station box" — a 120 m × 24 m deep excavation for a new underground station, dug
 * from west to east over five months, beside an invented terrace of old masonry houses (Nos. 12–26
 * Ashwend Row, whose two end gables face the dig) and a road retaining wall on the far side. Every name,
 * coordinate and event is made up; the physics is simple and common practice, not a design method.
 *
 *            N ↑                 Nos. 12–26 Ashwend Row (terrace)
 *     7154 ─   ·  ·  ┌───────────────────────────────┐  ·   ·        gables (prisms on the faces):
 *              ·  ·  │No.12                     No.26│  ·   ·        No. 12 at E 4186, No. 26 at E 4234
 *     7138 ─   ·  ·  └───────────────────────────────┘  ·   ·
 *     7132 ─ ·   ┌───────────────────────────────────────────┐   ·   ground targets · all around
 *              · │   station box (pit), dug west → east      │ ·
 *     7108 ─ ·   └───────────────────────────────────────────┘   ·
 *     7086 ─ W01 ─ W02 ─ … retaining wall crest (joints every 40 m) … ─ W17
 *              4120      4150                              4270      4280 → E
 *   References REF1–REF6 stand 120–200 m away, outside any movement.
 *
 * Movements (all SI, metres, days since the first epoch):
 * - Settlement trough, Gaussian in the distance y from the pit's centreline (Peck 1969, "Deep
 *   excavations and tunnelling in soft ground", Proc. 7th ICSMFE, State-of-the-art volume):
 *   S(y) = S_max·exp(−y²/2i²), i = K·z0, with z0 growing with the excavation depth (here
 *   z0 = depth + B/2 for a box of width B, so the trough reaches behind the walls), and S_max
 *   proportional to depth. Common practice for a first estimate, not a prediction.
 * - Horizontal movement toward the pit, proportional to the slope of the trough: h = y·S/z0
 *   (O'Reilly & New 1982, "Settlements above tunnels in the United Kingdom — their magnitude and
 *   prediction", Tunnelling '82, IMM: the sink-point relation, commonly used).
 * - Buildings follow the greenfield movement at their plan position (a conservative assumption,
 *   common practice in damage assessment, e.g. Mair, Taylor & Burland 1996).
 * - A pumping test at the east end (days 42–75): a small settlement bowl that mostly recovers.
 * - Wall crest: thermal expansion of 40 m bays about their centres (α = 10 µε/K for concrete) and
 *   out-of-plane bowing, with an annual and a daily temperature cycle.
 * - An accelerating zone at the north-west corner over the last three weeks: velocity ∝ 1/(t_f − t),
 *   the behaviour that the inverse-velocity method (Fukuzono 1985) extrapolates to t_f.
 * - Survey noise N(0, σ) at the site's σ (1 mm horizontal, 1.5 mm vertical; the baseline epoch is the
 *   mean of four sets, σ/2, stated per observation), a few missed readings,
 *   a crane blocking one gable for a day, and one ground target knocked and replaced under a new code.
 *
 * The pieces live by concept: seed/layout.ts (site, geometry, targets, elements), seed/movements.ts
 * (the movement models), seed/events.ts (the knocked target, the obstruction, missed readings) and
 * seed/scenario-types.ts (the data types). This file puts them together and re-exports the public API.
 */
import { planEvents, readingSkipped, applyEvents, isoUtc, MISS_PROBABILITY } from "./events.ts";
import { gableElements, gablePoints, groundPoints, referencePoints, SITE, wallElements, wallPoints } from "./layout.ts";
import { modelDisplacement, temperatureChangeK } from "./movements.ts";
import { createRandom } from "./random.ts";
import { CYCLE_S, DAY_S, type Scenario, type ScenarioEpoch, type ScenarioObservation, type ScenarioOptions, type ScenarioPoint } from "./scenario-types.ts";

export { CYCLE_S } from "./scenario-types.ts";
export type { PointGroup, Scenario, ScenarioElement, ScenarioEpoch, ScenarioEvent, ScenarioObservation, ScenarioOptions, ScenarioPoint, ScenarioSite } from "./scenario-types.ts";
export { GABLES, PIT, SITE, WALL } from "./layout.ts";
export { ACCELERATION, DEWATERING, excavationDepthM, modelDisplacement, temperatureChangeK, THERMAL, TROUGH, troughAt } from "./movements.ts";

export const DEFAULT_SEED = 20260601;
export const DEFAULT_START = "2026-06-01T00:00:00Z";
export const DEFAULT_EPOCHS = 730;

/**
 * The first epoch is the baseline survey: the mean of four sets, so its σ is half the site's
 * (σ/√4; common practice is to take the baseline from several readings, since every later strain is
 * measured against it).
 */
export const BASELINE_SETS = 4;

function round4(x: number): number {
  return Math.round(x * 1e4) / 1e4;
}

/**
 * Builds the whole scenario. Pure and reproducible: the same options give the same points, elements
 * and epochs, to the last digit.
 */
export function generateScenario(opts: ScenarioOptions = {}): Scenario {
  const seed = opts.seed ?? DEFAULT_SEED;
  const count = opts.epochs ?? DEFAULT_EPOCHS;
  if (!Number.isInteger(count) || count < 1) throw new RangeError(`generateScenario: epochs must be a positive integer, got ${count}`);
  const startMs = Date.parse(opts.start ?? DEFAULT_START);
  if (!Number.isFinite(startMs)) throw new RangeError(`generateScenario: start is not a date-time: ${opts.start}`);
  const startS = Math.round(startMs / 1000);
  const rnd = createRandom(seed);

  const ground = groundPoints(rnd);
  const h12 = gablePoints("house-12");
  const h26 = gablePoints("house-26");
  const wall = wallPoints();
  const refs = referencePoints();
  const points: ScenarioPoint[] = [...ground, ...h12, ...h26, ...wall, ...refs];
  const elements = [...gableElements("house-12"), ...gableElements("house-26"), ...wallElements(wall)];

  const endDays = ((count - 1) * CYCLE_S) / DAY_S;
  const plan = planEvents(ground, count, startS, endDays);
  const { events } = plan;
  if (plan.replacedIndex < count) points.push(plan.replacement);

  const sh = SITE.sigmaHM;
  const sv = SITE.sigmaVM;
  const epochs: ScenarioEpoch[] = [];
  for (let k = 0; k < count; k++) {
    const timeS = startS + k * CYCLE_S;
    const tDays = (k * CYCLE_S) / DAY_S;
    const dT = temperatureChangeK(timeS, startS);
    const observations: ScenarioObservation[] = [];
    for (const p of points) {
      // Draw the noise first, whatever happens to the reading, so that one event does not reshuffle
      // every later number.
      const ne = rnd.normal() * sh;
      const nn = rnd.normal() * sh;
      const nh = rnd.normal() * sv;
      const missed = rnd.uniform() < MISS_PROBABILITY;
      if (readingSkipped(plan, p, k, missed)) continue;
      const u = applyEvents(plan, p, k, modelDisplacement(p, tDays, endDays, dT));
      const f = k === 0 ? 1 / Math.sqrt(BASELINE_SETS) : 1;
      const o: ScenarioObservation = { point: p.code, east: round4(p.east + u[0] + f * ne), north: round4(p.north + u[1] + f * nn), height: round4(p.height + u[2] + f * nh) };
      if (k === 0) Object.assign(o, { sigmaEast: f * sh, sigmaNorth: f * sh, sigmaHeight: f * sv });
      observations.push(o);
    }
    epochs.push({ time: isoUtc(timeS), observations });
  }
  for (const p of points) {
    p.east = round4(p.east);
    p.north = round4(p.north);
    p.height = round4(p.height);
  }
  return { seed, site: { ...SITE }, points, elements, epochs, events };
}
