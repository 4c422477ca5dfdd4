/**
 * The strain field of one epoch as the plan draws it (JSON of GET /api/v1/sites/{slug}/field).
 * Strains dimensionless, angles in degrees, displacements in metres (E, N, H).
 */
import { isSignificant, type PlanQuantity } from "./quantities.ts";

export interface FieldElement {
  id: number;
  status: string;
  greenMax: number | null;
  greenMin: number | null;
  maxShear: number | null;
  arealStrain: number | null;
  rotationDeg: number | null;
  azimuthMaxDeg: number | null;
  engineering: number | null;
  sigmaGreenMax: number | null;
  sigmaGreenMin: number | null;
  sigmaMaxShear: number | null;
  sigmaArealStrain: number | null;
  sigmaEngineering: number | null;
}

export interface FieldPoint {
  code: string;
  dE: number;
  dN: number;
  dH: number;
  /** χ² test of the plan displacement at 95 % (2 degrees of freedom, 5.991); null without σ. */
  significant: boolean | null;
}

export type FieldMode = "cumulative" | "increment";

export interface StrainField {
  mode: FieldMode;
  epoch: { id: number; timeMs: number };
  from: { id: number; timeMs: number };
  k: number;
  elements: FieldElement[];
  points: FieldPoint[];
}

export interface QuantityValue {
  value: number | null;
  sigma: number | null;
  significant: boolean | null;
  /** True when the element is a baseline and shows its axial (engineering) strain instead. */
  axial: boolean;
}

const SIGMA_OF: Record<PlanQuantity, keyof FieldElement | null> = {
  greenMax: "sigmaGreenMax",
  greenMin: "sigmaGreenMin",
  maxShear: "sigmaMaxShear",
  arealStrain: "sigmaArealStrain",
  rotationDeg: null,
};

/** The value and σ of a quantity for one element; baselines give their engineering strain for any strain quantity. */
export function quantityValue(el: FieldElement, kind: string, q: PlanQuantity, k: number): QuantityValue {
  if (kind === "baseline") {
    if (q === "rotationDeg") return { value: null, sigma: null, significant: null, axial: true };
    return { value: el.engineering, sigma: el.sigmaEngineering, significant: isSignificant(el.engineering, el.sigmaEngineering, k), axial: true };
  }
  const value = el[q] as number | null;
  const sk = SIGMA_OF[q];
  const sigma = sk ? (el[sk] as number | null) : null;
  return { value, sigma, significant: isSignificant(value, sigma, k), axial: false };
}

/** Chi-square 95 % quantile for 2 degrees of freedom (plan displacement test, domain.md §4). */
export const CHI2_95_2D = 5.991;

/**
 * Plan displacement d = cur − ref of one point and its χ² test dᵀΣ⁻¹d > 5.991 with independent
 * coordinates: Σ = diag(σE,ref² + σE,cur², σN,ref² + σN,cur²).
 */
export function planDisplacement(
  ref: { east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number },
  cur: { east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number },
): { dE: number; dN: number; dH: number; significant: boolean | null } {
  const dE = cur.east - ref.east;
  const dN = cur.north - ref.north;
  const dH = cur.height - ref.height;
  const vE = ref.sigmaEast ** 2 + cur.sigmaEast ** 2;
  const vN = ref.sigmaNorth ** 2 + cur.sigmaNorth ** 2;
  const significant = vE > 0 && vN > 0 ? (dE * dE) / vE + (dN * dN) / vN > CHI2_95_2D : null;
  return { dE, dN, dH, significant };
}
