/**
 * Plan ↔ SVG coordinates and the view box. The plan is drawn in metres of the site grid with
 *
 *   svgX = east,  svgY = −north      (SVG y grows downward; grid north is up on screen)
 *
 * so one SVG unit is one metre at zoom 1. Views are plain { x, y, width, height } view boxes.
 */

export interface ViewBox {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface PlanXY {
  east: number;
  north: number;
}

/** SVG coordinates of a plan point (metres). */
export function toSvg(p: PlanXY): { x: number; y: number } {
  return { x: p.east, y: -p.north };
}

/** Plan coordinates of an SVG point. */
export function fromSvg(x: number, y: number): PlanXY {
  return { east: x, north: -y };
}

/** Smallest side given to a view box, metres: a site with one point (or coincident points) still gets a 10 m view. */
export const MIN_VIEW_SIZE_M = 10;

/**
 * The view box that shows every point with a margin of `padFraction` of the larger extent on each
 * side, widened to the aspect ratio `aspect` (= width / height of the drawing area) so that the plan
 * is centred and neither axis is distorted. Empty input gives a 10 m box about the origin.
 */
export function fitViewBox(points: readonly PlanXY[], aspect = 1, padFraction = 0.06): ViewBox {
  if (!(aspect > 0) || !Number.isFinite(aspect)) throw new Error(`aspect must be a positive number, got ${aspect}`);
  let minE = Infinity;
  let maxE = -Infinity;
  let minN = Infinity;
  let maxN = -Infinity;
  for (const p of points) {
    if (!Number.isFinite(p.east) || !Number.isFinite(p.north)) continue;
    if (p.east < minE) minE = p.east;
    if (p.east > maxE) maxE = p.east;
    if (p.north < minN) minN = p.north;
    if (p.north > maxN) maxN = p.north;
  }
  if (minE > maxE) {
    minE = maxE = 0;
    minN = maxN = 0;
  }
  const cx = (minE + maxE) / 2;
  const cy = -(minN + maxN) / 2;
  const extent = Math.max(maxE - minE, maxN - minN, MIN_VIEW_SIZE_M);
  let width = Math.max(maxE - minE, MIN_VIEW_SIZE_M) + 2 * padFraction * extent;
  let height = Math.max(maxN - minN, MIN_VIEW_SIZE_M) + 2 * padFraction * extent;
  if (width / height < aspect) width = height * aspect;
  else height = width / aspect;
  return { x: cx - width / 2, y: cy - height / 2, width, height };
}

/** Zoom limits relative to the fitted view: 1/50 of it up to 4 times it. */
export const ZOOM_IN_LIMIT = 50;
export const ZOOM_OUT_LIMIT = 4;

/**
 * The view zoomed by `factor` (> 1 zooms in) about the SVG point (ax, ay), which stays where it is on
 * screen. `home` bounds the zoom (see ZOOM_IN_LIMIT, ZOOM_OUT_LIMIT). Never changes its inputs.
 */
export function zoomView(view: ViewBox, factor: number, ax: number, ay: number, home: ViewBox): ViewBox {
  if (!(factor > 0)) return view;
  const minW = home.width / ZOOM_IN_LIMIT;
  const maxW = home.width * ZOOM_OUT_LIMIT;
  const width = Math.min(maxW, Math.max(minW, view.width / factor));
  const f = view.width / width;
  const height = view.height / f;
  return { x: ax - (ax - view.x) / f, y: ay - (ay - view.y) / f, width, height };
}

/** The view moved by (dx, dy) SVG units (the content moves the other way). */
export function panView(view: ViewBox, dx: number, dy: number): ViewBox {
  return { x: view.x + dx, y: view.y + dy, width: view.width, height: view.height };
}

/** SVG units per screen pixel for a drawing area `pixelWidth` wide (preserveAspectRatio meet, same aspect). */
export function unitsPerPixel(view: ViewBox, pixelWidth: number, pixelHeight: number): number {
  if (!(pixelWidth > 0) || !(pixelHeight > 0)) return view.width / 800;
  return Math.max(view.width / pixelWidth, view.height / pixelHeight);
}

/** The SVG point under a client pixel of an element laid out at `rect` (preserveAspectRatio xMidYMid meet). */
export function clientToSvg(view: ViewBox, rect: { left: number; top: number; width: number; height: number }, clientX: number, clientY: number): { x: number; y: number } {
  const upp = unitsPerPixel(view, rect.width, rect.height);
  const offX = (rect.width - view.width / upp) / 2;
  const offY = (rect.height - view.height / upp) / 2;
  return { x: view.x + (clientX - rect.left - offX) * upp, y: view.y + (clientY - rect.top - offY) * upp };
}

/** Centroid of plan points (arithmetic mean), or null for none. */
export function centroid(points: readonly PlanXY[]): PlanXY | null {
  if (points.length === 0) return null;
  let e = 0;
  let n = 0;
  for (const p of points) {
    e += p.east;
    n += p.north;
  }
  return { east: e / points.length, north: n / points.length };
}
