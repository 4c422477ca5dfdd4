/**
 * CSV writers of the data exports (RFC 4180: comma separated, CRLF line ends, a header row, fields
 * quoted when they hold a comma, quote, CR or LF). Pure: rows in, text out.
 *
 * Conventions, so that another tool reads the file without a guide:
 * - units are in the column names: `_m` metres, `_microstrain` µε (1e-6), `_deg` degrees;
 * - times are ISO 8601 in UTC with `Z` and milliseconds (`2026-06-01T06:00:00.000Z`);
 * - numbers are written with the shortest decimal that reads back to the same double
 *   (ECMAScript Number::toString), so no precision is lost: a re-import gives the same coordinates;
 *   strains are multiplied by 1e6 for µε, which can add a rounding in the last binary digit;
 * - an unknown value (not computed, σ not known) is an empty field;
 * - text fields (point codes, element names) that start with `=`, `+`, `-`, `@`, a tab or CR get a
 *   leading `'` so a spreadsheet does not run them as formulas (CSV injection); such codes do not
 *   round-trip unchanged, which is the price of opening exports safely in a spreadsheet.
 */
import type { StoredValues } from "../strain/stored-values.ts";

const FORMULA_START = /^[=+\-@\t\r]/;

/** One text field: formula-leading characters neutralised, quoted where RFC 4180 needs it. */
export function csvText(v: string): string {
  const safe = FORMULA_START.test(v) ? `'${v}` : v;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** A number with no loss of precision (shortest round-trip form); empty for null or non-finite. */
export function csvNumber(v: number | null | undefined): string {
  return v === null || v === undefined || !Number.isFinite(v) ? "" : String(v);
}

/** ISO 8601 UTC with milliseconds and `Z`. */
export function csvTime(ms: number): string {
  return new Date(ms).toISOString();
}

/** µε of a dimensionless strain (empty when unknown). */
function micro(v: number | null | undefined): string {
  return v === null || v === undefined || !Number.isFinite(v) ? "" : String(v * 1e6);
}

function flag(v: boolean | null): string {
  return v === null ? "" : v ? "true" : "false";
}

function lines(header: readonly string[], rows: string[][]): string {
  const out: string[] = [header.join(",")];
  for (const r of rows) out.push(r.join(","));
  return out.join("\r\n") + "\r\n";
}

// -------------------------------------------------------------------------------------------------
// Observations

export interface ExportObservation {
  /** Epoch time, UTC milliseconds. */
  timeMs: number;
  point: string;
  eastM: number;
  northM: number;
  heightM: number;
  sigmaEastM: number;
  sigmaNorthM: number;
  sigmaHeightM: number;
}

export const OBSERVATION_CSV_COLUMNS = ["time_utc", "point", "east_m", "north_m", "height_m", "sigma_east_m", "sigma_north_m", "sigma_height_m"] as const;

/** Observations, one row per point and epoch, in the order given (callers sort by time, then point). */
export function observationsCsv(rows: readonly ExportObservation[]): string {
  return lines(
    OBSERVATION_CSV_COLUMNS,
    rows.map((o) => [csvTime(o.timeMs), csvText(o.point), csvNumber(o.eastM), csvNumber(o.northM), csvNumber(o.heightM), csvNumber(o.sigmaEastM), csvNumber(o.sigmaNorthM), csvNumber(o.sigmaHeightM)]),
  );
}

// -------------------------------------------------------------------------------------------------
// Computed strains

export interface ExportResult extends StoredValues {
  timeMs: number;
  element: string;
  kind: string;
  mode: string;
  /** `ok`, `degenerate`, `missing-point`. */
  status: string;
  referenceTimeMs: number | null;
}

export const RESULT_CSV_COLUMNS = [
  "time_utc",
  "element",
  "kind",
  "mode",
  "status",
  "reference_time_utc",
  "green_max_microstrain",
  "sigma_green_max_microstrain",
  "green_max_significant",
  "green_min_microstrain",
  "sigma_green_min_microstrain",
  "green_min_significant",
  "max_shear_microstrain",
  "sigma_max_shear_microstrain",
  "max_shear_significant",
  "areal_strain_microstrain",
  "sigma_areal_strain_microstrain",
  "areal_strain_significant",
  "rotation_deg",
  "azimuth_max_deg",
  "engineering_microstrain",
  "sigma_engineering_microstrain",
  "engineering_significant",
] as const;

/** |v| > k·σ; null when either is unknown (domain.md §4). */
export function significance(v: number | null, sigma: number | null, k: number): boolean | null {
  if (v === null || sigma === null || !Number.isFinite(v) || !Number.isFinite(sigma)) return null;
  return Math.abs(v) > k * sigma;
}

/** Element results, one row per element and epoch; significance at factor k (1.96 for 95 %). */
export function resultsCsv(rows: readonly ExportResult[], k: number): string {
  return lines(
    RESULT_CSV_COLUMNS,
    rows.map((r) => [
      csvTime(r.timeMs),
      csvText(r.element),
      csvText(r.kind),
      csvText(r.mode),
      csvText(r.status),
      r.referenceTimeMs === null ? "" : csvTime(r.referenceTimeMs),
      micro(r.greenMax),
      micro(r.sigmaGreenMax),
      flag(significance(r.greenMax, r.sigmaGreenMax, k)),
      micro(r.greenMin),
      micro(r.sigmaGreenMin),
      flag(significance(r.greenMin, r.sigmaGreenMin, k)),
      micro(r.maxShear),
      micro(r.sigmaMaxShear),
      flag(significance(r.maxShear, r.sigmaMaxShear, k)),
      micro(r.arealStrain),
      micro(r.sigmaArealStrain),
      flag(significance(r.arealStrain, r.sigmaArealStrain, k)),
      csvNumber(r.rotationDeg),
      csvNumber(r.azimuthMaxDeg),
      micro(r.engineering),
      micro(r.sigmaEngineering),
      flag(significance(r.engineering, r.sigmaEngineering, k)),
    ]),
  );
}
