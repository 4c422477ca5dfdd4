/**
 * Preset damage categories for horizontal tensile strain in buildings.
 *
 * Source: Boscardin, M. D. & Cording, E. J. (1989), "Building response to excavation-induced
 * settlement", J. Geotech. Eng. 115(1), 1–21, Table 2 — after Burland, J. B., Broms, B. B. & de Mello,
 * V. F. B. (1977), "Behaviour of foundations and structures", Proc. 9th ICSMFE, Tokyo.
 *
 * Caution: a literature preset, not a design criterion. The site's engineer sets the real trigger
 * levels for each structure.
 */

export const DAMAGE_CATEGORY_SOURCE =
  "Boscardin & Cording (1989), after Burland et al. (1977): limiting horizontal tensile strain";
export const DAMAGE_CATEGORY_CAUTION = "Literature preset: the site's engineer sets the real levels.";

export interface DamageCategory {
  /** Category as published: "0", "1", "2", "3", "4-5". */
  category: string;
  label: string;
  /** Lower bound of horizontal tensile strain, dimensionless (inclusive). */
  minStrain: number;
  /** Upper bound, dimensionless (exclusive); null for the open top category. */
  maxStrain: number | null;
}

export const DAMAGE_CATEGORIES: readonly DamageCategory[] = [
  { category: "0", label: "negligible", minStrain: 0, maxStrain: 0.0005 },
  { category: "1", label: "very slight", minStrain: 0.0005, maxStrain: 0.00075 },
  { category: "2", label: "slight", minStrain: 0.00075, maxStrain: 0.0015 },
  { category: "3", label: "moderate", minStrain: 0.0015, maxStrain: 0.003 },
  { category: "4-5", label: "severe to very severe", minStrain: 0.003, maxStrain: null },
] as const;

/**
 * The category of a horizontal tensile strain (dimensionless, extension positive). Compressive or zero
 * strain falls in category 0; non-finite input returns null.
 */
export function damageCategoryOf(tensileStrain: number): DamageCategory | null {
  if (!Number.isFinite(tensileStrain)) return null;
  const e = Math.max(0, tensileStrain);
  for (const c of DAMAGE_CATEGORIES) if (c.maxStrain === null || e < c.maxStrain) return c;
  return null;
}
