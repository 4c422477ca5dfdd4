"use client";
/** View handling of the site plan: drawing size, fitted and user view box, wheel/drag/keyboard pan and zoom, hover and click on elements. */
import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState } from "react";
import { useRouter } from "next/navigation";
import { clientToSvg, fitViewBox, panView, unitsPerPixel, zoomView, type ViewBox } from "@/lib/plan/index.ts";

export type PlanHover = { id: number; x: number; y: number } | null;

export function usePlanView({ slug, fitPoints, hover, setHover }: { slug: string; fitPoints: { east: number; north: number }[]; hover: PlanHover; setHover: (h: PlanHover) => void }) {
  const router = useRouter();
  const svgRef = useRef<SVGSVGElement | null>(null);
  const [size, setSize] = useState({ w: 960, h: 600 });
  // The heavy SVG layers are drawn in the browser only: server HTML stays small and hydration quick.
  const [mounted, setMounted] = useState(false);
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

  return { svgRef, size, mounted, home, view, setView, setUserView, upp, uppQ, onPointerDown, onPointerMove, onPointerUp, onKeyDown };
}
