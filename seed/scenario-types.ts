/**
 * The demo scenario's data types and time constants, shared by the layout, movement and event
 * modules (see seed/scenario.ts for the scenario itself).
 */

/** The survey cycle: one epoch every six hours (s). */
export const CYCLE_S = 6 * 3600;
export const DAY_S = 86400;

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
