/**
 * Principal-axis glyphs and displacement arrows, in SVG coordinates (see viewbox.ts: x = E, y = −N).
 *
 * A glyph is two crossed bars through the element's centroid, along the principal directions of the
 * Green-Lagrange strain. The major axis has grid azimuth θ = azimuthMaxDeg, clockwise from grid north:
 *
 *        N (−y on screen)                 major axis unit vector
 *        ▲    θ                            plan (E, N) = ( sin θ,  cos θ)
 *        │   /                             SVG  (x, y) = ( sin θ, −cos θ)
 *        │  /                            minor axis (θ + 90°)
 *        │ /                               plan (E, N) = ( cos θ, −sin θ)
 *        └────────▶ E (+x)                 SVG  (x, y) = ( cos θ,  sin θ)
 *
 * Each bar is |value| × scale long in total (half each side of the centroid). Arrowheads point
 * outward at both ends for extension (value > 0) and inward for contraction (value < 0).
 */

export interface Segment {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}

export interface GlyphBar extends Segment {
  /** Principal value (dimensionless) this bar stands for. */
  value: number;
  sense: "extension" | "contraction" | "none";
  /** Arrowhead polylines (three points each: wing, tip, wing), two per bar unless sense is "none". */
  heads: [number, number][][];
}

export interface GlyphInput {
  /** Centroid in SVG coordinates. */
  cx: number;
  cy: number;
  /** Grid azimuth of the major axis, degrees clockwise from grid north; null (isotropic) draws it along north. */
  azimuthMaxDeg: number | null;
  major: number;
  minor: number;
  /** SVG units of bar length per unit of strain. */
  scale: number;
  /** Arrowhead size in SVG units (usually a few screen pixels converted at the current zoom). */
  headSize: number;
}

const DEG = Math.PI / 180;

/** Unit vectors (SVG) of the major and minor principal axes for a grid azimuth in degrees. */
export function principalAxesSvg(azimuthMaxDeg: number): { major: [number, number]; minor: [number, number] } {
  const t = azimuthMaxDeg * DEG;
  return { major: [Math.sin(t), -Math.cos(t)], minor: [Math.cos(t), Math.sin(t)] };
}

function head(tipX: number, tipY: number, dirX: number, dirY: number, size: number): [number, number][] {
  // dir points the way the arrow points; the wings go back from the tip at ±30°.
  const bx = -dirX * size;
  const by = -dirY * size;
  const c = Math.cos(30 * DEG);
  const s = Math.sin(30 * DEG);
  return [
    [tipX + bx * c - by * s, tipY + bx * s + by * c],
    [tipX, tipY],
    [tipX + bx * c + by * s, tipY - bx * s + by * c],
  ];
}

function bar(cx: number, cy: number, ux: number, uy: number, value: number, scale: number, headSize: number): GlyphBar {
  const half = (Math.abs(value) * scale) / 2;
  const x1 = cx - ux * half;
  const y1 = cy - uy * half;
  const x2 = cx + ux * half;
  const y2 = cy + uy * half;
  const sense = value > 0 ? "extension" : value < 0 ? "contraction" : "none";
  const heads: [number, number][][] = [];
  if (sense !== "none" && half > 0) {
    const size = Math.min(headSize, half * 0.9);
    if (sense === "extension") {
      heads.push(head(x2, y2, ux, uy, size), head(x1, y1, -ux, -uy, size));
    } else {
      // Inward: tips at the bar ends pointing towards the centroid.
      heads.push(head(x2, y2, -ux, -uy, size), head(x1, y1, ux, uy, size));
    }
  }
  return { x1, y1, x2, y2, value, sense, heads };
}

/** The two bars of a principal-axis glyph (major first). */
export function principalGlyph(g: GlyphInput): [GlyphBar, GlyphBar] {
  const { major, minor } = principalAxesSvg(g.azimuthMaxDeg ?? 0);
  return [bar(g.cx, g.cy, major[0], major[1], g.major, g.scale, g.headSize), bar(g.cx, g.cy, minor[0], minor[1], g.minor, g.scale, g.headSize)];
}

/**
 * Glyph scale (SVG units per unit strain) so that the largest principal magnitude `maxAbsStrain`
 * draws a bar `targetLengthM` long; a nice strain for the legend's reference bar comes with it.
 */
export function glyphScale(maxAbsStrain: number, targetLengthM: number): number {
  if (!(maxAbsStrain > 0) || !(targetLengthM > 0)) return 0;
  return targetLengthM / maxAbsStrain;
}

/**
 * A displacement arrow from a point (SVG) for a plan displacement (dE, dN) in metres, drawn
 * `exaggeration` times its true length. Returns the shaft and one arrowhead; null when zero.
 */
export function displacementArrow(x: number, y: number, dEastM: number, dNorthM: number, exaggeration: number, headSize: number): { shaft: Segment; head: [number, number][] } | null {
  const dx = dEastM * exaggeration;
  const dy = -dNorthM * exaggeration;
  const len = Math.hypot(dx, dy);
  if (!(len > 0) || !Number.isFinite(len)) return null;
  const ux = dx / len;
  const uy = dy / len;
  return { shaft: { x1: x, y1: y, x2: x + dx, y2: y + dy }, head: head(x + dx, y + dy, ux, uy, Math.min(headSize, len * 0.6)) };
}

/** Polygon centroid (area-weighted) of a triangle or any simple polygon in SVG coordinates; the vertex mean when degenerate. */
export function polygonCentroid(pts: readonly { x: number; y: number }[]): { x: number; y: number } {
  let a = 0;
  let cx = 0;
  let cy = 0;
  for (let i = 0; i < pts.length; i++) {
    const p = pts[i];
    const q = pts[(i + 1) % pts.length];
    const w = p.x * q.y - q.x * p.y;
    a += w;
    cx += (p.x + q.x) * w;
    cy += (p.y + q.y) * w;
  }
  if (Math.abs(a) < 1e-12 * Math.max(1, ...pts.map((p) => p.x * p.x + p.y * p.y))) {
    const n = Math.max(1, pts.length);
    return { x: pts.reduce((s, p) => s + p.x, 0) / n, y: pts.reduce((s, p) => s + p.y, 0) / n };
  }
  return { x: cx / (3 * a), y: cy / (3 * a) };
}
