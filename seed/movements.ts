/**
 * Demo scenario movement models (see the header of seed/scenario.ts for the sources): the settlement
 * trough with its horizontal movement toward the pit, the pumping-test bowl, the thermal movement of
 * the wall crest and the accelerating zone at the north-west corner. All noise-free and deterministic.
 */
import { PIT, WALL } from "./layout.ts";
import { DAY_S, type ScenarioPoint } from "./scenario-types.ts";

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
