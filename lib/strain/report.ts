/**
 * A whole strain run between two epochs, as the command line and the server do it: epoch rows to
 * points (σ defaults applied), elements from a list or from the plan triangulation, every element's
 * JSON object (domain.md §7).
 */
import type { StrainOptions, SurveyPoint } from "./types.ts";
import { computeElementStrain, type ElementJson, type ElementSpec } from "./element.ts";
import { triangulatePlan, type DroppedTriangle, type TriangulateOptions } from "../network/triangulate.ts";

/** Defaults when neither the file nor the caller gives σ: common practice for automatic total stations. */
export const DEFAULT_SIGMA_HORIZONTAL_M = 0.001;
export const DEFAULT_SIGMA_VERTICAL_M = 0.0015;

export interface EpochPointRow {
  point: string;
  east: number;
  north: number;
  height: number;
  sigmaEast: number | null;
  sigmaNorth: number | null;
  sigmaHeight: number | null;
}

/** Points keyed by code; the row's σ wins, else the given defaults (domain.md §7). */
export function pointsFromRows(
  rows: readonly EpochPointRow[],
  defaults: { sigmaHorizontalM?: number; sigmaVerticalM?: number } = {},
): Map<string, SurveyPoint> {
  const sh = defaults.sigmaHorizontalM ?? DEFAULT_SIGMA_HORIZONTAL_M;
  const sv = defaults.sigmaVerticalM ?? DEFAULT_SIGMA_VERTICAL_M;
  const out = new Map<string, SurveyPoint>();
  for (const r of rows) {
    out.set(r.point, { east: r.east, north: r.north, height: r.height, sigmaEast: r.sigmaEast ?? sh, sigmaNorth: r.sigmaNorth ?? sh, sigmaHeight: r.sigmaHeight ?? sv });
  }
  return out;
}

export interface StrainReport {
  elements: ElementJson[];
  /** Present when the elements came from the triangulation. */
  triangulation?: { dropped: DroppedTriangle[]; skippedPoints: { code: string; reason: string }[] };
}

/**
 * Every element's result. Without `elements`, plan triangles of the Delaunay triangulation of the
 * points present in both epochs (reference coordinates), slivers dropped.
 */
export function computeStrainReport(
  ref: ReadonlyMap<string, SurveyPoint>,
  cur: ReadonlyMap<string, SurveyPoint>,
  elements: readonly ElementSpec[] | null,
  opts: StrainOptions & { triangulation?: TriangulateOptions } = {},
): StrainReport {
  if (elements) return { elements: elements.map((e) => computeElementStrain(e, ref, cur, opts)) };
  const common = [...ref.entries()].filter(([code]) => cur.has(code)).map(([code, p]) => ({ code, east: p.east, north: p.north }));
  const tri = triangulatePlan(common, opts.triangulation);
  if (tri.status !== "ok") throw new RangeError(`computeStrainReport: ${tri.message}`);
  return {
    elements: tri.triangles.map((t) => computeElementStrain({ id: t.id, kind: "triangle", mode: "plan", points: t.codes }, ref, cur, opts)),
    triangulation: { dropped: tri.dropped, skippedPoints: tri.skippedPoints },
  };
}
