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
 */
import { createRandom, type Random } from "./random.ts";

export const DEFAULT_SEED = 20260601;
export const DEFAULT_START = "2026-06-01T00:00:00Z";
export const DEFAULT_EPOCHS = 730;
export const CYCLE_S = 6 * 3600;
const DAY_S = 86400;

export interface ScenarioSite {
  slug: string;
  name: string;
  description: string;
  timeZone: string;
  frameDescription: string;
  sigmaHM: number;
  sigmaVM: number;
  originLatDeg: number;
  originLonDeg: number;
  originHeightM: number;
}

export type PointGroup = "ground" | "house-12" | "house-26" | "wall" | "reference";

export interface ScenarioPoint {
  code: string;
  kind: "prism";
  group: PointGroup;
  isReference: boolean;
  note: string | null;
  /** Position at the first epoch (or at installation), metres in the local grid. */
  east: number;
  north: number;
  height: number;
}

export interface ScenarioElement {
  name: string;
  label: string;
  kind: "triangle" | "baseline";
  mode: "surface" | "horizontal";
  pointCodes: string[];
  /** Which structure the element belongs to, for the trigger rules. */
  structure: "house-12" | "house-26" | "wall";
}

export interface ScenarioObservation {
  point: string;
  east: number;
  north: number;
  height: number;
  /** Only on the baseline epoch (the mean of several sets, so more precise than the site's default). */
  sigmaEast?: number;
  sigmaNorth?: number;
  sigmaHeight?: number;
}

export interface ScenarioEpoch {
  /** UTC, `YYYY-MM-DDTHH:MM:SS.000Z`. */
  time: string;
  observations: ScenarioObservation[];
}

export interface ScenarioEvent {
  time: string;
  kind: "excavation" | "knocked" | "replaced" | "obstructed" | "acceleration";
  text: string;
}

export interface Scenario {
  seed: number;
  site: ScenarioSite;
  points: ScenarioPoint[];
  elements: ScenarioElement[];
  epochs: ScenarioEpoch[];
  events: ScenarioEvent[];
}

export interface ScenarioOptions {
  seed?: number;
  /** Number of epochs at the 6-hour cycle; default 730 (six months). */
  epochs?: number;
  /** First epoch, ISO 8601 with Z or an offset; default 2026-06-01T00:00Z. */
  start?: string;
}

export const SITE: ScenarioSite = {
  slug: "copperwick-lane",
  name: "Copperwick Lane station box",
  description:
    "Invented demo site: a deep excavation for a new underground station beside Nos. 12–26 Ashwend Row (old masonry terrace) and the Ashwend Row retaining wall.",
  timeZone: "Europe/London",
  frameDescription: "Copperwick Lane local site grid: x = Easting, y = Northing, z = Height (m)",
  sigmaHM: 0.001,
  sigmaVM: 0.0015,
  // Invented origin in the open North Sea; the local grid is east-north-up metres about it.
  originLatDeg: 54.35,
  originLonDeg: 2.95,
  originHeightM: 0,
};

/** Geometry of the pit: centreline N, west and east ends E, width B (m). */
export const PIT = { centreNorth: 7120, westEast: 4150, eastEast: 4270, widthM: 24 } as const;
/** Gables: plane E, south and north ends N, target rows above ground (m). */
export const GABLES = {
  "house-12": { label: "No. 12", east: 4186, southNorth: 7138, northNorth: 7154, prefix: "H12" },
  "house-26": { label: "No. 26", east: 4234, southNorth: 7138, northNorth: 7154, prefix: "H26" },
} as const;
const GABLE_ROWS_M = [1.0, 6.0, 11.0];
const GABLE_COLUMNS = 4;
export const WALL = { north: 7086, westEast: 4120, spacingM: 10, count: 17, crestHeight: 46.8, joints: [4165, 4205, 4245] } as const;

/** Trough parameters (see the header). */
export const TROUGH = {
  /** i = K·z0 (Peck 1969; K ≈ 0.5 for clays). */
  k: 0.5,
  /** S_max per metre of excavation depth: 0.16 % of depth at the virtual centreline. */
  settlementPerDepth: 0.0016,
  /** Final formation depth at the west and east ends (m); the east end is a shallower concourse. */
  finalDepthWestM: 23,
  finalDepthEastM: 15,
  /** The east end lags the west end by this many days (the dig advances in bays). */
  lagDaysEast: 20,
};

/** Excavation stages, fraction of the final depth against days since the first epoch (west end). */
const STAGES: readonly [number, number][] = [
  [0, 0],
  [10, 0],
  [30, 0.18],
  [40, 0.18],
  [68, 0.45],
  [78, 0.45],
  [108, 0.72],
  [118, 0.72],
  [148, 1],
];

export const ACCELERATION = {
  centreEast: 4176,
  centreNorth: 7141,
  radiusM: 9,
  /** Starts this many days before the last epoch; t_f this many days after it. */
  startsBeforeEndDays: 21,
  failureAfterEndDays: 5,
  /** A in d = A·ln((t_f − t0)/(t_f − t)), metres (velocity A/(t_f − t)). */
  amplitudeM: 0.008,
};

/**
 * A pumping test at the east end (days 42–52) draws the water table down: a settlement bowl that
 * recovers mostly once pumping stops (days 52–75). Same Gaussian form and sink-point horizontal
 * movement as the trough, centred on the well.
 */
export const DEWATERING = {
  wellEast: 4252,
  wellNorth: 7126,
  iM: 10,
  z0M: 15,
  amplitudeM: 0.02,
  /** Days: start, end of pumping, end of recovery; fraction that stays. */
  startDays: 42,
  stopDays: 52,
  recoveredDays: 75,
  residual: 0.15,
};

export const THERMAL = {
  alphaPerK: 1.0e-5,
  annualAmplitudeK: 10,
  /** Day of year when the annual cycle crosses the mean upward (peak ≈ 91 days later, late July). */
  annualZeroDoy: 110,
  dailyAmplitudeK: 3,
  /** Crest bowing toward the pit per kelvin at mid-bay (m/K). */
  bowingPerK: 0.00025,
};

const MISS_PROBABILITY = 0.002;
/**
 * The first epoch is the baseline survey: the mean of four sets, so its σ is half the site's
 * (σ/√4; common practice is to take the baseline from several readings, since every later strain is
 * measured against it).
 */
export const BASELINE_SETS = 4;

function interpolate(table: readonly [number, number][], x: number): number {
  if (x <= table[0][0]) return table[0][1];
  for (let k = 1; k < table.length; k++) {
    const [x1, y1] = table[k];
    const [x0, y0] = table[k - 1];
    if (x <= x1) return y0 + ((y1 - y0) * (x - x0)) / (x1 - x0);
  }
  return table[table.length - 1][1];
}

/** Formation depth (m) at a position E along the pit at day t. */
export function excavationDepthM(eastM: number, tDays: number): number {
  const f = Math.min(1, Math.max(0, (eastM - PIT.westEast) / (PIT.eastEast - PIT.westEast)));
  const finalDepth = TROUGH.finalDepthWestM + f * (TROUGH.finalDepthEastM - TROUGH.finalDepthWestM);
  return finalDepth * interpolate(STAGES, tDays - f * TROUGH.lagDaysEast);
}

/** Trough width parameter i (m) and virtual centreline settlement S_max (m) at E, day t. */
export function troughAt(eastM: number, tDays: number): { depthM: number; z0M: number; iM: number; sMaxM: number } {
  const depthM = excavationDepthM(eastM, tDays);
  const z0M = depthM + PIT.widthM / 2;
  return { depthM, z0M, iM: TROUGH.k * z0M, sMaxM: TROUGH.settlementPerDepth * depthM };
}

function troughDisplacement(e: number, n: number, tDays: number): [number, number, number] {
  const eStar = Math.min(PIT.eastEast, Math.max(PIT.westEast, e));
  const de = e - eStar;
  const dn = n - PIT.centreNorth;
  const y = Math.hypot(de, dn);
  const { z0M, iM, sMaxM } = troughAt(eStar, tDays);
  if (sMaxM === 0 || y === 0) return [0, 0, 0];
  const s = sMaxM * Math.exp(-(y * y) / (2 * iM * iM));
  const h = (y * s) / z0M;
  return [(-h * de) / y, (-h * dn) / y, -s];
}

function dewateringDisplacement(e: number, n: number, tDays: number): [number, number, number] {
  const d = DEWATERING;
  if (tDays <= d.startDays) return [0, 0, 0];
  const a =
    tDays <= d.stopDays
      ? (tDays - d.startDays) / (d.stopDays - d.startDays)
      : tDays <= d.recoveredDays
        ? 1 - ((1 - d.residual) * (tDays - d.stopDays)) / (d.recoveredDays - d.stopDays)
        : d.residual;
  const de = e - d.wellEast;
  const dn = n - d.wellNorth;
  const r = Math.hypot(de, dn);
  const s = a * d.amplitudeM * Math.exp(-(r * r) / (2 * d.iM * d.iM));
  if (r === 0) return [0, 0, -s];
  const h = (r * s) / d.z0M;
  return [(-h * de) / r, (-h * dn) / r, -s];
}

function accelerationDisplacement(e: number, n: number, tDays: number, endDays: number): [number, number, number] {
  const t0 = endDays - ACCELERATION.startsBeforeEndDays;
  const tf = endDays + ACCELERATION.failureAfterEndDays;
  if (tDays <= t0) return [0, 0, 0];
  const d = ACCELERATION.amplitudeM * Math.log((tf - t0) / (tf - tDays));
  const r2 = (e - ACCELERATION.centreEast) ** 2 + (n - ACCELERATION.centreNorth) ** 2;
  const w = Math.exp(-r2 / (2 * ACCELERATION.radiusM ** 2));
  // Toward the pit (south) and down.
  return [0, -0.6 * d * w, -d * w];
}

/** Temperature change (K) since the first epoch, annual and daily cycles; `timeS` UTC seconds. */
export function temperatureChangeK(timeS: number, startS: number): number {
  const temp = (s: number) => {
    const d = new Date(s * 1000);
    const yearStart = Date.UTC(d.getUTCFullYear(), 0, 1) / 1000;
    const doy = (s - yearStart) / DAY_S;
    const hourUtc = (s / 3600) % 24;
    return (
      THERMAL.annualAmplitudeK * Math.sin((2 * Math.PI * (doy - THERMAL.annualZeroDoy)) / 365.25) +
      THERMAL.dailyAmplitudeK * Math.sin((2 * Math.PI * (hourUtc - 9)) / 24)
    );
  };
  return temp(timeS) - temp(startS);
}

function wallDisplacement(e: number, dT: number): [number, number, number] {
  const edges = [WALL.westEast - WALL.spacingM / 2, ...WALL.joints, WALL.westEast + (WALL.count - 1) * WALL.spacingM + WALL.spacingM / 2];
  let k = 0;
  while (k < edges.length - 2 && e > edges[k + 1]) k++;
  const a = edges[k];
  const b = edges[k + 1];
  const centre = (a + b) / 2;
  const bow = Math.sin((Math.PI * (e - a)) / (b - a));
  // Bays expand about their centres; the crest bows toward the pit (north) when warm.
  return [THERMAL.alphaPerK * dT * (e - centre), THERMAL.bowingPerK * dT * bow, 0];
}

/** Noise-free displacement (m) of a point at its nominal position, since the first epoch. */
export function modelDisplacement(p: Pick<ScenarioPoint, "east" | "north" | "group">, tDays: number, endDays: number, dTK: number): [number, number, number] {
  if (p.group === "reference") return [0, 0, 0];
  const u = troughDisplacement(p.east, p.north, tDays);
  if (p.group === "wall") {
    const w = wallDisplacement(p.east, dTK);
    return [u[0] + w[0], u[1] + w[1], u[2] + w[2]];
  }
  const a = accelerationDisplacement(p.east, p.north, tDays, endDays);
  const w = dewateringDisplacement(p.east, p.north, tDays);
  return [u[0] + a[0] + w[0], u[1] + a[1] + w[1], u[2] + a[2] + w[2]];
}

function groundHeight(e: number, n: number): number {
  return 48 + 0.012 * (e - 4200) - 0.01 * (n - 7130) + 0.6 * Math.sin((e - 4000) / 37) * Math.cos((n - 7000) / 29);
}

function pad(n: number, width: number): string {
  return String(n).padStart(width, "0");
}

/** Ground targets on a jittered staggered lattice around the pit, clear of the pit, the terrace and the wall. */
function groundPoints(rnd: Random): ScenarioPoint[] {
  const out: ScenarioPoint[] = [];
  const dE = 13.5;
  const dN = 12;
  let row = 0;
  for (let n = 7092; n <= 7176; n += dN, row++) {
    for (let e = 4108 + (row % 2) * (dE / 2); e <= 4312; e += dE) {
      const pe = e + (rnd.uniform() - 0.5) * 3;
      const pn = n + (rnd.uniform() - 0.5) * 3;
      const inPit = pe > PIT.westEast - 2.5 && pe < PIT.eastEast + 2.5 && Math.abs(pn - PIT.centreNorth) < PIT.widthM / 2 + 2.5;
      const inTerrace = pe > GABLES["house-12"].east - 2 && pe < GABLES["house-26"].east + 2 && pn > GABLES["house-12"].southNorth - 2 && pn < GABLES["house-12"].northNorth + 2;
      const onWall = Math.abs(pn - WALL.north) < 3;
      if (inPit || inTerrace || onWall) continue;
      out.push({ code: "", kind: "prism", group: "ground", isReference: false, note: null, east: pe, north: pn, height: groundHeight(pe, pn) });
    }
  }
  // Number from west to east, south to north within 10 m strips, so that neighbours have near codes.
  out.sort((p, q) => Math.round(p.east / 10) - Math.round(q.east / 10) || p.north - q.north);
  out.forEach((p, i) => (p.code = `G${pad(i + 1, 3)}`));
  return out;
}

function gablePoints(group: "house-12" | "house-26"): ScenarioPoint[] {
  const g = GABLES[group];
  const out: ScenarioPoint[] = [];
  GABLE_ROWS_M.forEach((h, r) => {
    for (let c = 0; c < GABLE_COLUMNS; c++) {
      const n = g.southNorth + ((g.northNorth - g.southNorth) * c) / (GABLE_COLUMNS - 1);
      out.push({
        code: `${g.prefix}-${pad(r * GABLE_COLUMNS + c + 1, 2)}`,
        kind: "prism",
        group,
        isReference: false,
        note: `${g.label} Ashwend Row, gable, row ${r + 1} of 3, column ${c + 1} of 4 from the pit side`,
        east: g.east,
        north: n,
        height: groundHeight(g.east, n) + h,
      });
    }
  });
  return out;
}

function wallPoints(): ScenarioPoint[] {
  const out: ScenarioPoint[] = [];
  for (let k = 0; k < WALL.count; k++) {
    const e = WALL.westEast + k * WALL.spacingM;
    out.push({ code: `W${pad(k + 1, 2)}`, kind: "prism", group: "wall", isReference: false, note: "Ashwend Row retaining wall, crest", east: e, north: WALL.north, height: WALL.crestHeight + 0.004 * (e - 4200) });
  }
  return out;
}

function referencePoints(): ScenarioPoint[] {
  const spots: [number, number, number, string][] = [
    [4012, 7008, 44.2, "pillar in the recreation ground"],
    [4392, 7012, 41.7, "pillar by the depot gate"],
    [4008, 7288, 57.9, "bracket on the chapel tower"],
    [4205, 7296, 55.3, "bracket on the water tower"],
    [4396, 7284, 52.6, "pillar on the allotments"],
    [4030, 7150, 49.4, "bracket on the school"],
  ];
  return spots.map(([e, n, h, note], k) => ({ code: `REF${k + 1}`, kind: "prism" as const, group: "reference" as const, isReference: true, note: `Stable reference: ${note}`, east: e, north: n, height: h }));
}

/** Hand-made gable elements on a 4 × 3 grid of targets: row baselines and surface triangles (angles ≥ 26°). */
function gableElements(group: "house-12" | "house-26"): ScenarioElement[] {
  const g = GABLES[group];
  const id = (c: number, r: number) => `${g.prefix}-${pad(r * GABLE_COLUMNS + c + 1, 2)}`;
  const tri: [string, [number, number][]][] = [
    ["full gable, lower", [[0, 0], [3, 0], [3, 2]]],
    ["full gable, upper", [[0, 0], [3, 2], [0, 2]]],
    ["pit half, lower", [[0, 0], [2, 0], [2, 2]]],
    ["pit half, upper", [[0, 0], [2, 2], [0, 2]]],
    ["far half, lower", [[1, 0], [3, 0], [3, 2]]],
    ["far half, upper", [[1, 0], [3, 2], [1, 2]]],
  ];
  const name = g.label.replace(/[^0-9A-Za-z]/g, "");
  // Horizontal baselines along each row of targets: the horizontal strain that damage criteria use.
  const rows: ScenarioElement[] = GABLE_ROWS_M.map((h, r) => ({
    name: `${name}-B${r + 1}`,
    label: `${g.label} gable, row ${r + 1} (${h} m up), full width`,
    kind: "baseline" as const,
    mode: "horizontal" as const,
    pointCodes: [id(0, r), id(GABLE_COLUMNS - 1, r)],
    structure: group,
  }));
  return [...rows, ...tri.map(([what, v], k) => ({
    name: `${name}-T${k + 1}`,
    label: `${g.label} gable, ${what}`,
    kind: "triangle" as const,
    mode: "surface" as const,
    pointCodes: v.map(([c, r]) => id(c, r)),
    structure: group,
  }))];
}

function wallElements(points: ScenarioPoint[]): ScenarioElement[] {
  const out: ScenarioElement[] = [];
  for (let k = 0; k + 1 < points.length; k++) {
    const a = points[k];
    const b = points[k + 1];
    const joint = WALL.joints.some((j) => j > a.east && j < b.east);
    out.push({ name: `${a.code}-${b.code}`, label: `Retaining wall crest ${a.code}–${b.code}${joint ? " (across a movement joint)" : ""}`, kind: "baseline", mode: "horizontal", pointCodes: [a.code, b.code], structure: "wall" });
  }
  return out;
}

function isoUtc(timeS: number): string {
  return new Date(timeS * 1000).toISOString();
}

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
    points.push(replacement);
    events.push({ time: isoUtc(startS + replacedIndex * CYCLE_S), kind: "replaced", text: `${knocked.code} replaced by ${replacement.code}` });
  }
  if (endDays >= ACCELERATION.startsBeforeEndDays) events.push({ time: dayTime(endDays - ACCELERATION.startsBeforeEndDays), kind: "acceleration", text: "Ground behind the north-west corner starts to accelerate" });

  const sh = SITE.sigmaHM;
  const sv = SITE.sigmaVM;
  const replacementBase = modelDisplacement(replacement, (replacedIndex * CYCLE_S) / DAY_S, endDays, 0);
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
      if (p === replacement && k < replacedIndex) continue;
      if (p === knocked && k >= replacedIndex) continue;
      if (p.group === "house-26" && k >= obstructedFrom && k < obstructedTo) continue;
      if (missed && !p.isReference) continue;
      let u = modelDisplacement(p, tDays, endDays, dT);
      if (p === replacement) u = [u[0] - replacementBase[0], u[1] - replacementBase[1], u[2] - replacementBase[2]];
      if (p === knocked && k >= knockedIndex) u = [u[0] + jump[0], u[1] + jump[1], u[2] + jump[2]];
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
