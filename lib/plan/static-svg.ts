/**
 * A static SVG plan of the strain field for printed reports (no script, no interaction): pure,
 * data in, an SVG string out, so it renders on the server, in a PDF and in any browser.
 *
 * Drawn in pixels: plan metres are mapped by the fitted view box (lib/plan/viewbox.ts; grid north up,
 * equal scale on both axes). Triangles are filled by the value on the diverging scale of
 * lib/plan/colour.ts, baselines are thick lines in that colour, groups their convex hull outline.
 * Colour never stands alone: a significant value carries a "+" (extension) or "−" (contraction)
 * mark, a value that is not significant has a dashed outline and no mark, an element without a
 * value is grey with a "×". A legend (µε), a scale bar and a north arrow are drawn below the plan.
 */
import { colourForValue, inkOn, legendStops, NO_DATA_COLOUR } from "./colour.ts";
import { convexHull } from "./hull.ts";
import { niceFloor } from "./nice.ts";
import { fitViewBox, type PlanXY } from "./viewbox.ts";

export interface StaticPlanPoint extends PlanXY {
  code: string;
  isReference: boolean;
}

export interface StaticPlanElement {
  id: number;
  name: string;
  kind: string;
  pointCodes: readonly string[];
  /** Dimensionless strain (greenMax, or engineering for baselines); null when not computed. */
  value: number | null;
  significant: boolean | null;
  /** Name drawn beside the element (e.g. elements at a trigger level). */
  highlight?: boolean;
}

export interface StaticPlanOptions {
  widthPx: number;
  heightPx: number;
  /** Half-range of the colour scale (dimensionless); default: the largest |value|. */
  domainMax?: number;
  title?: string;
  /** Draw point codes (skip on crowded plans). */
  pointLabels?: boolean;
}

const LEGEND_H = 54;

/** XML-escaped text. */
export function escapeXml(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");
}

const f1 = (v: number): string => (Math.round(v * 10) / 10).toString();

/** µε text of a legend stop: whole numbers, U+2212 for minus. */
function ue(v: number): string {
  const t = Math.round(v * 1e6).toString();
  return t.startsWith("-") ? "−" + t.slice(1) : v > 0 ? "+" + t : t;
}

export function renderStaticPlanSvg(points: readonly StaticPlanPoint[], elements: readonly StaticPlanElement[], opts: StaticPlanOptions): string {
  const W = opts.widthPx;
  const H = opts.heightPx - LEGEND_H;
  // Fit the view to the elements' points: a far reference point would shrink the field to a dot.
  const used = new Set(elements.flatMap((e) => e.pointCodes));
  const framed = points.filter((p) => used.has(p.code));
  const view = fitViewBox(framed.length >= 2 ? framed : points, W / H);
  const sx = W / view.width;
  const px = (p: PlanXY): [number, number] => [(p.east - view.x) * sx, (-p.north - view.y) * sx];
  const byCode = new Map(points.map((p) => [p.code, p]));
  let domainMax = opts.domainMax ?? 0;
  if (!(domainMax > 0)) for (const e of elements) if (e.value !== null && Number.isFinite(e.value)) domainMax = Math.max(domainMax, Math.abs(e.value));
  if (!(domainMax > 0)) domainMax = 1e-4;

  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" class="static-plan" width="${W}" height="${opts.heightPx}" viewBox="0 0 ${W} ${opts.heightPx}" role="img" aria-label="${escapeXml(opts.title ?? "Strain field plan")}">`);
  out.push(`<rect x="0" y="0" width="${W}" height="${H}" fill="#fbfaf7" stroke="#d9d4ca"/>`);
  const marks: string[] = [];
  const labels: string[] = [];
  const order = [...elements].sort((a, b) => (a.kind === "triangle" ? 0 : a.kind === "group" ? 1 : 2) - (b.kind === "triangle" ? 0 : b.kind === "group" ? 1 : 2));
  for (const el of order) {
    const pts = el.pointCodes.map((c) => byCode.get(c)).filter((p): p is StaticPlanPoint => p !== undefined);
    if (pts.length !== el.pointCodes.length || pts.length < 2) continue;
    const xy = pts.map(px);
    const colour = colourForValue(el.value, domainMax, true);
    const dashed = el.value !== null && el.significant === false ? ` stroke-dasharray="4 3"` : "";
    const cx = xy.reduce((s, p) => s + p[0], 0) / xy.length;
    const cy = xy.reduce((s, p) => s + p[1], 0) / xy.length;
    const title = `<title>${escapeXml(el.name)}: ${el.value === null ? "no value" : `${ue(el.value)} µε${el.significant === false ? " (not significant)" : ""}`}</title>`;
    if (el.kind === "triangle") {
      out.push(`<polygon points="${xy.map((p) => `${f1(p[0])},${f1(p[1])}`).join(" ")}" fill="${colour}" fill-opacity="0.85" stroke="#52606b" stroke-width="0.8"${dashed}>${title}</polygon>`);
    } else if (el.kind === "baseline") {
      out.push(`<line x1="${f1(xy[0][0])}" y1="${f1(xy[0][1])}" x2="${f1(xy[1][0])}" y2="${f1(xy[1][1])}" stroke="#1f2a33" stroke-width="7" stroke-linecap="round"/>`);
      out.push(`<line x1="${f1(xy[0][0])}" y1="${f1(xy[0][1])}" x2="${f1(xy[1][0])}" y2="${f1(xy[1][1])}" stroke="${colour}" stroke-width="5" stroke-linecap="round"${dashed}>${title}</line>`);
    } else {
      const hull = convexHull(xy.map(([x, y]) => ({ x, y })));
      out.push(`<polygon points="${hull.map((p) => `${f1(p.x)},${f1(p.y)}`).join(" ")}" fill="${colour}" fill-opacity="0.25" stroke="${colour === NO_DATA_COLOUR ? "#7d776c" : colour}" stroke-width="2.5"${dashed || ` stroke-dasharray="8 3"`}>${title}</polygon>`);
    }
    const ink = el.kind === "triangle" ? inkOn(colour) : "#1f2a33";
    if (el.value === null) marks.push(`<text x="${f1(cx)}" y="${f1(cy + 3.5)}" font-size="10" text-anchor="middle" fill="${ink}">×</text>`);
    else if (el.significant) marks.push(`<text x="${f1(cx)}" y="${f1(cy + 4)}" font-size="12" font-weight="700" text-anchor="middle" fill="${ink}">${el.value >= 0 ? "+" : "−"}</text>`);
    if (el.highlight) labels.push(`<text x="${f1(cx + 6)}" y="${f1(cy - 6)}" font-size="10" font-weight="700" fill="#1f2a33" stroke="#fff" stroke-width="3" paint-order="stroke">${escapeXml(el.name)}</text>`);
  }
  out.push(...marks);
  let outside = 0;
  for (const p of points) {
    const [x, y] = px(p);
    if (x < 0 || y < 0 || x > W || y > H) {
      outside++;
      continue;
    }
    out.push(p.isReference ? `<rect x="${f1(x - 3.5)}" y="${f1(y - 3.5)}" width="7" height="7" fill="#fff" stroke="#1f2a33" stroke-width="1.3"/>` : `<circle cx="${f1(x)}" cy="${f1(y)}" r="2.2" fill="#1f2a33"/>`);
    if (opts.pointLabels) out.push(`<text x="${f1(x + 3)}" y="${f1(y - 3)}" font-size="7.5" fill="#52606b">${escapeXml(p.code)}</text>`);
  }
  out.push(...labels);
  if (outside) out.push(`<text x="10" y="16" font-size="10" fill="#52606b">${outside} point${outside === 1 ? "" : "s"} outside the view (e.g. distant reference points)</text>`);

  // North arrow (grid north) and scale bar, top right / bottom left of the plan.
  out.push(`<g transform="translate(${W - 24},14)"><path d="M0 0 L6 18 L0 14 L-6 18 Z" fill="#1f2a33"/><text x="0" y="30" font-size="10" text-anchor="middle" fill="#1f2a33">N</text></g>`);
  const barM = niceFloor(view.width / 5);
  const barPx = barM * sx;
  out.push(`<g transform="translate(10,${H - 14})"><rect x="0" y="0" width="${f1(barPx)}" height="5" fill="#1f2a33"/><rect x="${f1(barPx / 2)}" y="0" width="${f1(barPx / 2)}" height="5" fill="#fff" stroke="#1f2a33" stroke-width="0.8"/><text x="${f1(barPx + 6)}" y="6" font-size="10" fill="#1f2a33">${barM} m</text></g>`);

  // Legend: the colour scale in µε, and the marks.
  const stops = legendStops(domainMax, 7, true);
  const cell = Math.min(46, (W - 300) / stops.length);
  const ly = H + 8;
  out.push(`<g font-size="9.5" fill="#1f2a33">`);
  stops.forEach((s, i) => {
    out.push(`<rect x="${f1(8 + i * cell)}" y="${ly}" width="${f1(cell)}" height="12" fill="${s.colour}" stroke="#d9d4ca" stroke-width="0.5"/>`);
    out.push(`<text x="${f1(8 + i * cell + cell / 2)}" y="${ly + 24}" text-anchor="middle">${ue(s.value)}</text>`);
  });
  out.push(`<text x="8" y="${ly + 38}">µε: greenMax (baselines: engineering strain)</text>`);
  const kx = 24 + stops.length * cell;
  out.push(`<text x="${f1(kx)}" y="${ly + 10}">+ / − significant extension (orange) / contraction (blue)</text>`);
  out.push(`<line x1="${f1(kx)}" y1="${ly + 21}" x2="${f1(kx + 18)}" y2="${ly + 21}" stroke="#52606b" stroke-dasharray="4 3"/><text x="${f1(kx + 22)}" y="${ly + 24}">not significant</text>`);
  out.push(`<text x="${f1(kx)}" y="${ly + 38}">× no value · □ reference point · ● target</text>`);
  out.push(`</g></svg>`);
  return out.join("");
}
