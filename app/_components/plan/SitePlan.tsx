"use client";
/**
 * The site plan: elements coloured by a chosen quantity, principal-axis glyphs, displacement vectors,
 * pan and zoom (wheel, drag, keyboard), hover read-out with σ, click to open an element, and the epoch
 * scrubber (step, play, compare two epochs). Receives plain data; fetches the field of other epochs
 * from GET /api/v1/sites/{slug}/field.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import {
  convexHull,
  formatSiteTime,
  glyphScale,
  niceCeilFine,
  niceFloor,
  polygonCentroid,
  quantityValue,
  QUANTITY_INFO,
  PLAN_QUANTITIES,
  zoomView,
  decodePlanData,
  unpackField,
  type PackedField,
  type PlanQuantity,
  type StrainField,
  type StrainUnit,
} from "@/lib/plan/index.ts";
import { PlanLegend } from "./PlanLegend.tsx";
import { EpochScrubber } from "./EpochScrubber.tsx";
import { PlanTooltip } from "./PlanTooltip.tsx";
import { ElementsLayer, GlyphLayer, NorthArrow, PointsLayer, VectorLayer } from "./planLayers.tsx";
import { defaultExaggeration, EXAGGERATIONS, median, MIN_GLYPH_ELEMENT_PX, PLAY_STEP_MS, robustMax } from "./planScale.ts";
import type { PlanPointProp, Shape } from "./planTypes.ts";
import { usePlanView } from "./usePlanView.ts";

export type { PlanElementProp, PlanPointProp } from "./planTypes.ts";

export interface SitePlanProps {
  slug: string;
  timeZone: string;
  /**
   * Points, elements, epochs and the first field as one string (encodePlanData, lib/plan/wire.ts).
   * Points' east/north are relative to a local origin (the page subtracts it; see page.tsx).
   */
  data: string;
  /** Preformatted times (key: UTC ms) for the first render, so the browser needs no time-zone data until the user scrubs. */
  timeLabels?: Record<string, string>;
  referenceEpochId: number | null;
  initialQuantity?: PlanQuantity;
  initialUnit?: StrainUnit;
}

export function SitePlan(props: SitePlanProps) {
  const { slug, timeZone, referenceEpochId, timeLabels } = props;
  const data = useMemo(() => decodePlanData(props.data), [props.data]);
  const { points, elements, epochIds, epochTimesMs } = data;
  const fmtTime = useCallback((ms: number) => timeLabels?.[String(ms)] ?? formatSiteTime(ms, timeZone), [timeLabels, timeZone]);
  const [quantity, setQuantity] = useState<PlanQuantity>(props.initialQuantity ?? "greenMax");
  const [unit, setUnit] = useState<StrainUnit>(props.initialUnit ?? "ue");
  const [showGlyphs, setShowGlyphs] = useState(true);
  const [showVectors, setShowVectors] = useState(true);
  const [showLabels, setShowLabels] = useState(false);
  const [exaggeration, setExaggeration] = useState<number | null>(null);
  const [lockScale, setLockScale] = useState(false);
  const [lockedMax, setLockedMax] = useState<number | null>(null);

  const initialField = data.field;
  const lastIndex = epochIds.length - 1;
  const initialIndex = initialField ? Math.max(0, epochIds.indexOf(initialField.epoch.id)) : lastIndex;
  const [index, setIndex] = useState(initialIndex);
  const [compare, setCompare] = useState<"cumulative" | "increment">("cumulative");
  const [fromIndex, setFromIndex] = useState(Math.max(0, lastIndex - 1));
  const [playing, setPlaying] = useState(false);
  const [field, setField] = useState<StrainField | null>(initialField);
  const [loading, setLoading] = useState(false);
  const [loadError, setLoadError] = useState<string | null>(null);
  const cache = useRef(new Map<string, StrainField>());
  const [hover, setHover] = useState<{ id: number; x: number; y: number } | null>(null);

  const pointByCode = useMemo(() => new Map(points.map((p) => [p.code, p])), [points]);
  // Fit the view to the points that make up elements: far stable references would shrink the zone that moves.
  const fitPoints = useMemo(() => {
    const used = new Set(elements.flatMap((e) => e.pointCodes));
    const inElements = points.filter((p) => used.has(p.code));
    return inElements.length >= 2 ? inElements : points;
  }, [points, elements]);
  const { svgRef, size, mounted, home, view, setView, setUserView, upp, uppQ, onPointerDown, onPointerMove, onPointerUp, onKeyDown } = usePlanView({ slug, fitPoints, hover, setHover });
  if (initialField && cache.current.size === 0) {
    const f = initialField;
    cache.current.set(`${f.epoch.id}:${f.mode === "cumulative" ? "" : f.from.id}`, f);
  }

  // Fetch the field of the chosen epoch (and comparison epoch) as the user scrubs.
  const epochId = epochIds[index];
  const fromId = compare === "increment" ? epochIds[fromIndex] : null;
  useEffect(() => {
    if (epochId === undefined) return;
    const key = `${epochId}:${fromId ?? ""}`;
    const hit = cache.current.get(key);
    if (hit) {
      setField(hit);
      setLoading(false);
      return;
    }
    const ctl = new AbortController();
    setLoading(true);
    const q = new URLSearchParams({ epoch: String(epochId) });
    if (fromId !== null && fromId !== epochId) q.set("from", String(fromId));
    fetch(`/api/v1/sites/${encodeURIComponent(slug)}/field?${q}`, { signal: ctl.signal, credentials: "same-origin" })
      .then(async (r) => {
        if (!r.ok) throw new Error(((await r.json().catch(() => null)) as { error?: { message?: string } } | null)?.error?.message ?? `HTTP ${r.status}`);
        return unpackField((await r.json()) as PackedField);
      })
      .then((f) => {
        if (cache.current.size > 200) cache.current.clear();
        cache.current.set(key, f);
        setField(f);
        setLoadError(null);
        setLoading(false);
      })
      .catch((e: unknown) => {
        if ((e as { name?: string }).name === "AbortError") return;
        setLoadError(e instanceof Error ? e.message : String(e));
        setLoading(false);
      });
    return () => ctl.abort();
  }, [epochId, fromId, slug]);

  // Play: advance one epoch after each one is drawn.
  useEffect(() => {
    if (!playing || loading) return;
    if (index >= lastIndex) {
      setPlaying(false);
      return;
    }
    const t = setTimeout(() => setIndex((i) => Math.min(lastIndex, i + 1)), PLAY_STEP_MS);
    return () => clearTimeout(t);
  }, [playing, loading, index, lastIndex]);

  const shapes = useMemo<Shape[]>(() => {
    const out: Shape[] = [];
    for (const el of elements) {
      const pts = el.pointCodes.map((c) => pointByCode.get(c)).filter((p): p is PlanPointProp => !!p).map((p) => ({ x: p.east, y: -p.north }));
      if (pts.length < 2) continue;
      if (el.kind === "baseline" || pts.length === 2) {
        const len = Math.hypot(pts[1].x - pts[0].x, pts[1].y - pts[0].y);
        out.push({ el, kind: "line", pts: pts.slice(0, 2), c: { x: (pts[0].x + pts[1].x) / 2, y: (pts[0].y + pts[1].y) / 2 }, sizeM: len / 3 });
      } else {
        const poly = el.kind === "group" ? convexHull(pts) : pts;
        let area = 0;
        for (let i = 0; i < poly.length; i++) {
          const p = poly[i];
          const q = poly[(i + 1) % poly.length];
          area += p.x * q.y - q.x * p.y;
        }
        out.push({ el, kind: "polygon", pts: poly, c: polygonCentroid(poly), sizeM: Math.sqrt(Math.abs(area) / 2) });
      }
    }
    return out;
  }, [elements, pointByCode]);

  const valueById = useMemo(() => new Map((field?.elements ?? []).map((e) => [e.id, e])), [field]);
  const k = field?.k ?? 1.96;
  const info = QUANTITY_INFO[quantity];

  const autoMax = useMemo(() => {
    const vals: number[] = [];
    for (const s of shapes) {
      const fe = valueById.get(s.el.id);
      if (!fe) continue;
      const v = quantityValue(fe, s.el.kind, quantity, k).value;
      if (v !== null) vals.push(v);
    }
    const m = robustMax(vals);
    return m > 0 ? niceCeilFine(m) : info.kind === "angle" ? 1 : 100e-6;
  }, [shapes, valueById, quantity, k, info.kind]);
  const domainMax = lockScale && lockedMax ? lockedMax : autoMax;
  useEffect(() => {
    if (!lockScale) setLockedMax(null);
    else setLockedMax((m) => m ?? autoMax);
  }, [lockScale, autoMax]);

  const principalMax = useMemo(() => {
    const vals: number[] = [];
    for (const fe of valueById.values()) {
      if (fe.greenMax !== null) vals.push(fe.greenMax);
      if (fe.greenMin !== null) vals.push(fe.greenMin);
    }
    return robustMax(vals);
  }, [valueById]);
  const typicalSizeM = useMemo(() => median(shapes.filter((s) => s.kind === "polygon").map((s) => s.sizeM)) || median(shapes.map((s) => s.sizeM)) || home.width / 20, [shapes, home.width]);
  // Glyph scale: the legend's reference strain (a nice number near the largest principal value) draws 0.8 × a typical element size.
  const glyphRefStrain = principalMax > 0 ? niceFloor(principalMax) || principalMax : 0;
  const scale = glyphScale(glyphRefStrain, typicalSizeM * 0.8);
  const exag = exaggeration ?? defaultExaggeration(initialField, typicalSizeM);


  const hovered = hover ? shapes.find((s) => s.el.id === hover.id) : undefined;
  const hoveredValues = hovered ? valueById.get(hovered.el.id) : undefined;
  const ready = mounted && !loading && field !== null;
  const epochTime = epochTimesMs[index];

  return (
    <section className="plan" aria-label="Site plan" data-ready={ready ? "true" : "false"} data-quantity={quantity} data-epoch={field?.epoch.id ?? ""}>
      <div className="plan-controls no-print" role="group" aria-label="Plan display">
        <label>
          Colour by
          <select value={quantity} onChange={(e) => setQuantity(e.target.value as PlanQuantity)} name="quantity">
            {PLAN_QUANTITIES.map((q) => (
              <option key={q} value={q}>
                {QUANTITY_INFO[q].label}
              </option>
            ))}
          </select>
        </label>
        <label>
          Unit
          <select value={unit} onChange={(e) => setUnit(e.target.value as StrainUnit)} name="unit">
            <option value="ue">µε (microstrain)</option>
            <option value="pct">% (percent)</option>
          </select>
        </label>
        <label>
          Vector exaggeration
          <select value={exag} onChange={(e) => setExaggeration(Number(e.target.value))} name="exaggeration">
            {EXAGGERATIONS.map((x) => (
              <option key={x} value={x}>
                ×{x}
              </option>
            ))}
          </select>
        </label>
        <div className="checks">
          <label className="check">
            <input type="checkbox" checked={showGlyphs} onChange={(e) => setShowGlyphs(e.target.checked)} /> Principal axes
          </label>
          <label className="check">
            <input type="checkbox" checked={showVectors} onChange={(e) => setShowVectors(e.target.checked)} /> Displacements
          </label>
          <label className="check">
            <input type="checkbox" checked={showLabels} onChange={(e) => setShowLabels(e.target.checked)} /> Point codes
          </label>
          <label className="check">
            <input type="checkbox" checked={lockScale} onChange={(e) => setLockScale(e.target.checked)} /> Hold colour scale
          </label>
        </div>
        <div className="zoom-buttons" role="group" aria-label="Zoom">
          <button type="button" className="secondary small" onClick={() => setView(zoomView(view, 1.25, view.x + view.width / 2, view.y + view.height / 2, home))} aria-label="Zoom in">
            +
          </button>
          <button type="button" className="secondary small" onClick={() => setView(zoomView(view, 0.8, view.x + view.width / 2, view.y + view.height / 2, home))} aria-label="Zoom out">
            −
          </button>
          <button type="button" className="secondary small" onClick={() => setUserView(null)}>
            Reset view
          </button>
        </div>
      </div>

      <p className="print-only">
        {info.label}, {field?.mode === "increment" ? `increment from ${fmtTime(field.from.timeMs)}` : "cumulative since the reference epoch"}, at{" "}
        {field ? fmtTime(field.epoch.timeMs) : "–"} ({timeZone}).
      </p>
      {epochIds.length > 0 ? (
        <EpochScrubber
          fmtTime={fmtTime}
          epochTimesMs={epochTimesMs}
          index={index}
          onIndex={(i) => {
            setPlaying(false);
            setIndex(i);
          }}
          playing={playing}
          onPlay={(p) => {
            if (p && index >= lastIndex) setIndex(0);
            setPlaying(p);
          }}
          compare={compare}
          onCompare={setCompare}
          fromIndex={fromIndex}
          onFromIndex={setFromIndex}
          referenceEpochId={referenceEpochId}
          epochIds={epochIds}
          loading={loading}
        />
      ) : null}

      <div className="plan-body">
        <div className="plan-canvas">
          <svg
            ref={svgRef}
            width={size.w}
            height={size.h}
            viewBox={`${view.x} ${view.y} ${view.width} ${view.height}`}
            preserveAspectRatio="xMidYMid meet"
            role="img"
            aria-label={`Plan of ${points.length} points and ${shapes.length} elements, coloured by ${info.label}${epochTime !== undefined ? ` at ${fmtTime(epochTime)}` : ""}. Use + and − to zoom, arrow keys to pan, 0 to reset.`}
            tabIndex={0}
            onPointerDown={onPointerDown}
            onPointerMove={onPointerMove}
            onPointerUp={onPointerUp}
            onPointerLeave={() => setHover(null)}
            onKeyDown={onKeyDown}
            className="plan-svg"
          >
            <defs>
              {/* Two lines per 14 px tile: the same 7 px hatching at half the tiles (pattern painting dominates the plan's paint time). */}
              <pattern id="hatch-contraction" patternUnits="userSpaceOnUse" width={14 * uppQ} height={14 * uppQ} patternTransform="rotate(45)">
                <path d={`M${1 * uppQ} 0V${14 * uppQ}M${8 * uppQ} 0V${14 * uppQ}`} stroke="#0d2b48" strokeOpacity={0.55} strokeWidth={1.6 * uppQ} shapeRendering="crispEdges" />
              </pattern>
            </defs>
            <NorthArrow view={view} upp={upp} />
            {mounted ? (
              <>
            <ElementsLayer shapes={shapes} valueById={valueById} quantity={quantity} k={k} domainMax={domainMax} upp={uppQ} showMarkers={!showGlyphs} />
            {showGlyphs ? <GlyphLayer shapes={shapes} valueById={valueById} scale={scale} upp={uppQ} /> : null}
            <PointsLayer points={points} upp={uppQ} showLabels={showLabels} />
            {showVectors && field ? <VectorLayer field={field} pointByCode={pointByCode} exaggeration={exag} upp={uppQ} /> : null}
              </>
            ) : null}
          </svg>
          {hovered && hoveredValues ? (
            <PlanTooltip x={hover!.x} y={hover!.y} w={size.w} shape={hovered} fe={hoveredValues} quantity={quantity} unit={unit} k={k} />
          ) : null}
          {loading ? <div className="plan-status" role="status">Loading epoch…</div> : null}
          {loadError ? <div className="plan-status error" role="alert">Could not load this epoch: {loadError}</div> : null}
        </div>
        <PlanLegend
          quantity={quantity}
          unit={unit}
          domainMax={domainMax}
          glyphRefStrain={glyphRefStrain}
          glyphRefPx={scale > 0 ? (glyphRefStrain * scale) / upp : 0}
          exaggeration={exag}
          upp={upp}
          showGlyphs={showGlyphs}
          glyphsThinned={showGlyphs && shapes.some((s) => s.kind === "polygon" && s.sizeM / uppQ < MIN_GLYPH_ELEMENT_PX)}
          showVectors={showVectors}
          hasBaselines={shapes.some((s) => s.el.kind === "baseline")}
          mode={field?.mode ?? "cumulative"}
          k={k}
        />
      </div>
    </section>
  );
}
