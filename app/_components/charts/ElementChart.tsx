"use client";
/**
 * Time chart of one element quantity: the value with a ±k·σ band, trigger levels as horizontal lines,
 * the least-squares trend over its window and its projection (dashed), on a luxon time axis in the
 * site's time zone. Receives plain series; fetches other quantities and modes from the elements API.
 */
import { useEffect, useMemo, useState } from "react";
import { Chart as ChartJS, LineElement, PointElement, LinearScale, TimeScale, Filler, Tooltip, Legend, type ChartDataset, type ChartOptions } from "chart.js";
import "chartjs-adapter-luxon";
import { Line } from "react-chartjs-2";
import { formatStrain, formatSiteTime, strainFactor, STRAIN_UNIT_LABEL, type StrainUnit } from "@/lib/plan/index.ts";

ChartJS.register(LineElement, PointElement, LinearScale, TimeScale, Filler, Tooltip, Legend);

export interface ChartPoint {
  tMs: number;
  value: number;
  sigma: number | null;
}
export interface ChartRule {
  name: string;
  quantity: string;
  reviewLevel: number;
  alertLevel: number;
  limitLevel: number;
}
export interface ChartTrend {
  status: string;
  originMs?: number;
  slopePerDay?: number;
  intercept?: number;
  sigmaSlopePerDay?: number;
  rSquared?: number;
  firstMs?: number;
  lastMs?: number;
  message?: string;
  caution?: string;
  crossings?: { level: number; status: string; time?: string | null; daysFromLast?: number }[];
  inverseVelocity?: { applicable: boolean; failureTime: string | null; rSquared: number | null; poorFit: boolean; message: string; caution: string } | null;
}

export type SeriesMode = "cumulative" | "incremental" | "rate";

const QUANTITY_LABEL: Record<string, string> = {
  greenMax: "Major principal strain (Green)",
  greenMin: "Minor principal strain (Green)",
  maxShear: "Maximum shear strain",
  arealStrain: "Areal strain ΔA/A",
  rotationDeg: "Rotation (°)",
  engineering: "Axial strain (l − L)/L",
};

const LEVEL_COLOUR = { review: "#e69f00", alert: "#d55e00", limit: "#7a1f5c" } as const;
const LEVEL_DASH = { review: [2, 3], alert: [8, 4], limit: [] as number[] } as const;
const MS_PER_DAY = 86_400_000;

function sense(quantity: string): "value" | "negated" | "magnitude" {
  const base = quantity.replace(/\.ratePerDay$/, "");
  return base === "greenMin" ? "negated" : base === "arealStrain" || base === "engineering" ? "magnitude" : "value";
}

export function ElementChart(p: {
  slug: string;
  elementId: number;
  quantities: string[];
  initialQuantity: string;
  initialPoints: ChartPoint[];
  initialTrend: ChartTrend | null;
  rules: ChartRule[];
  timeZone: string;
  k: number;
}) {
  const [quantity, setQuantity] = useState(p.initialQuantity);
  const [mode, setMode] = useState<SeriesMode>("cumulative");
  const [unit, setUnit] = useState<StrainUnit>("ue");
  const [showBand, setShowBand] = useState(true);
  const [showTrend, setShowTrend] = useState(true);
  const [points, setPoints] = useState<ChartPoint[]>(p.initialPoints);
  const [trend, setTrend] = useState<ChartTrend | null>(p.initialTrend);
  const [loading, setLoading] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [key, setKey] = useState(`${p.initialQuantity}:cumulative`);

  useEffect(() => {
    const want = `${quantity}:${mode}`;
    if (want === key) return;
    const ctl = new AbortController();
    setLoading(true);
    const base = `/api/v1/sites/${encodeURIComponent(p.slug)}/elements/${p.elementId}`;
    Promise.all([
      fetch(`${base}/series?quantity=${quantity}&mode=${mode}&maxPoints=1500`, { signal: ctl.signal }).then(async (r) => {
        if (!r.ok) throw new Error(((await r.json().catch(() => null)) as { error?: { message?: string } } | null)?.error?.message ?? `HTTP ${r.status}`);
        return (await r.json()) as { points: { t: string; value: number; sigma: number | null }[] };
      }),
      mode === "cumulative"
        ? fetch(`${base}/trend?quantity=${quantity}`, { signal: ctl.signal }).then((r) => (r.ok ? (r.json() as Promise<{ trend: ChartTrend; crossings: ChartTrend["crossings"]; inverseVelocity: ChartTrend["inverseVelocity"] }>) : null))
        : Promise.resolve(null),
    ])
      .then(([s, t]) => {
        setPoints(s.points.map((q) => ({ tMs: Date.parse(q.t), value: q.value, sigma: q.sigma })));
        setTrend(t ? { ...t.trend, crossings: t.crossings, inverseVelocity: t.inverseVelocity } : null);
        setKey(want);
        setError(null);
        setLoading(false);
      })
      .catch((e: unknown) => {
        if ((e as { name?: string }).name === "AbortError") return;
        setError(e instanceof Error ? e.message : String(e));
        setLoading(false);
      });
    return () => ctl.abort();
  }, [quantity, mode, key, p.slug, p.elementId]);

  const isAngle = quantity === "rotationDeg";
  const factor = isAngle ? 1 : strainFactor(unit);
  const unitLabel = (isAngle ? "°" : STRAIN_UNIT_LABEL[unit]) + (mode === "rate" ? "/day" : "");

  const { datasets, xMin, xMax } = useMemo(() => {
    const ds: ChartDataset<"line", { x: number; y: number }[]>[] = [];
    const xs = points.map((q) => q.tMs);
    let xMin = xs.length ? xs[0] : Date.now() - MS_PER_DAY;
    let xMax = xs.length ? xs[xs.length - 1] : Date.now();
    const hasSigma = points.some((q) => q.sigma !== null);
    if (showBand && hasSigma) {
      ds.push({
        label: `+${p.k.toFixed(2)}σ`,
        data: points.map((q) => ({ x: q.tMs, y: (q.value + p.k * (q.sigma ?? 0)) * factor })),
        borderWidth: 0,
        pointRadius: 0,
        backgroundColor: "rgba(15,110,115,0.15)",
        fill: false,
      });
      ds.push({
        label: `±${p.k.toFixed(2)}σ band`,
        data: points.map((q) => ({ x: q.tMs, y: (q.value - p.k * (q.sigma ?? 0)) * factor })),
        borderWidth: 0,
        pointRadius: 0,
        backgroundColor: "rgba(15,110,115,0.15)",
        fill: "-1",
      });
    }
    ds.push({
      label: `${QUANTITY_LABEL[quantity] ?? quantity}${mode === "cumulative" ? "" : mode === "incremental" ? " (increment)" : " (rate)"}`,
      data: points.map((q) => ({ x: q.tMs, y: q.value * factor })),
      borderColor: "#0f6e73",
      backgroundColor: "#0f6e73",
      borderWidth: 1.8,
      pointRadius: points.length > 200 ? 0 : 2,
      fill: false,
    });
    if (showTrend && mode === "cumulative" && trend && trend.status === "ok" && trend.originMs !== undefined && trend.slopePerDay !== undefined && trend.intercept !== undefined) {
      const at = (ms: number) => (trend.intercept! + trend.slopePerDay! * ((ms - trend.originMs!) / MS_PER_DAY)) * factor;
      ds.push({ label: "Trend (least squares)", data: [{ x: trend.firstMs!, y: at(trend.firstMs!) }, { x: trend.lastMs!, y: at(trend.lastMs!) }], borderColor: "#1f2a33", borderWidth: 2, pointRadius: 0, fill: false });
      // Projection: an eighth of the data span beyond the last point, or to the first projected crossing within a year.
      const projected = (trend.crossings ?? []).filter((c) => c.status === "projected" && c.time).map((c) => Date.parse(c.time as string));
      const span = Math.max(MS_PER_DAY, xMax - xMin);
      let end = trend.lastMs! + span * 0.12;
      const first = projected.length ? Math.min(...projected) : null;
      // Reach out to a projected crossing only when it is near: the data keep most of the axis.
      if (first !== null && first > trend.lastMs!) end = Math.max(end, Math.min(first, trend.lastMs! + span * 0.35));
      ds.push({ label: "Projection (indication only)", data: [{ x: trend.lastMs!, y: at(trend.lastMs!) }, { x: end, y: at(end) }], borderColor: "#1f2a33", borderDash: [6, 5], borderWidth: 1.5, pointRadius: 0, fill: false });
      xMax = Math.max(xMax, end);
    }
    // Trigger levels of the rules watching this quantity (rate rules in rate mode), in the chart's sign convention.
    const wanted = mode === "rate" ? `${quantity}.ratePerDay` : quantity;
    if (mode !== "incremental") {
      for (const r of p.rules.filter((r) => r.quantity === wanted)) {
        const s = sense(r.quantity);
        for (const lvl of ["review", "alert", "limit"] as const) {
          const v = lvl === "review" ? r.reviewLevel : lvl === "alert" ? r.alertLevel : r.limitLevel;
          const ys = s === "negated" ? [-v] : s === "magnitude" ? [v, -v] : [v];
          for (const y of ys)
            ds.push({
              label: `${lvl} (${r.name})`,
              data: [{ x: xMin, y: y * factor }, { x: xMax, y: y * factor }],
              borderColor: LEVEL_COLOUR[lvl],
              borderDash: [...LEVEL_DASH[lvl]],
              borderWidth: lvl === "limit" ? 2.5 : 1.8,
              pointRadius: 0,
              fill: false,
            });
        }
      }
    }
    return { datasets: ds, xMin, xMax };
  }, [points, showBand, showTrend, trend, p.rules, p.k, quantity, mode, factor]);

  const options: ChartOptions<"line"> = {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    parsing: false,
    interaction: { mode: "nearest", intersect: false, axis: "x" },
    scales: {
      x: {
        type: "time",
        min: xMin,
        max: xMax,
        adapters: { date: { zone: p.timeZone } },
        time: { tooltipFormat: "yyyy-LL-dd HH:mm ZZ", displayFormats: { hour: "dd LLL HH:mm", day: "dd LLL", week: "dd LLL", month: "LLL yyyy" } },
        title: { display: true, text: `Time (${p.timeZone})` },
      },
      y: { title: { display: true, text: unitLabel } },
    },
    plugins: {
      legend: {
        position: "bottom",
        // One entry per label: the ± lines of a magnitude level share theirs; the upper σ edge has none of its own.
        labels: { boxWidth: 18, filter: (item, data) => !item.text.startsWith("+") && data.datasets.findIndex((d) => d.label === item.text) === item.datasetIndex },
      },
      tooltip: {
        callbacks: {
          label: (ctx) => {
            const y = ctx.parsed.y ?? 0;
            const main = ctx.dataset.label ?? "";
            if (ctx.dataset.borderColor === "#0f6e73") {
              const q = points[ctx.dataIndex];
              const sig = q?.sigma;
              const txt = isAngle ? `${y.toFixed(4)}°` : formatStrain(y / factor, unit, { signed: true });
              return `${main}: ${txt}${sig !== null && sig !== undefined && !isAngle ? ` ± ${formatStrain(sig, unit, { withUnit: false })} (1σ)` : ""}`;
            }
            return `${main}: ${y.toPrecision(4)} ${unitLabel}`;
          },
        },
      },
    },
  };

  return (
    <div className="chart" data-testid="element-chart" data-points={points.length} data-quantity={quantity}>
      <div className="chart-controls no-print">
        <label>
          Quantity{" "}
          <select value={quantity} onChange={(e) => setQuantity(e.target.value)} name="chart-quantity">
            {p.quantities.map((q) => (
              <option key={q} value={q}>
                {QUANTITY_LABEL[q] ?? q}
              </option>
            ))}
          </select>
        </label>
        <label>
          Series{" "}
          <select value={mode} onChange={(e) => setMode(e.target.value as SeriesMode)} name="chart-mode">
            <option value="cumulative">Cumulative (against the reference)</option>
            <option value="incremental">Increment between epochs</option>
            <option value="rate">Rate per day</option>
          </select>
        </label>
        {!isAngle ? (
          <label>
            Unit{" "}
            <select value={unit} onChange={(e) => setUnit(e.target.value as StrainUnit)} name="chart-unit">
              <option value="ue">µε</option>
              <option value="pct">%</option>
            </select>
          </label>
        ) : null}
        <label className="check">
          <input type="checkbox" checked={showBand} onChange={(e) => setShowBand(e.target.checked)} /> ±{p.k.toFixed(2)}σ band
        </label>
        <label className="check">
          <input type="checkbox" checked={showTrend} onChange={(e) => setShowTrend(e.target.checked)} /> Trend and projection
        </label>
        {loading ? <span className="muted small" role="status">Loading…</span> : null}
        {error ? <span className="error small" role="alert">{error}</span> : null}
      </div>
      <div className="chart-box">
        {points.length === 0 ? <p className="muted">No computed values yet.</p> : <Line data={{ datasets }} options={options} aria-label={`Chart of ${QUANTITY_LABEL[quantity] ?? quantity}`} role="img" />}
      </div>
      {mode === "cumulative" && trend ? <TrendNote trend={trend} factor={factor} unit={unit} isAngle={isAngle} timeZone={p.timeZone} /> : null}
    </div>
  );
}

function TrendNote({ trend, factor, unit, isAngle, timeZone }: { trend: ChartTrend; factor: number; unit: StrainUnit; isAngle: boolean; timeZone: string }) {
  if (trend.status !== "ok") return <p className="muted small">Trend: {trend.message ?? "not enough data"}.</p>;
  const slope = (trend.slopePerDay ?? 0) * factor;
  const sSlope = (trend.sigmaSlopePerDay ?? 0) * factor;
  const u = isAngle ? "°" : STRAIN_UNIT_LABEL[unit];
  const iv = trend.inverseVelocity;
  return (
    <div className="small trend-note">
      <p>
        Trend over the last window: {slope >= 0 ? "+" : "−"}
        {Math.abs(slope).toPrecision(3)} ± {sSlope.toPrecision(2)} {u}/day (R² = {(trend.rSquared ?? 0).toFixed(2)}).
        {(trend.crossings ?? [])
          .filter((c) => c.status === "projected" && c.time)
          .map((c) => ` Would reach ${isAngle ? c.level : formatStrain(c.level, unit)} about ${formatSiteTime(Date.parse(c.time as string), timeZone)}.`)
          .join("")}
      </p>
      {iv ? (
        <p>
          Inverse velocity: {iv.applicable && iv.failureTime ? `accelerating; forecast ${formatSiteTime(Date.parse(iv.failureTime), timeZone)}${iv.poorFit ? " (poor fit)" : ""}.` : iv.message}
        </p>
      ) : null}
      <p className="muted">{trend.caution}</p>
    </div>
  );
}
