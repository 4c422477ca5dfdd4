/**
 * The strain field of one epoch as the plan draws it (JSON of GET /api/v1/sites/{slug}/field).
 * Strains dimensionless, angles in degrees, displacements in metres (E, N, H).
 */
import { isSignificant, type PlanQuantity } from "./quantities.ts";
import { STORED_VALUE_KEYS, type StoredValues } from "../strain/stored-values.ts";

export interface FieldElement extends StoredValues {
  id: number;
  status: string;
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

/**
 * The field as sent over the wire: one array per column (names are not repeated per element) and
 * numbers kept to 6 significant digits, σ to 4 (strain: well below any survey's resolution), so a site of a
 * thousand elements costs tens of kilobytes rather than hundreds.
 */
export interface PackedField {
  mode: FieldMode;
  epoch: { id: number; timeMs: number };
  from: { id: number; timeMs: number };
  k: number;
  elements: { [K in keyof FieldElement]: FieldElement[K][] };
  points: { code: string[]; dE: number[]; dN: number[]; dH: number[]; significant: (boolean | null)[] };
}

const ELEMENT_KEYS = ["id", "status", ...STORED_VALUE_KEYS] as const satisfies readonly (keyof FieldElement)[];

/** 4 significant digits (σ: its own uncertainty is far larger); null and non-finite stay null. */
export function round4(v: number | null): number | null {
  return v === null || !Number.isFinite(v) ? null : Number(v.toPrecision(4));
}

/** 6 significant digits; null and non-finite stay null. */
export function round6(v: number | null): number | null {
  return v === null || !Number.isFinite(v) ? null : Number(v.toPrecision(6));
}

export function packField(f: StrainField): PackedField {
  const cols = {} as Record<(typeof ELEMENT_KEYS)[number], unknown[]>;
  for (const k of ELEMENT_KEYS) cols[k] = new Array(f.elements.length);
  f.elements.forEach((e, i) => {
    for (const k of ELEMENT_KEYS) {
      const v = e[k];
      cols[k][i] = k === "id" || k === "status" ? v : k.startsWith("sigma") ? round4(v as number | null) : round6(v as number | null);
    }
  });
  return {
    mode: f.mode,
    epoch: f.epoch,
    from: f.from,
    k: f.k,
    elements: cols as PackedField["elements"],
    points: {
      code: f.points.map((p) => p.code),
      // Displacements to 0.01 mm.
      dE: f.points.map((p) => Math.round(p.dE * 1e5) / 1e5),
      dN: f.points.map((p) => Math.round(p.dN * 1e5) / 1e5),
      dH: f.points.map((p) => Math.round(p.dH * 1e5) / 1e5),
      significant: f.points.map((p) => p.significant),
    },
  };
}

export function unpackField(p: PackedField): StrainField {
  const n = p.elements.id.length;
  const elements: FieldElement[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const e = {} as Record<string, unknown>;
    for (const k of ELEMENT_KEYS) e[k] = (p.elements[k] as unknown[])[i] ?? null;
    elements[i] = e as unknown as FieldElement;
  }
  const points: FieldPoint[] = p.points.code.map((code, i) => ({ code, dE: p.points.dE[i], dN: p.points.dN[i], dH: p.points.dH[i], significant: p.points.significant[i] ?? null }));
  return { mode: p.mode, epoch: p.epoch, from: p.from, k: p.k, elements, points };
}
