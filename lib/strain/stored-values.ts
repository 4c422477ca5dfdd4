/**
 * The quantities Epochal keeps per element and epoch (the ElementResult columns), and the one
 * mapping from an element's computed result to them. Strains are dimensionless, rotation and
 * azimuth in degrees, each σ in its quantity's unit; a value that does not apply or is not finite
 * is null. Volume groups keep their principal strains, shear and rotation but no areal strain
 * (their volumetric strain has no column yet).
 */
import type { ElementJson } from "./element.ts";

export const STORED_VALUE_KEYS = [
  "greenMax",
  "greenMin",
  "maxShear",
  "arealStrain",
  "rotationDeg",
  "azimuthMaxDeg",
  "engineering",
  "sigmaGreenMax",
  "sigmaGreenMin",
  "sigmaMaxShear",
  "sigmaArealStrain",
  "sigmaEngineering",
] as const;

export type StoredValueKey = (typeof STORED_VALUE_KEYS)[number];
export type StoredValues = Record<StoredValueKey, number | null>;

export const EMPTY_STORED_VALUES: Readonly<StoredValues> = Object.freeze(
  Object.fromEntries(STORED_VALUE_KEYS.map((k) => [k, null])) as StoredValues,
);

const fin = (v: number | null | undefined): number | null => (v === undefined || v === null || !Number.isFinite(v) ? null : v);

/** The stored values of one computed element result, with its status. */
export function storedValuesOf(r: ElementJson): { status: string; values: StoredValues } {
  const values: StoredValues = { ...EMPTY_STORED_VALUES };
  if (r.status !== "ok") return { status: r.status, values };
  if ("engineering" in r) {
    values.engineering = fin(r.engineering);
    values.sigmaEngineering = fin(r.sigma.engineering);
    return { status: "ok", values };
  }
  values.greenMax = fin(r.greenMax);
  values.greenMin = fin(r.greenMin);
  values.maxShear = fin(r.maxShear);
  values.rotationDeg = fin(r.rotationDeg);
  values.sigmaGreenMax = fin(r.sigma.greenMax);
  values.sigmaGreenMin = fin(r.sigma.greenMin);
  values.sigmaMaxShear = fin(r.sigma.maxShear);
  if ("arealStrain" in r) {
    values.arealStrain = fin(r.arealStrain);
    values.sigmaArealStrain = fin((r.sigma as { arealStrain?: number | null }).arealStrain);
  }
  if ("azimuthMaxDeg" in r) values.azimuthMaxDeg = fin(r.azimuthMaxDeg);
  return { status: "ok", values };
}
