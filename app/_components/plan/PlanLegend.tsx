"use client";
/** Legend of the plan: colour scale in the chosen unit, shape cues, glyph and displacement scale bars. */
import { formatLength, formatStrain, legendStops, niceFloor, QUANTITY_INFO, type PlanQuantity, type StrainUnit } from "@/lib/plan/index.ts";

export function PlanLegend(p: {
  quantity: PlanQuantity;
  unit: StrainUnit;
  domainMax: number;
  glyphRefStrain: number;
  glyphRefPx: number;
  exaggeration: number;
  upp: number;
  showGlyphs: boolean;
  glyphsThinned: boolean;
  showVectors: boolean;
  hasBaselines: boolean;
  mode: "cumulative" | "increment";
  k: number;
}) {
  const info = QUANTITY_INFO[p.quantity];
  const stops = legendStops(p.domainMax, 9, info.signed);
  const fmt = (v: number) => (info.kind === "angle" ? `${v.toFixed(v === 0 ? 0 : 3)}°` : formatStrain(v, p.unit, { signed: true }));
  const gradient = `linear-gradient(to right, ${stops.map((s) => s.colour).join(", ")})`;
  // Displacement scale bar: a nice length that draws 60–150 px at the current zoom and exaggeration.
  const pxPerM = p.exaggeration / p.upp;
  const barM = niceFloor(120 / pxPerM);
  const barPx = barM * pxPerM;
  return (
    <aside className="plan-legend" aria-label="Legend">
      <h3>{info.label}</h3>
      <p className="muted small">
        {p.mode === "cumulative" ? "Cumulative, against the reference epoch" : "Increment between the two chosen epochs"}. {info.note}.
      </p>
      <div className="legend-bar" style={{ background: gradient }} aria-hidden="true" />
      <div className="legend-ticks">
        <span>{fmt(stops[0].value)}</span>
        <span>{fmt(stops[4].value)}</span>
        <span>{fmt(stops[8].value)}</span>
      </div>
      {info.signed ? (
        <ul className="legend-keys">
          <li>
            <span className="swatch swatch-ext" aria-hidden="true">+</span> orange, plain: extension
          </li>
          <li>
            <span className="swatch swatch-con" aria-hidden="true">−</span> blue, hatched: contraction
          </li>
        </ul>
      ) : null}
      <ul className="legend-keys">
        <li>
          <span className="swatch swatch-faded" aria-hidden="true" /> faded: not significant (|value| ≤ {p.k.toFixed(2)}·σ)
        </li>
        {p.hasBaselines ? (
          <li>
            <span className="swatch swatch-line" aria-hidden="true" /> baselines: axial strain (l − L)/L, dashed when shortening
          </li>
        ) : null}
        <li>
          <span className="swatch swatch-ref" aria-hidden="true">▲</span> stable reference point · <span aria-hidden="true">●</span> monitoring point
        </li>
      </ul>
      {p.showGlyphs && p.glyphRefStrain > 0 ? (
        <div className="legend-scale">
          <div className="muted small">Principal axes (Green): arrows out = extension, in = contraction</div>
          <svg width={Math.max(40, Math.min(220, p.glyphRefPx)) + 10} height={18} aria-hidden="true">
            <line x1={5} y1={9} x2={5 + Math.min(220, p.glyphRefPx)} y2={9} stroke="#5a1e00" strokeWidth={2} />
            <polyline points={`${5 + Math.min(220, p.glyphRefPx) - 6},5 ${5 + Math.min(220, p.glyphRefPx)},9 ${5 + Math.min(220, p.glyphRefPx) - 6},13`} fill="none" stroke="#5a1e00" strokeWidth={2} />
          </svg>
          <div className="small">
            this length = {formatStrain(p.glyphRefStrain, p.unit)}
            {p.glyphRefPx > 220 ? " (bar shortened at this zoom)" : ""}
            {p.glyphsThinned ? ". Small elements get theirs when you zoom in." : ""}
          </div>
        </div>
      ) : null}
      {p.showVectors && barM > 0 ? (
        <div className="legend-scale">
          <div className="muted small">Displacement, ×{p.exaggeration}; grey dashed: not significant (χ², 95 %)</div>
          <svg width={barPx + 10} height={14} aria-hidden="true">
            <line x1={5} y1={7} x2={5 + barPx} y2={7} stroke="#7a1f5c" strokeWidth={2} />
            <line x1={5} y1={2} x2={5} y2={12} stroke="#7a1f5c" strokeWidth={2} />
            <line x1={5 + barPx} y1={2} x2={5 + barPx} y2={12} stroke="#7a1f5c" strokeWidth={2} />
          </svg>
          <div className="small">{formatLength(barM)} of movement</div>
        </div>
      ) : null}
      <p className="muted small no-print">Drag to pan, wheel or + / − to zoom, arrows to move, 0 to reset. Hover for values with σ; click to open.</p>
    </aside>
  );
}
