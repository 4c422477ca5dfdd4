"use client";
/**
 * The site plan: elements coloured by a chosen quantity, principal-axis glyphs, displacement vectors,
 * pan and zoom (wheel, drag, keyboard), hover read-out with σ, click to open an element, and the epoch
 * scrubber (step, play, compare two epochs). Receives plain data; fetches the field of other epochs
 * from GET /api/v1/sites/{slug}/field.
 */
import { memo, useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState } from "react";
import { useRouter } from "next/navigation";
import {
  clientToSvg,
  colourForValue,
  convexHull,
  displacementArrow,
  fitViewBox,
  formatSiteTime,
  formatStrain,
  glyphScale,
  inkOn,
  niceCeilFine,
  niceFloor,
  panView,
  polygonCentroid,
  principalGlyph,
  quantityValue,
  QUANTITY_INFO,
  PLAN_QUANTITIES,
  unitsPerPixel,
  zoomView,
  unpackField,
  type FieldElement,
  type PackedField,
  type PlanQuantity,
  type StrainField,
  type StrainUnit,
  type ViewBox,
} from "@/lib/plan/index.ts";
import { PlanLegend } from "./PlanLegend.tsx";
import { EpochScrubber } from "./EpochScrubber.tsx";

export interface PlanPointProp {
  code: string;
  east: number;
  north: number;
  isReference: boolean;
}
export interface PlanElementProp {
  id: number;
  name: string;
  kind: string;
  mode: string;
  pointCodes: string[];
}
/** An element as the page sends it: point indices into `points`; name only when it is not the codes joined by "-". */
export interface PlanElementWire {
  id: number;
  n?: string;
  k: string;
  m: string;
  p: number[];
}
export interface SitePlanProps {
  slug: string;
  timeZone: string;
  points: PlanPointProp[];
  elements: PlanElementWire[];
  /** Preformatted times (key: UTC ms) for the first render, so the browser needs no time-zone data until the user scrubs. */
  timeLabels?: Record<string, string>;
  epochIds: number[];
  epochTimesMs: number[];
  referenceEpochId: number | null;
  /** Points' east/north are relative to a local origin (the page subtracts it; see page.tsx). */
  initialField: PackedField | null;
  initialQuantity?: PlanQuantity;
  initialUnit?: StrainUnit;
}

type Shape = {
  el: PlanElementProp;
  kind: "polygon" | "line";
  pts: { x: number; y: number }[];
  c: { x: number; y: number };
  sizeM: number;
};

const EXAGGERATIONS = [10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000] as const;
/** Glyphs are drawn only on elements at least this many screen pixels across (zoom in for the rest). */
const MIN_GLYPH_ELEMENT_PX = 22;
const PLAY_STEP_MS = 700;

/** Robust maximum: the 98th percentile of magnitudes, so one wild element does not wash the plan out. */
function robustMax(values: number[]): number {
  const a = values.filter((v) => Number.isFinite(v)).map(Math.abs).sort((x, y) => x - y);
  if (a.length === 0) return 0;
  return a[Math.min(a.length - 1, Math.floor(a.length * 0.98))] || a[a.length - 1];
}

/**
 * Default exaggeration: the largest offered value at which the 95th percentile of the plan
 * displacements draws at most 1.2 typical element sizes.
 */
function defaultExaggeration(field: StrainField | null, typicalSizeM: number): number {
  if (!field || field.points.length === 0 || !(typicalSizeM > 0)) return 1000;
  const d = field.points.map((p) => Math.hypot(p.dE, p.dN)).sort((a, b) => a - b);
  const p95 = d[Math.min(d.length - 1, Math.floor(d.length * 0.95))];
  if (!(p95 > 0)) return 1000;
  let best: number = EXAGGERATIONS[0];
  for (const x of EXAGGERATIONS) if (p95 * x <= 1.2 * typicalSizeM) best = x;
  return best;
}

function median(values: number[]): number {
  if (values.length === 0) return 0;
  const a = [...values].sort((x, y) => x - y);
  return a[Math.floor(a.length / 2)];
}

export function SitePlan(props: SitePlanProps) {
  const { slug, timeZone, points, epochIds, epochTimesMs, referenceEpochId, timeLabels } = props;
  const elements = useMemo<PlanElementProp[]>(
    () =>
      props.elements.map((e) => {
        const pointCodes = e.p.map((i) => points[i]?.code).filter((c): c is string => c !== undefined);
        return { id: e.id, name: e.n ?? pointCodes.join("-"), kind: e.k, mode: e.m, pointCodes };
      }),
    [props.elements, points],
  );
  const fmtTime = useCallback((ms: number) => timeLabels?.[String(ms)] ?? formatSiteTime(ms, timeZone), [timeLabels, timeZone]);
  const router = useRouter();
  const svgRef = useRef<SVGSVGElement | null>(null);
  const [size, setSize] = useState({ w: 960, h: 600 });
  const [quantity, setQuantity] = useState<PlanQuantity>(props.initialQuantity ?? "greenMax");
  const [unit, setUnit] = useState<StrainUnit>(props.initialUnit ?? "ue");
  const [showGlyphs, setShowGlyphs] = useState(true);
  const [showVectors, setShowVectors] = useState(true);
  const [showLabels, setShowLabels] = useState(false);
  const [exaggeration, setExaggeration] = useState<number | null>(null);
  const [lockScale, setLockScale] = useState(false);
  const [lockedMax, setLockedMax] = useState<number | null>(null);

  const initialField = useMemo(() => (props.initialField ? unpackField(props.initialField) : null), [props.initialField]);
  // The heavy SVG layers are drawn in the browser only: server HTML stays small and hydration quick.
  const [mounted, setMounted] = useState(false);
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
  const home = useMemo(() => fitViewBox(fitPoints, size.w / size.h), [fitPoints, size.w, size.h]);
  // null: the fitted view (it follows the drawing's size); a box once the user zooms or pans.
  const [userView, setUserView] = useState<ViewBox | null>(null);
  const view = userView ?? home;
  const homeRef = useRef(home);
  homeRef.current = home;
  const setView = useCallback((v: ViewBox | ((cur: ViewBox) => ViewBox)) => {
    setUserView((cur) => (typeof v === "function" ? v(cur ?? homeRef.current) : v === homeRef.current ? null : v));
  }, []);

  // Measure the drawing area before the first paint and draw the layers once, at the right size.
  useLayoutEffect(() => {
    const el = svgRef.current?.parentElement;
    if (!el) return;
    const sizeOf = (w: number) => ({ w: Math.round(w), h: Math.round(Math.max(320, Math.min(w * 0.62, 760))) });
    if (el.clientWidth > 0) setSize(sizeOf(el.clientWidth));
    setMounted(true);
    const ro = new ResizeObserver((entries) => {
      const r = entries[0].contentRect;
      if (r.width > 0) setSize((cur) => (Math.round(r.width) === cur.w ? cur : sizeOf(r.width)));
    });
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

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

  const upp = unitsPerPixel(view, size.w, size.h);
  // Quantise so that layers redraw only when the zoom changes noticeably.
  const uppQ = Math.pow(2, Math.round(Math.log2(upp) * 4) / 4);

  const onWheel = useCallback(
    (e: WheelEvent) => {
      const svg = svgRef.current;
      if (!svg) return;
      e.preventDefault();
      const rect = svg.getBoundingClientRect();
      setView((v) => {
        const a = clientToSvg(v, rect, e.clientX, e.clientY);
        return zoomView(v, Math.pow(1.0015, -e.deltaY), a.x, a.y, homeRef.current);
      });
    },
    [],
  );
  useEffect(() => {
    const svg = svgRef.current;
    if (!svg) return;
    svg.addEventListener("wheel", onWheel, { passive: false });
    return () => svg.removeEventListener("wheel", onWheel);
  }, [onWheel]);

  const drag = useRef<{ x: number; y: number; moved: boolean; view: ViewBox } | null>(null);
  const onPointerDown = (e: React.PointerEvent<SVGSVGElement>) => {
    if (e.button !== 0) return;
    drag.current = { x: e.clientX, y: e.clientY, moved: false, view };
  };
  const onPointerMove = (e: React.PointerEvent<SVGSVGElement>) => {
    const d = drag.current;
    if (d) {
      const dx = e.clientX - d.x;
      const dy = e.clientY - d.y;
      if (!d.moved && Math.hypot(dx, dy) > 4) {
        d.moved = true;
        (e.currentTarget as SVGSVGElement).setPointerCapture(e.pointerId);
        setHover(null);
      }
      if (d.moved) setView(panView(d.view, -dx * upp, -dy * upp));
      if (d.moved) return;
    }
    const target = e.target as Element;
    const idAttr = target.getAttribute?.("data-element");
    if (idAttr) {
      const rect = e.currentTarget.getBoundingClientRect();
      setHover({ id: Number(idAttr), x: e.clientX - rect.left, y: e.clientY - rect.top });
    } else if (hover) setHover(null);
  };
  const onPointerUp = (e: React.PointerEvent<SVGSVGElement>) => {
    const d = drag.current;
    drag.current = null;
    if (d && !d.moved) {
      const idAttr = (e.target as Element).getAttribute?.("data-element");
      if (idAttr) router.push(`/sites/${encodeURIComponent(slug)}/elements/${idAttr}`);
    }
  };
  const onKeyDown = (e: React.KeyboardEvent<SVGSVGElement>) => {
    const cx = view.x + view.width / 2;
    const cy = view.y + view.height / 2;
    const step = view.width / 10;
    const actions: Record<string, () => ViewBox> = {
      "+": () => zoomView(view, 1.25, cx, cy, home),
      "=": () => zoomView(view, 1.25, cx, cy, home),
      "-": () => zoomView(view, 0.8, cx, cy, home),
      _: () => zoomView(view, 0.8, cx, cy, home),
      ArrowLeft: () => panView(view, -step, 0),
      ArrowRight: () => panView(view, step, 0),
      ArrowUp: () => panView(view, 0, -step),
      ArrowDown: () => panView(view, 0, step),
      "0": () => home,
    };
    const a = actions[e.key];
    if (a) {
      e.preventDefault();
      setView(a());
    }
  };

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
            <Tooltip x={hover!.x} y={hover!.y} w={size.w} shape={hovered} fe={hoveredValues} quantity={quantity} unit={unit} k={k} />
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

function NorthArrow({ view, upp }: { view: ViewBox; upp: number }) {
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

const ElementsLayer = memo(function ElementsLayer(p: {
  shapes: Shape[];
  valueById: Map<number, FieldElement>;
  quantity: PlanQuantity;
  k: number;
  domainMax: number;
  upp: number;
  showMarkers: boolean;
}) {
  const info = QUANTITY_INFO[p.quantity];
  // One polygon (or line) per element for its colour, hover and click; the hatching of every
  // contracting element is one path, so the drawing stays light on sites with a thousand elements.
  let hatch = "";
  const markers: React.ReactNode[] = [];
  const items = p.shapes.map((s) => {
    const fe = p.valueById.get(s.el.id);
    const qv = fe ? quantityValue(fe, s.el.kind, p.quantity, p.k) : null;
    const value = qv?.value ?? null;
    const fill = colourForValue(value, p.domainMax, info.signed || qv?.axial === true);
    const faded = qv?.significant === false;
    const sense = value === null || (!info.signed && !qv?.axial) ? null : value > 0 ? "+" : value < 0 ? "−" : null;
    const common = {
      "data-element": s.el.id,
      "data-sign": sense === "+" ? "extension" : sense === "−" ? "contraction" : "none",
      "data-significant": qv?.significant === null || qv === null ? "unknown" : String(qv.significant),
      "data-fill": fill,
    };
    if (s.kind === "polygon") {
      if (sense === "−") hatch += "M" + s.pts.map((q) => `${f3(q.x)} ${f3(q.y)}`).join("L") + "Z";
      const markerSize = Math.min(14 * p.upp, s.sizeM * 0.35);
      if (p.showMarkers && sense && markerSize > 3 * p.upp)
        markers.push(
          <text key={s.el.id} x={s.c.x} y={s.c.y} fontSize={markerSize * 1.4} textAnchor="middle" dominantBaseline="central" fill={inkOn(fill)} fontWeight={700}>
            {sense}
          </text>,
        );
      return (
        <polygon
          key={s.el.id}
          points={s.pts.map((q) => `${f3(q.x)},${f3(q.y)}`).join(" ")}
          fill={fill}
          fillOpacity={faded ? 0.38 : 1}
          stroke="#4a5560"
          strokeOpacity={faded ? 0.5 : 1}
          strokeWidth={0.8}
          vectorEffect="non-scaling-stroke"
          {...common}
          className={faded ? "el faded" : "el"}
        />
      );
    }
    return (
      <g key={s.el.id} opacity={faded ? 0.45 : 1}>
        <line x1={s.pts[0].x} y1={s.pts[0].y} x2={s.pts[1].x} y2={s.pts[1].y} stroke="#1f2a33" strokeWidth={9} vectorEffect="non-scaling-stroke" strokeLinecap="round" pointerEvents="none" />
        <line
          x1={s.pts[0].x}
          y1={s.pts[0].y}
          x2={s.pts[1].x}
          y2={s.pts[1].y}
          stroke={fill}
          strokeWidth={6}
          vectorEffect="non-scaling-stroke"
          strokeLinecap="round"
          strokeDasharray={sense === "−" ? "6 4" : undefined}
          {...common}
          className="el"
        />
      </g>
    );
  });
  return (
    <g className="elements">
      {items}
      {hatch ? <path d={hatch} fill="url(#hatch-contraction)" pointerEvents="none" className="hatch" /> : null}
      {markers.length ? <g pointerEvents="none">{markers}</g> : null}
    </g>
  );
});

const GlyphLayer = memo(function GlyphLayer(p: { shapes: Shape[]; valueById: Map<number, FieldElement>; scale: number; upp: number }) {
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

const PointsLayer = memo(function PointsLayer(p: { points: PlanPointProp[]; upp: number; showLabels: boolean }) {
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

const VectorLayer = memo(function VectorLayer(p: { field: StrainField; pointByCode: Map<string, PlanPointProp>; exaggeration: number; upp: number }) {
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

function Tooltip(p: { x: number; y: number; w: number; shape: Shape; fe: FieldElement; quantity: PlanQuantity; unit: StrainUnit; k: number }) {
  const { fe, unit } = p;
  const qv = quantityValue(fe, p.shape.el.kind, p.quantity, p.k);
  const info = QUANTITY_INFO[p.quantity];
  const fmt = (v: number | null, s: number | null) => (v === null ? "–" : `${formatStrain(v, unit, { signed: true })}${s !== null ? ` ± ${formatStrain(s, unit, { withUnit: false })}` : ""}`);
  const left = p.x + 260 > p.w ? p.x - 250 : p.x + 14;
  return (
    <div className="plan-tooltip" style={{ left, top: p.y + 14 }} role="status">
      <strong>{p.shape.el.name}</strong> <span className="muted">{p.shape.el.kind}, {p.shape.el.mode}</span>
      {fe.status !== "ok" ? (
        <div className="error">Not computed: {fe.status}</div>
      ) : (
        <dl>
          <dt>{qv.axial ? "Axial strain (l − L)/L" : info.label}</dt>
          <dd>
            {info.kind === "angle" && !qv.axial ? (qv.value === null ? "–" : `${qv.value.toFixed(4)}°`) : fmt(qv.value, qv.sigma)}
            {qv.significant === null ? "" : qv.significant ? " · significant" : " · not significant"}
          </dd>
          {!qv.axial ? (
            <>
              <dt>Principal (Green)</dt>
              <dd>
                {fmt(fe.greenMax, fe.sigmaGreenMax)} / {fmt(fe.greenMin, fe.sigmaGreenMin)}
              </dd>
              <dt>Major axis azimuth</dt>
              <dd>{fe.azimuthMaxDeg === null ? "none (isotropic)" : `${fe.azimuthMaxDeg.toFixed(1)}° from grid north`}</dd>
            </>
          ) : null}
        </dl>
      )}
      <div className="muted small">Click to open the element</div>
    </div>
  );
}

