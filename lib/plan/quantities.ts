/**
 * The quantities the plan can colour elements by. Each maps to stored ElementResult columns
 * (value and σ). Baselines have one axial quantity: whatever is chosen, a baseline shows its
 * engineering strain (l − L)/L, and the legend says so.
 */

export const PLAN_QUANTITIES = ["greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg"] as const;
export type PlanQuantity = (typeof PLAN_QUANTITIES)[number];

export interface QuantityInfo {
  label: string;
  /** What the quantity means, in plain words, for the legend and tooltips. */
  note: string;
  /** Signed quantities use both halves of the diverging scale. */
  signed: boolean;
  /** "strain" values are dimensionless (shown in µε or %); "angle" in degrees. */
  kind: "strain" | "angle";
}

export const QUANTITY_INFO: Record<PlanQuantity, QuantityInfo> = {
  greenMax: { label: "Major principal strain (Green)", note: "largest stretch of the element, + extension", signed: true, kind: "strain" },
  greenMin: { label: "Minor principal strain (Green)", note: "smallest stretch of the element, − contraction", signed: true, kind: "strain" },
  maxShear: { label: "Maximum shear strain", note: "major minus minor principal strain (engineering shear)", signed: false, kind: "strain" },
  arealStrain: { label: "Areal strain ΔA/A", note: "change of area, + growing, − shrinking", signed: true, kind: "strain" },
  rotationDeg: { label: "Rotation", note: "rigid rotation, + counter-clockwise seen from above", signed: true, kind: "angle" },
};

export function isPlanQuantity(s: string | null | undefined): s is PlanQuantity {
  return typeof s === "string" && (PLAN_QUANTITIES as readonly string[]).includes(s);
}

/** Default two-sided k for significance (95 %, domain.md §4). */
export const DEFAULT_K = 1.96;

/** |value| > k·σ; null when σ is unknown. */
export function isSignificant(value: number | null, sigma: number | null, k = DEFAULT_K): boolean | null {
  if (value === null || sigma === null || !Number.isFinite(value) || !Number.isFinite(sigma)) return null;
  return Math.abs(value) > k * sigma;
}
