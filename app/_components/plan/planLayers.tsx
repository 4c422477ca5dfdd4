"use client";
/** The SVG layers of the site plan: north arrow, coloured elements, principal-axis glyphs, points, displacement vectors. */
import { memo } from "react";
import { colourForValue, displacementArrow, inkOn, principalGlyph, quantityValue, QUANTITY_INFO, type FieldElement, type PlanQuantity, type StrainField, type ViewBox } from "@/lib/plan/index.ts";
import { MIN_GLYPH_ELEMENT_PX } from "./planScale.ts";
import type { PlanPointProp, Shape } from "./planTypes.ts";

export function NorthArrow({ view, upp }: { view: ViewBox; upp: number }) {
  const x = view.x + view.width - 34 * upp;
  const y = view.y + 40 * upp;
  const s = upp;
  return (
    <g className="north" aria-hidden="true">
      <path d={`M ${x} ${y - 22 * s} L ${x + 8 * s} ${y + 6 * s} L ${x} ${y} L ${x - 8 * s} ${y + 6 * s} Z`} fill="#1f2a33" />
      <text x={x} y={y + 22 * s} fontSize={13 * s} textAnchor="middle" fill="#1f2a33">
        N
      </text>
    </g>
  );
}

/** Number for SVG path data: millimetres are plenty for a plan in metres about a local origin. */
const f3 = (v: number) => (Math.round(v * 1000) / 1000).toString();

/** Attribute text for markup built by hand (the values here are colours and fixed words, escaped all the same). */
const attr = (v: string) => v.replace(/&/g, "&amp;").replace(/"/g, "&quot;").replace(/</g, "&lt;");

/**
 * One polygon (or line) per element for its colour, hover and click; the hatching of every
 * contracting element is one path, so the drawing stays light on sites with a thousand elements.
 * The layer's markup is built as one string and set in one go: a thousand elements made one by one
 * through React cost far more script time (on every load and every epoch step) than the browser
 * takes to parse them. Hover and click work by delegation on `data-element` (usePlanView).
 */
export function elementsMarkup(p: { shapes: Shape[]; valueById: Map<number, FieldElement>; quantity: PlanQuantity; k: number; domainMax: number; upp: number; showMarkers: boolean }): string {
  const info = QUANTITY_INFO[p.quantity];
  let hatch = "";
  let markers = "";
  let items = "";
  for (const s of p.shapes) {
    const fe = p.valueById.get(s.el.id);
    const qv = fe ? quantityValue(fe, s.el.kind, p.quantity, p.k) : null;
    const value = qv?.value ?? null;
    const colour = colourForValue(value, p.domainMax, info.signed || qv?.axial === true);
    const fill = attr(colour);
    const faded = qv?.significant === false;
    const sense = value === null || (!info.signed && !qv?.axial) ? null : value > 0 ? "+" : value < 0 ? "−" : null;
    const common = `data-element="${s.el.id}" data-sign="${sense === "+" ? "extension" : sense === "−" ? "contraction" : "none"}" data-significant="${qv?.significant === null || qv === null ? "unknown" : String(qv.significant)}" data-fill="${fill}"`;
    if (s.kind === "polygon") {
      let pts = "";
      let d = "";
      for (const q of s.pts) {
        const x = f3(q.x);
        const y = f3(q.y);
        pts += (pts ? " " : "") + x + "," + y;
        d += (d ? "L" : "M") + x + " " + y;
      }
      if (sense === "−") hatch += d + "Z";
      const markerSize = Math.min(14 * p.upp, s.sizeM * 0.35);
      if (p.showMarkers && sense && markerSize > 3 * p.upp)
        markers += `<text x="${s.c.x}" y="${s.c.y}" font-size="${markerSize * 1.4}" text-anchor="middle" dominant-baseline="central" fill="${attr(inkOn(colour))}" font-weight="700">${sense}</text>`;
      items += `<polygon points="${pts}" fill="${fill}" fill-opacity="${faded ? 0.38 : 1}" stroke="#4a5560" stroke-opacity="${faded ? 0.5 : 1}" stroke-width="0.8" vector-effect="non-scaling-stroke" ${common} class="${faded ? "el faded" : "el"}"/>`;
    } else {
      const [a, b] = s.pts;
      const xy = `x1="${a.x}" y1="${a.y}" x2="${b.x}" y2="${b.y}"`;
      items +=
        `<g opacity="${faded ? 0.45 : 1}">` +
        `<line ${xy} stroke="#1f2a33" stroke-width="9" vector-effect="non-scaling-stroke" stroke-linecap="round" pointer-events="none"/>` +
        `<line ${xy} stroke="${fill}" stroke-width="6" vector-effect="non-scaling-stroke" stroke-linecap="round"${sense === "−" ? ' stroke-dasharray="6 4"' : ""} ${common} class="el"/>` +
        `</g>`;
    }
  }
  if (hatch) items += `<path d="${hatch}" fill="url(#hatch-contraction)" pointer-events="none" class="hatch"/>`;
  if (markers) items += `<g pointer-events="none">${markers}</g>`;
  return items;
}

export const ElementsLayer = memo(function ElementsLayer(p: Parameters<typeof elementsMarkup>[0]) {
  return <g className="elements" dangerouslySetInnerHTML={{ __html: elementsMarkup(p) }} />;
});

export const GlyphLayer = memo(function GlyphLayer(p: { shapes: Shape[]; valueById: Map<number, FieldElement>; scale: number; upp: number }) {
  if (!(p.scale > 0)) return null;
  // Two paths in all: extension bars with outward heads, contraction bars with inward heads.
  let ext = "";
  let con = "";
  for (const s of p.shapes) {
    if (s.kind !== "polygon" || s.sizeM / p.upp < MIN_GLYPH_ELEMENT_PX) continue;
    const fe = p.valueById.get(s.el.id);
    if (!fe || fe.greenMax === null || fe.greenMin === null) continue;
    const bars = principalGlyph({ cx: s.c.x, cy: s.c.y, azimuthMaxDeg: fe.azimuthMaxDeg, major: fe.greenMax, minor: fe.greenMin, scale: p.scale, headSize: 5 * p.upp });
    for (const b of bars) {
      if (b.sense === "none") continue;
      let d = `M${f3(b.x1)} ${f3(b.y1)}L${f3(b.x2)} ${f3(b.y2)}`;
      for (const h of b.heads) d += `M${f3(h[0][0])} ${f3(h[0][1])}L${f3(h[1][0])} ${f3(h[1][1])}L${f3(h[2][0])} ${f3(h[2][1])}`;
      if (b.sense === "extension") ext += d;
      else con += d;
    }
  }
  return (
    <g className="glyphs" pointerEvents="none" fill="none" strokeWidth={1.8}>
      {ext ? <path d={ext} stroke="#5a1e00" vectorEffect="non-scaling-stroke" data-glyphs="extension" /> : null}
      {con ? <path d={con} stroke="#0a2540" vectorEffect="non-scaling-stroke" data-glyphs="contraction" /> : null}
    </g>
  );
});

export const PointsLayer = memo(function PointsLayer(p: { points: PlanPointProp[]; upp: number; showLabels: boolean }) {
  const r = 3.2 * p.upp;
  let dots = "";
  let refs = "";
  for (const pt of p.points) {
    const x = pt.east;
    const y = -pt.north;
    if (pt.isReference) refs += `M${f3(x)} ${f3(y - 1.6 * r)}L${f3(x + 1.4 * r)} ${f3(y + r)}L${f3(x - 1.4 * r)} ${f3(y + r)}Z`;
    else dots += `M${f3(x - r)} ${f3(y)}a${f3(r)} ${f3(r)} 0 1 0 ${f3(2 * r)} 0a${f3(r)} ${f3(r)} 0 1 0 ${f3(-2 * r)} 0`;
  }
  return (
    <g className="points" pointerEvents="none">
      <path d={dots} fill="#1f2a33" stroke="#ffffff" strokeWidth={1} vectorEffect="non-scaling-stroke" />
      <path d={refs} fill="#ffffff" stroke="#1f2a33" strokeWidth={1.4} vectorEffect="non-scaling-stroke" />
      {p.showLabels
        ? p.points.map((pt) => (
            <text key={pt.code} x={pt.east + 1.6 * r} y={-pt.north - 1.6 * r} fontSize={11 * p.upp} fill="#1f2a33" stroke="#ffffff" strokeWidth={3 * p.upp} paintOrder="stroke">
              {pt.code}
            </text>
          ))
        : null}
    </g>
  );
});

export const VectorLayer = memo(function VectorLayer(p: { field: StrainField; pointByCode: Map<string, PlanPointProp>; exaggeration: number; upp: number }) {
  let sig = "";
  let not = "";
  for (const d of p.field.points) {
    const pt = p.pointByCode.get(d.code);
    if (!pt) continue;
    const a = displacementArrow(pt.east, -pt.north, d.dE, d.dN, p.exaggeration, 6 * p.upp);
    if (!a) continue;
    const path = `M${f3(a.shaft.x1)} ${f3(a.shaft.y1)}L${f3(a.shaft.x2)} ${f3(a.shaft.y2)}M${f3(a.head[0][0])} ${f3(a.head[0][1])}L${f3(a.head[1][0])} ${f3(a.head[1][1])}L${f3(a.head[2][0])} ${f3(a.head[2][1])}`;
    if (d.significant === false) not += path;
    else sig += path;
  }
  return (
    <g className="vectors" pointerEvents="none" fill="none" strokeWidth={1.6}>
      {sig ? <path d={sig} stroke="#7a1f5c" vectorEffect="non-scaling-stroke" /> : null}
      {not ? <path d={not} stroke="#7b8791" strokeDasharray="3 3" opacity={0.7} vectorEffect="non-scaling-stroke" /> : null}
    </g>
  );
});
