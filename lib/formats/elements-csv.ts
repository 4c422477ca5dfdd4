/**
 * Elements CSV parser (domain.md §7). Pure: text in, result out.
 *
 *   element,kind,points[,mode]
 *   T1,triangle,P1 P2 P3,plan
 *   B1,baseline,P1 P4,horizontal
 *
 * Columns by name, case-insensitive; kinds `triangle`, `baseline`, `group` (lowercase); modes `plan`
 * (default for triangles and groups), `surface`, `volume` (groups), `slope` (default for baselines),
 * `horizontal`; points separated by spaces. A wrong number of points, a repeated point, a repeated
 * element id or an unknown column is an error naming line and field, as in epoch-csv.ts.
 */
import { tokenizeCsv, type CsvField } from "./csv.ts";
import { MAX_ERRORS, type CsvError } from "./epoch-csv.ts";
import { ELEMENT_KINDS, type ElementKind, type ElementMode } from "../strain/types.ts";

export interface ElementCsvRow {
  line: number;
  id: string;
  kind: ElementKind;
  mode: ElementMode;
  points: string[];
}
export type ElementsCsvResult = { ok: true; elements: ElementCsvRow[] } | { ok: false; errors: CsvError[] };

export const ELEMENT_COLUMNS = ["element", "kind", "points", "mode"] as const;
type ElementColumn = (typeof ELEMENT_COLUMNS)[number];
const REQUIRED: readonly ElementColumn[] = ["element", "kind", "points"];
const MODES: Record<ElementKind, readonly ElementMode[]> = { triangle: ["plan", "surface"], baseline: ["slope", "horizontal"], group: ["plan", "volume"] };
const DEFAULT_MODE: Record<ElementKind, ElementMode> = { triangle: "plan", baseline: "slope", group: "plan" };

export function parseElementsCsv(text: string): ElementsCsvResult {
  const errors: CsvError[] = [];
  let dropped = 0;
  const report = (e: CsvError): void => {
    if (errors.length < MAX_ERRORS) errors.push(e);
    else dropped++;
  };
  const finish = (): ElementsCsvResult => {
    if (dropped > 0) errors.push({ line: errors[errors.length - 1].line, field: null, message: `${dropped} more error${dropped === 1 ? "" : "s"} not shown` });
    return { ok: false, errors };
  };
  const { records, errors: syntax } = tokenizeCsv(text);
  for (const e of syntax) report({ line: e.line, field: null, message: e.message });
  if (records.length === 0) {
    report({ line: 1, field: null, message: `no header row: expected columns ${ELEMENT_COLUMNS.join(",")}` });
    return finish();
  }
  const [header, ...body] = records;
  const index = new Map<ElementColumn, { col: number; name: string }>();
  header.fields.forEach((f: CsvField, col) => {
    const name = f.value.trim();
    const key = name.toLowerCase();
    if (!(ELEMENT_COLUMNS as readonly string[]).includes(key)) {
      report({ line: f.line, field: name, message: `unknown column ${JSON.stringify(name)} (allowed: ${ELEMENT_COLUMNS.join(", ")})` });
      return;
    }
    if (index.has(key as ElementColumn)) report({ line: f.line, field: name, message: `column ${JSON.stringify(name)} appears twice` });
    else index.set(key as ElementColumn, { col, name });
  });
  for (const c of REQUIRED) if (!index.has(c)) report({ line: header.line, field: c, message: `required column "${c}" is missing` });
  if (errors.length > 0) return finish();

  const elements: ElementCsvRow[] = [];
  const ids = new Map<string, number>();
  for (const rec of body) {
    if (rec.fields.length !== header.fields.length) {
      report({ line: rec.line, field: null, message: `expected ${header.fields.length} fields as in the header, found ${rec.fields.length}` });
      continue;
    }
    const get = (c: ElementColumn): { value: string; line: number; name: string } | null => {
      const at = index.get(c);
      return at ? { value: rec.fields[at.col].value.trim(), line: rec.fields[at.col].line, name: at.name } : null;
    };
    const idF = get("element") as { value: string; line: number; name: string };
    const kindF = get("kind") as { value: string; line: number; name: string };
    const ptsF = get("points") as { value: string; line: number; name: string };
    const modeF = get("mode");
    let bad = false;
    if (idF.value === "") {
      report({ line: idF.line, field: idF.name, message: `${idF.name} is empty` });
      bad = true;
    } else if (ids.has(idF.value)) {
      report({ line: idF.line, field: idF.name, message: `element ${JSON.stringify(idF.value)} appears twice; first on line ${ids.get(idF.value)}` });
      bad = true;
    } else ids.set(idF.value, rec.line);
    if (!(ELEMENT_KINDS as readonly string[]).includes(kindF.value)) {
      report({ line: kindF.line, field: kindF.name, message: `${kindF.name} must be one of ${ELEMENT_KINDS.join(", ")} (lowercase), got ${JSON.stringify(kindF.value)}` });
      continue;
    }
    const kind = kindF.value as ElementKind;
    let mode = DEFAULT_MODE[kind];
    if (modeF && modeF.value !== "") {
      if (!(MODES[kind] as readonly string[]).includes(modeF.value)) {
        report({ line: modeF.line, field: modeF.name, message: `${modeF.name} ${JSON.stringify(modeF.value)} is not a ${kind} mode (${MODES[kind].join(", ")})` });
        bad = true;
      } else mode = modeF.value as ElementMode;
    }
    const points = ptsF.value.split(/\s+/).filter((p) => p !== "");
    const need = kind === "triangle" ? 3 : kind === "baseline" ? 2 : mode === "volume" ? 4 : 3;
    if (kind === "group" ? points.length < need : points.length !== need) {
      report({ line: ptsF.line, field: ptsF.name, message: `a ${kind}${kind === "group" ? ` (${mode})` : ""} needs ${kind === "group" ? "at least " : ""}${need} points, got ${points.length}` });
      bad = true;
    }
    const repeated = points.find((p, i) => points.indexOf(p) !== i);
    if (repeated !== undefined) {
      report({ line: ptsF.line, field: ptsF.name, message: `point ${JSON.stringify(repeated)} is repeated` });
      bad = true;
    }
    if (!bad) elements.push({ line: rec.line, id: idF.value, kind, mode, points });
  }
  if (errors.length > 0) return finish();
  return { ok: true, elements };
}
