/**
 * Shared types of the strain engine. Field names are the JSON contract of docs `domain.md` §7:
 * strains are dimensionless, lengths in metres, angles in degrees.
 */

/** One surveyed point in one epoch: grid/site-frame coordinates and their standard deviations, all in metres. */
export interface SurveyPoint {
  east: number;
  north: number;
  height: number;
  sigmaEast: number;
  sigmaNorth: number;
  sigmaHeight: number;
}

/** 2×2 matrix, row-major: `m[i][j]` is row i, column j; index 0 = East (or u), 1 = North (or v). */
export type Mat2 = [[number, number], [number, number]];
/** 3×3 matrix, row-major; index 0 = East, 1 = North, 2 = Height. */
export type Mat3 = [[number, number, number], [number, number, number], [number, number, number]];

export const STRAIN_STATUSES = ["ok", "degenerate", "missing-point"] as const;
export type StrainStatus = (typeof STRAIN_STATUSES)[number];

/** An element that could not be computed: the tag and a sentence for the engineer. Never carries quantities. */
export interface StrainFailure {
  status: "degenerate" | "missing-point";
  message: string;
}

export const TRIANGLE_MODES = ["plan", "surface"] as const;
export type TriangleMode = (typeof TRIANGLE_MODES)[number];
export const BASELINE_MODES = ["slope", "horizontal"] as const;
export type BaselineMode = (typeof BASELINE_MODES)[number];
export const GROUP_MODES = ["plan", "volume"] as const;
export type GroupMode = (typeof GROUP_MODES)[number];

export const ELEMENT_KINDS = ["triangle", "baseline", "group"] as const;
export type ElementKind = (typeof ELEMENT_KINDS)[number];
export type ElementMode = TriangleMode | BaselineMode | GroupMode;

/** Options common to every strain computation. */
export interface StrainOptions {
  /** Two-sided confidence level for the `significant` flags, in (0, 1); default 0.95 (k = 1.96). */
  confidence?: number;
}

/** First-order standard deviations (dimensionless) of the quantities that trigger rules use. */
export interface PlanarSigma {
  greenMax: number;
  greenMin: number;
  maxShear: number;
  arealStrain: number;
}
export interface PlanarSignificance {
  greenMax: boolean;
  greenMin: boolean;
  maxShear: boolean;
  arealStrain: boolean;
}

/** Every measure of a 2D deformation gradient (domain.md §3). */
export interface PlanarMeasures {
  F: Mat2;
  green: Mat2;
  almansi: Mat2;
  small: Mat2;
  greenMax: number;
  greenMin: number;
  almansiMax: number;
  almansiMin: number;
  smallMax: number;
  smallMin: number;
  stretchMax: number;
  stretchMin: number;
  maxShear: number;
  arealStrain: number;
  /** Polar-decomposition rotation, counter-clockwise positive (East toward North, or u toward v), in (−180°, 180°]. */
  rotationDeg: number;
}

export interface PlanarPrecision {
  sigma: PlanarSigma;
  significant: PlanarSignificance;
}

/** A plan-mode triangle that computed. */
export interface TriangleStrainOk extends PlanarMeasures, PlanarPrecision {
  status: "ok";
  /** Grid azimuth of the major principal axis of E, clockwise from grid north, in [0°, 180°); null when isotropic. */
  azimuthMaxDeg: number | null;
  /** Smallest interior angle of the reference triangle (quality figure). */
  minAngleDeg: number;
  warnings: string[];
}
export type TriangleStrainResult = TriangleStrainOk | StrainFailure;

/** A surface-mode triangle that computed; tensors in the reference in-plane basis (u, v), `almansi` in (u′, v′). */
export interface SurfaceStrainOk extends PlanarMeasures, PlanarPrecision {
  status: "ok";
  /** In-plane angle between the greenMax axis and the horizontal line u, in [0°, 90°]; null when isotropic. */
  dipMaxDeg: number | null;
  minAngleDeg: number;
  warnings: string[];
}
export type SurfaceStrainResult = SurfaceStrainOk | StrainFailure;

export interface BaselineStrainOk {
  status: "ok";
  lengthRefM: number;
  lengthCurM: number;
  engineering: number;
  green: number;
  almansi: number;
  log: number;
  sigma: { engineering: number };
  significant: { engineering: boolean };
}
export type BaselineStrainResult = BaselineStrainOk | StrainFailure;

export interface GroupPlanStrainOk extends PlanarMeasures, PlanarPrecision {
  status: "ok";
  azimuthMaxDeg: number | null;
  /** √(Σ|r_i|² / N) over the points used, metres. */
  residualRmsM: number;
  /** 2N − 6. */
  redundancy: number;
  pointsUsed: string[];
  warnings: string[];
}

export interface VolumeSigma {
  greenMax: number;
  greenMid: number;
  greenMin: number;
  maxShear: number;
  volumetricStrain: number;
}
export type VolumeSignificance = { [K in keyof VolumeSigma]: boolean };

export interface GroupVolumeStrainOk {
  status: "ok";
  F: Mat3;
  green: Mat3;
  almansi: Mat3;
  small: Mat3;
  greenMax: number;
  greenMid: number;
  greenMin: number;
  almansiMax: number;
  almansiMid: number;
  almansiMin: number;
  smallMax: number;
  smallMid: number;
  smallMin: number;
  stretchMax: number;
  stretchMid: number;
  stretchMin: number;
  maxShear: number;
  volumetricStrain: number;
  /** Angle of the polar rotation R about `rotationAxis` (right-handed), in [0°, 180°]. */
  rotationDeg: number;
  /** Unit axis (E, N, H) of R; null when the rotation is below 1e-12 rad. */
  rotationAxis: [number, number, number] | null;
  sigma: VolumeSigma;
  significant: VolumeSignificance;
  residualRmsM: number;
  /** 3N − 12. */
  redundancy: number;
  pointsUsed: string[];
  warnings: string[];
}
export type GroupStrainResult = GroupPlanStrainOk | GroupVolumeStrainOk | StrainFailure;

/** One point offered to a group: absent from an epoch means `undefined`. */
export interface GroupPoint {
  code: string;
  ref: SurveyPoint | undefined;
  cur: SurveyPoint | undefined;
}
