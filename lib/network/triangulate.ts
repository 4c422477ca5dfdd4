/**
 * Plan triangulation of survey points (domain.md §2): Delaunay in (E, N) with delaunator, then slivers
 * (smallest interior angle below `minAngleDeg`, default 20°) and, optionally, triangles with an edge
 * longer than `maxEdgeM` are dropped and listed with their reason. Thin triangles amplify survey noise.
 *
 * Naming: a triangle's codes are listed counter-clockwise seen from above (East toward North),
 * starting from the smallest code (plain code-unit order, as `a < b` on strings); its id joins them
 * with "-", e.g. "P1-P3-P2".
 */
import Delaunator from "delaunator";

export const DEFAULT_MIN_ANGLE_DEG = 20;

export interface PlanPointInput {
  code: string;
  east: number;
  north: number;
}
export interface TriangulateOptions {
  minAngleDeg?: number;
  maxEdgeM?: number;
}
export interface PlanTriangle {
  id: string;
  codes: [string, string, string];
  /** Smallest interior angle, degrees (quality figure). */
  minAngleDeg: number;
  /** Longest edge, metres. */
  maxEdgeM: number;
}
export const DROP_REASONS = ["sliver", "long-edge", "degenerate"] as const;
export type DropReason = (typeof DROP_REASONS)[number];
export interface DroppedTriangle extends PlanTriangle {
  reason: DropReason;
}
export type TriangulationResult =
  | { status: "ok"; triangles: PlanTriangle[]; dropped: DroppedTriangle[]; skippedPoints: { code: string; reason: string }[] }
  | { status: "invalid"; message: string };

/** Same 2·area / longest² floor as the strain engine uses for a degenerate triangle. */
const SHAPE_TOLERANCE = 1e-6;

/** Codes of a triangle in naming order: counter-clockwise, smallest code first. */
export function nameTriangle(pts: readonly [PlanPointInput, PlanPointInput, PlanPointInput]): [string, string, string] {
  const [a, b, c] = pts;
  const cross = (b.east - a.east) * (c.north - a.north) - (b.north - a.north) * (c.east - a.east);
  const ccw = cross >= 0 ? [a.code, b.code, c.code] : [a.code, c.code, b.code];
  let first = 0;
  for (let i = 1; i < 3; i++) if (ccw[i] < ccw[first]) first = i;
  return [ccw[first], ccw[(first + 1) % 3], ccw[(first + 2) % 3]];
}

export function triangulatePlan(points: readonly PlanPointInput[], opts: TriangulateOptions = {}): TriangulationResult {
  const minAngleDeg = opts.minAngleDeg ?? DEFAULT_MIN_ANGLE_DEG;
  const maxEdgeM = opts.maxEdgeM;
  if (!(minAngleDeg >= 0 && minAngleDeg < 60)) return { status: "invalid", message: `minAngleDeg must be in [0, 60), got ${minAngleDeg}` };
  if (maxEdgeM !== undefined && !(maxEdgeM > 0)) return { status: "invalid", message: `maxEdgeM must be > 0, got ${maxEdgeM}` };
  const seen = new Set<string>();
  for (const p of points) {
    if (seen.has(p.code)) return { status: "invalid", message: `point ${p.code} appears twice` };
    seen.add(p.code);
    if (!Number.isFinite(p.east) || !Number.isFinite(p.north)) return { status: "invalid", message: `point ${p.code} has a non-finite coordinate` };
  }
  if (points.length < 3) return { status: "ok", triangles: [], dropped: [], skippedPoints: [] };
  // Centre the coordinates: grid magnitudes (5e6 m) would otherwise cost delaunator digits.
  let ce = 0;
  let cn = 0;
  for (const p of points) {
    ce += p.east / points.length;
    cn += p.north / points.length;
  }
  const xy = new Float64Array(points.length * 2);
  points.forEach((p, i) => {
    xy[2 * i] = p.east - ce;
    xy[2 * i + 1] = p.north - cn;
  });
  const d = new Delaunator(xy);
  const triangles: PlanTriangle[] = [];
  const dropped: DroppedTriangle[] = [];
  const inTriangle = new Uint8Array(points.length);
  for (let t = 0; t < d.triangles.length; t += 3) {
    const ia = d.triangles[t];
    const ib = d.triangles[t + 1];
    const ic = d.triangles[t + 2];
    const q = quality(xy, ia, ib, ic);
    const tri: PlanTriangle = { ...q, id: "", codes: nameTriangle([points[ia], points[ib], points[ic]]) };
    tri.id = tri.codes.join("-");
    const reason: DropReason | null = q.shape < SHAPE_TOLERANCE ? "degenerate" : q.minAngleDeg < minAngleDeg ? "sliver" : maxEdgeM !== undefined && q.maxEdgeM > maxEdgeM ? "long-edge" : null;
    if (reason) dropped.push({ id: tri.id, codes: tri.codes, minAngleDeg: tri.minAngleDeg, maxEdgeM: tri.maxEdgeM, reason });
    else {
      triangles.push({ id: tri.id, codes: tri.codes, minAngleDeg: tri.minAngleDeg, maxEdgeM: tri.maxEdgeM });
      inTriangle[ia] = inTriangle[ib] = inTriangle[ic] = 1;
    }
  }
  const byId = (a: PlanTriangle, b: PlanTriangle): number => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);
  triangles.sort(byId);
  dropped.sort(byId);
  const skippedPoints = points.filter((_, i) => !inTriangle[i]).map((p) => ({ code: p.code, reason: "in no kept triangle (coincident with another point, or only in dropped triangles)" }));
  return { status: "ok", triangles, dropped, skippedPoints };
}

function quality(xy: Float64Array, ia: number, ib: number, ic: number): { minAngleDeg: number; maxEdgeM: number; shape: number } {
  const e1x = xy[2 * ib] - xy[2 * ia];
  const e1y = xy[2 * ib + 1] - xy[2 * ia + 1];
  const e2x = xy[2 * ic] - xy[2 * ia];
  const e2y = xy[2 * ic + 1] - xy[2 * ia + 1];
  const e3x = e2x - e1x;
  const e3y = e2y - e1y;
  const twiceArea = Math.abs(e1x * e2y - e1y * e2x);
  const l1 = e1x * e1x + e1y * e1y;
  const l2 = e2x * e2x + e2y * e2y;
  const l3 = e3x * e3x + e3y * e3y;
  const longest = Math.max(l1, l2, l3);
  // Angles by atan2(|cross|, dot), accurate for slivers.
  const aA = Math.atan2(twiceArea, e1x * e2x + e1y * e2y);
  const aB = Math.atan2(twiceArea, -(e1x * e3x + e1y * e3y));
  const aC = Math.PI - aA - aB;
  return { minAngleDeg: Math.max(0, (Math.min(aA, aB, aC) * 180) / Math.PI), maxEdgeM: Math.sqrt(longest), shape: longest > 0 ? twiceArea / longest : 0 };
}
