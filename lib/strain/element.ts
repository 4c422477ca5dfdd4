/**
 * One element (triangle, baseline or group) between two epochs, as the JSON object of domain.md §7:
 * `id`, `kind`, `mode`, `points`, `status`, then `message` (not ok) or the quantities (ok).
 */
import type {
  BaselineStrainOk,
  ElementKind,
  ElementMode,
  GroupPlanStrainOk,
  GroupVolumeStrainOk,
  StrainOptions,
  SurfaceStrainOk,
  SurveyPoint,
  TriangleStrainOk,
} from "./types.ts";
import { computeTriangleStrain } from "./triangle.ts";
import { computeSurfaceTriangleStrain } from "./surface.ts";
import { computeBaselineStrain } from "./baseline.ts";
import { computeGroupStrain } from "./group.ts";

export interface ElementSpec {
  id: string;
  kind: ElementKind;
  /** Omitted: `plan` for triangles and groups, `slope` for baselines. */
  mode?: ElementMode;
  points: string[];
}

interface ElementHead {
  id: string;
  kind: ElementKind;
  mode: ElementMode;
  points: string[];
}
export type ElementFailureJson = ElementHead & { status: "degenerate" | "missing-point"; message: string };
type Quantities<T> = Omit<T, "status">;
export type ElementOkJson = ElementHead & { status: "ok" } & (
    | Quantities<TriangleStrainOk>
    | Quantities<SurfaceStrainOk>
    | Quantities<BaselineStrainOk>
    | Quantities<GroupPlanStrainOk>
    | Quantities<GroupVolumeStrainOk>
  );
export type ElementJson = ElementFailureJson | ElementOkJson;

const MODES: Record<ElementKind, readonly ElementMode[]> = {
  triangle: ["plan", "surface"],
  baseline: ["slope", "horizontal"],
  group: ["plan", "volume"],
};
const DEFAULT_MODE: Record<ElementKind, ElementMode> = { triangle: "plan", baseline: "slope", group: "plan" };

/** Default mode of an element kind (domain.md §7). */
export function defaultMode(kind: ElementKind): ElementMode {
  return DEFAULT_MODE[kind];
}

/** Whether `mode` is allowed for `kind`. */
export function isModeOf(kind: ElementKind, mode: string): mode is ElementMode {
  return (MODES[kind] as readonly string[]).includes(mode);
}

export function computeElementStrain(
  element: ElementSpec,
  ref: ReadonlyMap<string, SurveyPoint>,
  cur: ReadonlyMap<string, SurveyPoint>,
  opts: StrainOptions = {},
): ElementJson {
  const mode = element.mode ?? DEFAULT_MODE[element.kind];
  const head: ElementHead = { id: element.id, kind: element.kind, mode, points: [...element.points] };
  const fail = (status: "degenerate" | "missing-point", message: string): ElementFailureJson => ({ ...head, status, message });
  if (!isModeOf(element.kind, mode)) return fail("degenerate", `mode "${mode}" is not a ${element.kind} mode (${MODES[element.kind].join(", ")})`);
  const pts = element.points;
  const repeated = pts.find((p, i) => pts.indexOf(p) !== i);
  if (repeated !== undefined) return fail("degenerate", `point ${repeated} is repeated in the element`);
  const need = element.kind === "triangle" ? 3 : element.kind === "baseline" ? 2 : mode === "volume" ? 4 : 3;
  const exact = element.kind !== "group";
  if (exact ? pts.length !== need : pts.length < need) return fail("degenerate", `a ${mode} ${element.kind} needs ${exact ? "" : "at least "}${need} points, got ${pts.length}`);

  if (element.kind === "group") {
    const r = computeGroupStrain(
      pts.map((code) => ({ code, ref: ref.get(code), cur: cur.get(code) })),
      { ...opts, mode: mode === "volume" ? "volume" : "plan" },
    );
    if (r.status !== "ok") return fail(r.status, r.message);
    const { status: _s, ...q } = r;
    return { ...head, status: "ok", ...q };
  }
  const missing: string[] = [];
  for (const code of pts) {
    if (!ref.has(code)) missing.push(`${code} is missing from the reference epoch`);
    if (!cur.has(code)) missing.push(`${code} is missing from the current epoch`);
  }
  if (missing.length) return fail("missing-point", `point ${missing.join("; point ")}`);
  const R = pts.map((c) => ref.get(c) as SurveyPoint);
  const C = pts.map((c) => cur.get(c) as SurveyPoint);
  if (element.kind === "baseline") {
    const r = computeBaselineStrain([R[0], R[1]], [C[0], C[1]], mode === "horizontal" ? "horizontal" : "slope", opts);
    if (r.status !== "ok") return fail(r.status, r.message);
    const { status: _s, ...q } = r;
    return { ...head, status: "ok", ...q };
  }
  const r =
    mode === "surface"
      ? computeSurfaceTriangleStrain([R[0], R[1], R[2]], [C[0], C[1], C[2]], opts)
      : computeTriangleStrain([R[0], R[1], R[2]], [C[0], C[1], C[2]], opts);
  if (r.status !== "ok") return fail(r.status, r.message);
  const { status: _s, ...q } = r;
  return { ...head, status: "ok", ...q };
}
