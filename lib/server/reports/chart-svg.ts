/**
 * Static SVG line chart of one element quantity over a report period, for print: the cumulative
 * value in µε, its ±k·σ band, and the trigger levels as dashed lines with their names. Pure (luxon
 * for the site-time ticks only): data in, an SVG string out.
 *
 * A level far outside the data (more than LEVEL_REACH times the largest |value|) would flatten the
 * curve; it is not drawn but written in a note under the chart ("review +500 µε above the chart").
 */
import { DateTime } from "luxon";
import { escapeXml } from "../../plan/static-svg.ts";
import { niceCeil } from "../../plan/nice.ts";

export interface ChartLevel {
  name: string;
  /** Threshold in the value's own sign (dimensionless): +review for greenMax, −review for greenMin's sense. */
  value: number;
}

export interface ChartInput {
  tMs: readonly number[];
  value: readonly number[];
  sigma: readonly (number | null)[];
  k: number;
  fromMs: number;
  toMs: number;
  timeZone: string;
  levels: readonly ChartLevel[];
  widthPx: number;
  heightPx: number;
  title: string;
}

export const LEVEL_REACH = 3;
const LEVEL_DASH: Record<string, string> = { review: "6 3", alert: "3 2", limit: "1.5 2" };
const LEVEL_COLOUR: Record<string, string> = { review: "#b07800", alert: "#d55e00", limit: "#7a1f5c" };

const f1 = (v: number): string => (Math.round(v * 10) / 10).toString();
function ue(v: number): string {
  const a = Math.abs(v * 1e6);
  const t = a < 10 ? (v * 1e6).toFixed(1) : Math.round(v * 1e6).toString();
  return t.startsWith("-") ? "−" + t.slice(1) : t;
}

/** Tick spacing (ms) and label format for a span. */
function timeTicks(spanMs: number): { stepMs: number; unit: "hour" | "day" | "week" | "month"; format: string } {
  const day = 86_400_000;
  if (spanMs <= 2 * day) return { stepMs: 6 * 3_600_000, unit: "hour", format: "dd LLL HH:mm" };
  if (spanMs <= 12 * day) return { stepMs: day, unit: "day", format: "dd LLL" };
  if (spanMs <= 70 * day) return { stepMs: 7 * day, unit: "week", format: "dd LLL" };
  return { stepMs: 30 * day, unit: "month", format: "LLL yyyy" };
}

export function renderLineChartSvg(c: ChartInput): string {
  const W = c.widthPx;
  const H = c.heightPx;
  const left = 54;
  const right = 12;
  const top = 22;
  const bottom = 34;
  const pw = W - left - right;
  const ph = H - top - bottom;
  let lo = Infinity;
  let hi = -Infinity;
  let maxAbs = 0;
  for (let i = 0; i < c.value.length; i++) {
    const v = c.value[i];
    const s = c.sigma[i] ?? 0;
    lo = Math.min(lo, v - c.k * s);
    hi = Math.max(hi, v + c.k * s);
    maxAbs = Math.max(maxAbs, Math.abs(v));
  }
  if (!Number.isFinite(lo)) {
    lo = -1e-4;
    hi = 1e-4;
  }
  lo = Math.min(lo, 0);
  hi = Math.max(hi, 0);
  const reach = Math.max(maxAbs, hi - lo, 1e-5) * LEVEL_REACH;
  const shown = c.levels.filter((l) => Math.abs(l.value) <= reach);
  const hidden = c.levels.filter((l) => Math.abs(l.value) > reach);
  for (const l of shown) {
    lo = Math.min(lo, l.value);
    hi = Math.max(hi, l.value);
  }
  const pad = (hi - lo) * 0.08 || 1e-5;
  lo -= pad;
  hi += pad;
  const stepY = niceCeil((hi - lo) / 5);
  const y0 = Math.floor(lo / stepY) * stepY;
  const y1 = Math.ceil(hi / stepY) * stepY;
  const X = (t: number): number => left + ((t - c.fromMs) / (c.toMs - c.fromMs || 1)) * pw;
  const Y = (v: number): number => top + (1 - (v - y0) / (y1 - y0)) * ph;

  const o: string[] = [];
  o.push(`<svg xmlns="http://www.w3.org/2000/svg" class="chart" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" role="img" aria-label="${escapeXml(c.title)}" font-family="system-ui, sans-serif">`);
  o.push(`<text x="${left}" y="14" font-size="11.5" font-weight="600" fill="#1f2a33">${escapeXml(c.title)}</text>`);
  o.push(`<rect x="${left}" y="${top}" width="${pw}" height="${ph}" fill="#fff" stroke="#d9d4ca"/>`);
  // Y grid and labels (µε).
  for (let v = y0; v <= y1 + stepY * 1e-6; v += stepY) {
    const y = Y(v);
    o.push(`<line x1="${left}" y1="${f1(y)}" x2="${left + pw}" y2="${f1(y)}" stroke="${Math.abs(v) < stepY * 1e-6 ? "#8a948f" : "#eee9df"}" stroke-width="${Math.abs(v) < stepY * 1e-6 ? 1 : 0.7}"/>`);
    const tick = Math.abs(v) < stepY * 1e-6 ? 0 : v;
    o.push(`<text x="${left - 5}" y="${f1(y + 3.5)}" font-size="9.5" text-anchor="end" fill="#52606b">${stepY >= 1e-5 ? Math.round(tick * 1e6).toString().replace("-", "−") : ue(tick)}</text>`);
  }
  o.push(`<text x="12" y="${f1(top + ph / 2)}" font-size="9.5" fill="#52606b" transform="rotate(-90 12 ${f1(top + ph / 2)})" text-anchor="middle">µε</text>`);
  // X ticks in the site's zone.
  const tk = timeTicks(c.toMs - c.fromMs);
  let t = DateTime.fromMillis(c.fromMs, { zone: c.timeZone }).startOf(tk.unit === "hour" ? "day" : tk.unit === "week" ? "day" : tk.unit);
  let guard = 0;
  while (t.toMillis() <= c.toMs && guard++ < 400) {
    const ms = t.toMillis();
    if (ms >= c.fromMs) {
      const x = X(ms);
      o.push(`<line x1="${f1(x)}" y1="${top + ph}" x2="${f1(x)}" y2="${top + ph + 4}" stroke="#52606b"/><line x1="${f1(x)}" y1="${top}" x2="${f1(x)}" y2="${top + ph}" stroke="#f1ede5"/>`);
      o.push(`<text x="${f1(x)}" y="${top + ph + 15}" font-size="9.5" text-anchor="middle" fill="#52606b">${escapeXml(t.toFormat(tk.format))}</text>`);
    }
    t = tk.unit === "hour" ? t.plus({ hours: 6 }) : tk.unit === "day" ? t.plus({ days: 1 }) : tk.unit === "week" ? t.plus({ days: 7 }) : t.plus({ months: 1 });
  }
  // σ band.
  const n = c.tMs.length;
  const withSigma = [...Array(n).keys()].filter((i) => c.sigma[i] !== null);
  if (withSigma.length > 1) {
    const upper = withSigma.map((i) => `${f1(X(c.tMs[i]))},${f1(Y(c.value[i] + c.k * (c.sigma[i] as number)))}`);
    const lower = withSigma.reverse().map((i) => `${f1(X(c.tMs[i]))},${f1(Y(c.value[i] - c.k * (c.sigma[i] as number)))}`);
    o.push(`<polygon points="${[...upper, ...lower].join(" ")}" fill="#0f6e73" fill-opacity="0.13" stroke="none"/>`);
  }
  // Levels.
  for (const l of shown) {
    const y = Y(l.value);
    // Review labels on the left, the others on the right, so that close levels do not overprint.
    const atLeft = l.name === "review";
    o.push(`<line x1="${left}" y1="${f1(y)}" x2="${left + pw}" y2="${f1(y)}" stroke="${LEVEL_COLOUR[l.name] ?? "#52606b"}" stroke-width="1.3" stroke-dasharray="${LEVEL_DASH[l.name] ?? "4 2"}"/>`);
    o.push(`<text x="${atLeft ? left + 4 : left + pw - 3}" y="${f1(y - 3)}" font-size="9" text-anchor="${atLeft ? "start" : "end"}" fill="${LEVEL_COLOUR[l.name] ?? "#52606b"}" stroke="#fff" stroke-width="2.5" paint-order="stroke">${escapeXml(l.name)} ${ue(l.value)} µε</text>`);
  }
  // The series.
  if (n === 1) o.push(`<circle cx="${f1(X(c.tMs[0]))}" cy="${f1(Y(c.value[0]))}" r="2.5" fill="#0f6e73"/>`);
  else if (n > 1) o.push(`<polyline points="${c.tMs.map((tm, i) => `${f1(X(tm))},${f1(Y(c.value[i]))}`).join(" ")}" fill="none" stroke="#0f6e73" stroke-width="1.6" stroke-linejoin="round"/>`);
  else o.push(`<text x="${f1(left + pw / 2)}" y="${f1(top + ph / 2)}" font-size="11" text-anchor="middle" fill="#52606b">no values in the period</text>`);
  const note = [`band ±${c.k.toFixed(2)} σ`, ...hidden.map((l) => `${l.name} ${ue(l.value)} µε ${l.value > 0 ? "above" : "below"} the chart`)].join(" · ");
  o.push(`<text x="${left}" y="${H - 4}" font-size="9" fill="#52606b">${escapeXml(note)}</text>`);
  o.push(`</svg>`);
  return o.join("");
}
