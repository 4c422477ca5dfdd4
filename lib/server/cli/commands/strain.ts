/**
 * `epochal strain`: strain between a reference and a current epoch file (domain.md §7).
 * Reads the files and prints; the work is in lib/formats and lib/strain.
 */
import { readFile } from "node:fs/promises";
import { parseEpochCsv, type CsvError, type EpochCsvRow } from "../../../formats/epoch-csv.ts";
import { parseElementsCsv } from "../../../formats/elements-csv.ts";
import { formatStrainTable } from "../../../formats/strain-table.ts";
import { computeStrainReport, pointsFromRows, DEFAULT_SIGMA_HORIZONTAL_M, DEFAULT_SIGMA_VERTICAL_M } from "../../../strain/report.ts";
import { twoSidedK } from "../../../strain/normal-quantile.ts";
import type { ElementSpec } from "../../../strain/element.ts";

export const help = `Usage: epochal strain --reference REF.csv --current CUR.csv [options]

Strain between two survey epochs: plan triangles of the Delaunay triangulation of the points in both
epochs (slivers below 20° dropped), or the elements listed in --elements.

Options:
  --reference FILE   reference epoch CSV (point,east,north,height[,time,sigma_east,sigma_north,sigma_height])
  --current FILE     current epoch CSV, same columns
  --elements FILE    elements CSV (element,kind,points[,mode]); kinds triangle, baseline, group;
                     modes plan, surface, volume, slope, horizontal
  --sigma M          σ of east and north in metres where the file gives none (default ${DEFAULT_SIGMA_HORIZONTAL_M})
  --sigma-v M        σ of height in metres where the file gives none (default ${DEFAULT_SIGMA_VERTICAL_M})
  --confidence P     two-sided confidence for "significant", in (0, 1) (default 0.95, k = 1.96)
  --json             print { "elements": [ ... ] } (strains dimensionless) instead of tables in µε
  --help             this text

Exit status: 0 done, 2 bad input or usage (the message names file, line and field, or the option).`;

type Flag = "--reference" | "--current" | "--elements" | "--sigma" | "--sigma-v" | "--confidence";
const VALUED: readonly Flag[] = ["--reference", "--current", "--elements", "--sigma", "--sigma-v", "--confidence"];

class UsageError extends Error {}

interface Args {
  values: Partial<Record<Flag, string>>;
  json: boolean;
}

function parseArgs(args: string[]): Args {
  const values: Partial<Record<Flag, string>> = {};
  let json = false;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === "--json") {
      json = true;
      continue;
    }
    const eq = a.indexOf("=");
    const name = eq > 0 && a.startsWith("--") ? a.slice(0, eq) : a;
    if (!(VALUED as readonly string[]).includes(name)) throw new UsageError(`unknown option ${JSON.stringify(a)}`);
    const flag = name as Flag;
    let value: string | undefined;
    if (eq > 0 && a.startsWith("--")) value = a.slice(eq + 1);
    else {
      value = args[i + 1];
      i++;
    }
    if (value === undefined || value === "" || (value.startsWith("--") && eq < 0)) throw new UsageError(`option ${flag} needs a value`);
    if (values[flag] !== undefined) throw new UsageError(`option ${flag} is given twice`);
    values[flag] = value;
  }
  return { values, json };
}

function positiveMetres(flag: Flag, text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(text.trim()) || !Number.isFinite(v) || v <= 0) {
    throw new UsageError(`option ${flag} must be a number of metres > 0, got ${JSON.stringify(text)}`);
  }
  return v;
}

function formatErrors(file: string, errors: readonly CsvError[]): string {
  return errors.map((e) => `${file}:${e.line}: ${e.field === null ? "" : `field "${e.field}": `}${e.message}`).join("\n");
}

async function readText(flag: Flag, file: string): Promise<string> {
  try {
    return await readFile(file, "utf8");
  } catch (err) {
    throw new UsageError(`${file}: cannot read the file given to ${flag}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}`);
  }
}

/** One epoch per file: several times would be several epochs. */
function singleEpoch(file: string, rows: EpochCsvRow[]): string | null {
  const first = rows.find((r) => r.time !== null);
  if (!first) return null;
  const other = rows.find((r) => r.time !== first.time);
  if (!other) return null;
  return `${file}:${other.line}: field "time": the file holds more than one epoch (${first.time} on line ${first.line}, ${other.time ?? "no time"} here); give one epoch per file`;
}

export async function run(args: string[]): Promise<number> {
  try {
    const { values, json } = parseArgs(args);
    const refFile = values["--reference"];
    const curFile = values["--current"];
    if (refFile === undefined) throw new UsageError("option --reference is required (see --help)");
    if (curFile === undefined) throw new UsageError("option --current is required (see --help)");
    const sigmaHorizontalM = positiveMetres("--sigma", values["--sigma"]);
    const sigmaVerticalM = positiveMetres("--sigma-v", values["--sigma-v"]);
    let confidence = 0.95;
    if (values["--confidence"] !== undefined) {
      const c = Number(values["--confidence"]);
      if (!(c > 0 && c < 1)) throw new UsageError(`option --confidence must be a probability in (0, 1), e.g. 0.95, got ${JSON.stringify(values["--confidence"])}`);
      confidence = c;
    }
    const k = twoSidedK(confidence);

    const messages: string[] = [];
    const epochs: EpochCsvRow[][] = [];
    for (const [flag, file] of [["--reference", refFile], ["--current", curFile]] as const) {
      const parsed = parseEpochCsv(await readText(flag, file));
      if (!parsed.ok) messages.push(formatErrors(file, parsed.errors));
      else {
        const multi = singleEpoch(file, parsed.rows);
        if (multi) messages.push(multi);
        epochs.push(parsed.rows);
      }
    }
    let elements: ElementSpec[] | null = null;
    const elFile = values["--elements"];
    if (elFile !== undefined) {
      const parsed = parseElementsCsv(await readText("--elements", elFile));
      if (!parsed.ok) messages.push(formatErrors(elFile, parsed.errors));
      else elements = parsed.elements.map(({ id, kind, mode, points }) => ({ id, kind, mode, points }));
    }
    if (messages.length) {
      console.error(messages.join("\n"));
      return 2;
    }
    const ref = pointsFromRows(epochs[0], { sigmaHorizontalM, sigmaVerticalM });
    const cur = pointsFromRows(epochs[1], { sigmaHorizontalM, sigmaVerticalM });
    const report = computeStrainReport(ref, cur, elements, { confidence });
    if (json) {
      console.log(JSON.stringify({ elements: report.elements }, null, 2));
    } else {
      console.log(formatStrainTable(report.elements, { confidence, k }));
      const t = report.triangulation;
      if (t && (t.dropped.length || t.skippedPoints.length)) {
        const lines = [
          ...t.dropped.map((d) => `dropped triangle ${d.id}: ${d.reason} (smallest angle ${d.minAngleDeg.toFixed(1)}°)`),
          ...t.skippedPoints.map((p) => `point ${p.code}: ${p.reason}`),
        ];
        console.log(`\n${lines.join("\n")}`);
      }
    }
    if (report.triangulation && report.elements.length === 0) console.error("epochal strain: no triangles: fewer than three well-shaped triangles can be formed from the points in both epochs");
    return 0;
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`epochal strain: ${err.message}`);
      return 2;
    }
    throw err;
  }
}
