/** Display of strain (dimensionless inside) as microstrain or percent, as the user picks. */

export const STRAIN_UNITS = ["ue", "pct"] as const;
export type StrainUnit = (typeof STRAIN_UNITS)[number];

export function isStrainUnit(s: string | null | undefined): s is StrainUnit {
  return s === "ue" || s === "pct";
}

export const STRAIN_UNIT_LABEL: Record<StrainUnit, string> = { ue: "µε", pct: "%" };

/** Factor from dimensionless strain to the display unit: 1e6 for µε, 100 for %. */
export function strainFactor(unit: StrainUnit): number {
  return unit === "ue" ? 1e6 : 100;
}

/**
 * Strain as text in the unit, e.g. "+412 µε" or "+0.0412 %": µε to whole numbers below 10 000 (one
 * decimal below 10), percent to four significant decimals. `signed` adds "+" to positive values.
 */
export function formatStrain(value: number | null | undefined, unit: StrainUnit, opts: { signed?: boolean; withUnit?: boolean } = {}): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "–";
  const v = value * strainFactor(unit);
  let text: string;
  if (unit === "ue") text = Math.abs(v) < 10 ? v.toFixed(1) : Math.round(v).toString();
  else text = Math.abs(v) < 0.01 ? v.toFixed(5) : Math.abs(v) < 1 ? v.toFixed(4) : v.toFixed(3);
  if (/^-0(\.0+)?$/.test(text)) text = text.slice(1);
  // U+2212 minus sign reads better than a hyphen in tables.
  text = text.startsWith("-") ? "−" + text.slice(1) : opts.signed && v > 0 ? "+" + text : text;
  return opts.withUnit === false ? text : `${text} ${STRAIN_UNIT_LABEL[unit]}`;
}

/** A length in metres as mm below 1 m (one decimal), else metres. */
export function formatLength(m: number | null | undefined): string {
  if (m === null || m === undefined || !Number.isFinite(m)) return "–";
  const a = Math.abs(m);
  if (a < 1) return `${(m * 1000).toFixed(1).replace("-", "−")} mm`;
  return `${m.toFixed(a < 100 ? 3 : 1).replace("-", "−")} m`;
}
