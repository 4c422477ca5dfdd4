/**
 * The report as HTML: one pure function of the report data (lib/server/reports/data.ts), used by the
 * printable page (app/sites/[slug]/reports/view) and by the PDF (headless Chromium, page.setContent),
 * so both show the same thing. Output is a body fragment, its stylesheet, and a whole document.
 *
 * Print: A4, page breaks before the charts and never inside a chart, table row or alert; headers
 * and footers with page numbers come from CSS @page margin boxes (Chromium ≥ 131) in the page's own
 * print, and from Chromium's header and footer templates in the PDF (`marginBoxes: false`, so the
 * two never print twice).
 *
 * Sections carry `data-section` (title, caution, summary, plan, table, charts, alerts, coverage) and
 * the element rows `data-element-id`, `data-value`, `data-sigma`, `data-time` (raw numbers, strain
 * dimensionless) so that tests can check them against the API.
 */
import { formatSiteTime, describeZone } from "../../plan/time.ts";
import { formatStrain } from "../../plan/units.ts";
import { renderStaticPlanSvg, type StaticPlanElement } from "../../plan/static-svg.ts";
import { renderLineChartSvg, type ChartLevel } from "./chart-svg.ts";
import type { ReportData, ReportElement, ReportLevels } from "./data.ts";

export function esc(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");
}

const PAGE_MARGIN = { top: "20mm", right: "14mm", bottom: "18mm", left: "14mm" } as const;
export const REPORT_PAGE_MARGIN = PAGE_MARGIN;

export interface ReportHtmlOptions {
  /** Page headers and footers by CSS margin boxes (browser print); off for the PDF, which uses templates. */
  marginBoxes: boolean;
}

export interface ReportHtml {
  css: string;
  body: string;
  document: string;
  /** Running header text (site, period) for the PDF header template. */
  headerText: string;
  footerText: string;
}

const Q_LABEL: Record<string, string> = { greenMax: "major principal Green strain", engineering: "engineering strain" };

function cssFor(opts: ReportHtmlOptions, headerText: string, footerText: string): string {
  const boxes = opts.marginBoxes
    ? `@page {
  @top-left { content: "${headerText.replace(/["\\]/g, "")}"; font: 8pt system-ui, sans-serif; color: #52606b; }
  @bottom-left { content: "${footerText.replace(/["\\]/g, "")}"; font: 7.5pt system-ui, sans-serif; color: #52606b; }
  @bottom-right { content: "Page " counter(page) " of " counter(pages); font: 8pt system-ui, sans-serif; color: #52606b; }
}`
    : "";
  return `
.report { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: #1f2a33; font-size: 13px; line-height: 1.4; max-width: 190mm; margin: 0 auto; background: #fff; padding: 10px 14px 30px; }
.report h1 { font-size: 21px; margin: 0 0 4px; }
.report h2 { font-size: 15.5px; margin: 18px 0 6px; border-bottom: 1.5px solid #0f6e73; padding-bottom: 2px; break-after: avoid; }
.report .rpt-facts { display: grid; grid-template-columns: max-content 1fr max-content 1fr; gap: 2px 14px; margin: 8px 0; font-size: 12.5px; }
.report .rpt-facts dt { color: #52606b; }
.report .rpt-facts dd { margin: 0; font-weight: 600; }
.report .rpt-caution { border: 1.5px solid #5a4300; background: #fff4d6; color: #5a4300; padding: 6px 10px; font-size: 12px; margin: 8px 0; }
.report table { border-collapse: collapse; width: 100%; font-size: 11.5px; background: #fff; }
.report th, .report td { text-align: left; padding: 3px 6px; border-bottom: 1px solid #d9d4ca; vertical-align: top; font-variant-numeric: tabular-nums; }
.report th { color: #52606b; font-weight: 600; }
.report td.num, .report th.num { text-align: right; white-space: nowrap; }
.report table.elements td:first-child { width: 30%; }
.report tr, .report .chart-fig, .report .rpt-alert, .report figure.plan-fig { break-inside: avoid; }
.report .chart-fig { margin: 4px 0 10px; }
.report .chart-fig figcaption, .report .plan-fig figcaption { font-size: 11px; color: #52606b; }
.report figure { margin: 0; }
.report svg { max-width: 100%; height: auto; }
.report .muted { color: #52606b; }
.report .lvl { display: inline-block; border: 1.5px solid; border-radius: 9px; padding: 0 6px; font-size: 11px; white-space: nowrap; }
.report .lvl-review { border-color: #e69f00; color: #7a5200; }
.report .lvl-alert { border-color: #d55e00; color: #8f3a00; }
.report .lvl-limit { border-color: #7a1f5c; color: #7a1f5c; background: #f6e9f1; }
.report .lvl-review::before { content: "▲ "; } .report .lvl-alert::before { content: "◆ "; } .report .lvl-limit::before { content: "■ "; }
.report .rpt-alert { margin: 6px 0 10px; }
.report .rpt-alert h3 { font-size: 13px; margin: 0 0 3px; }
.report .events { margin: 2px 0 0 14px; padding: 0; font-size: 11.5px; }
.report .events li { margin: 1px 0; }
.report .comment { font-style: italic; }
.report .rpt-end { margin-top: 18px; font-size: 11px; color: #52606b; border-top: 1px solid #d9d4ca; padding-top: 4px; }
.report .break-before { break-before: page; }
@media screen { .report .break-before { border-top: 2px dashed #d9d4ca; padding-top: 10px; margin-top: 24px; } }
@page { size: A4; margin: ${PAGE_MARGIN.top} ${PAGE_MARGIN.right} ${PAGE_MARGIN.bottom} ${PAGE_MARGIN.left}; }
${boxes}
@media print {
  html, body { background: #fff !important; }
  body > .topbar, body > .caution, body > .skip, .site-head, .rpt-toolbar { display: none !important; }
  main { padding: 0 !important; max-width: none !important; }
  .report { max-width: none; padding: 0; font-size: 11.5px; }
  .report .rpt-caution { background: none; }
}
`;
}

const t = (d: ReportData, ms: number): string => formatSiteTime(ms, d.site.timeZone);
const ue = (v: number | null | undefined, signed = true): string => formatStrain(v, "ue", { signed, withUnit: false });

function levelBadge(level: string | null): string {
  return level ? `<span class="lvl lvl-${esc(level)}">${esc(level)}</span>` : `<span class="muted">below review</span>`;
}

/** Thresholds as the chart draws them, in the value's sign. */
function chartLevels(levels: readonly ReportLevels[]): ChartLevel[] {
  const first = levels[0];
  if (!first) return [];
  const out: ChartLevel[] = [];
  for (const name of ["review", "alert", "limit"] as const) {
    const v = first[name];
    if (first.sense === "negated") out.push({ name, value: -v });
    else if (first.sense === "magnitude") out.push({ name, value: v }, { name, value: -v });
    else out.push({ name, value: v });
  }
  return out;
}

const REASON_TEXT: Record<string, string> = { level: "at a level", alert: "alert in period", moved: "moved most" };

function elementRow(d: ReportData, e: ReportElement): string {
  const end = e.end;
  const sig = end?.significant === null || end === null ? "–" : end.significant ? "yes" : `<span class="muted">no</span>`;
  return `<tr data-element-id="${e.id}" data-value="${end ? end.value : ""}" data-sigma="${end?.sigma ?? ""}" data-time="${end ? new Date(end.timeMs).toISOString() : ""}">
<td><strong>${esc(e.name)}</strong><br><span class="muted">${esc(e.kind)} · ${esc(e.mode)}${e.label ? ` · ${esc(e.label)}` : ""}</span></td>
<td>${esc(e.quantity)}</td>
<td class="num">${end ? ue(end.value) : "–"}</td>
<td class="num">${end?.sigma !== null && end ? ue(end.sigma, false) : "–"}</td>
<td>${sig}</td>
<td>${levelBadge(e.level)}</td>
<td class="num">${ue(e.change)}</td>
<td>${e.reasons.map((r) => REASON_TEXT[r]).join(", ")}${end && d.endEpoch && end.timeMs !== d.endEpoch.timeMs ? `<br><span class="muted">last value ${esc(t(d, end.timeMs))}</span>` : ""}</td>
</tr>`;
}

function chart(d: ReportData, e: ReportElement): string {
  const svg = renderLineChartSvg({
    tMs: e.series.tMs,
    value: e.series.value,
    sigma: e.series.sigma,
    k: d.k,
    fromMs: d.period.fromMs,
    toMs: d.period.toMs,
    timeZone: d.site.timeZone,
    levels: chartLevels(e.levels),
    widthPx: 690,
    heightPx: 210,
    title: `${e.name} — ${e.quantity} (${Q_LABEL[e.quantity] ?? e.quantity}), cumulative, µε`,
  });
  const rule = e.levels[0] ? `levels of rule “${esc(e.levels[0].ruleName)}”` : "no trigger rule on this quantity";
  const thin = e.count > e.series.tMs.length ? ` · ${e.series.tMs.length} of ${e.count} values drawn (peaks kept)` : ` · ${e.count} values`;
  return `<figure class="chart-fig" data-chart-element="${e.id}">${svg}<figcaption>${esc(e.name)}: ${rule}${thin}.</figcaption></figure>`;
}

function alertsSection(d: ReportData): string {
  if (d.alerts.length === 0) return `<p>No alert was raised, acknowledged or cleared in the period, and none was open at its end.</p>`;
  return d.alerts
    .map((a) => {
      const ev = a.events.length
        ? `<ul class="events">${a.events
            .map(
              (e) =>
                `<li>${esc(t(d, e.atMs))} — <strong>${esc(e.kind)}</strong>${e.level ? ` (${esc(e.level)})` : ""}${e.value !== null ? `, ${ue(e.value)} µε` : ""}${e.actor ? ` by ${esc(e.actor)}` : ""}${e.comment ? `: <span class="comment">“${esc(e.comment)}”</span>` : ""}</li>`,
            )
            .join("")}</ul>`
        : `<p class="muted events">No events in the period (open throughout).</p>`;
      return `<div class="rpt-alert" data-alert-id="${a.id}"><h3>Alert ${a.id} · ${esc(a.elementName)} · ${levelBadge(a.level)} <span class="muted">(peak ${esc(a.peakLevel)}; ${esc(a.state)}${a.isSignificant ? "" : ", not significant"})</span></h3>
<div class="muted">Rule “${esc(a.ruleName)}” on ${esc(a.quantity)} · opened ${esc(t(d, a.openedAtMs))} · latest value ${ue(a.value)} µε${a.sigma !== null ? ` ± ${ue(a.sigma, false)} (σ)` : ""}${a.clearedAtMs !== null ? ` · cleared ${esc(t(d, a.clearedAtMs))}` : ""}${a.acknowledgedAtMs !== null ? ` · acknowledged ${esc(t(d, a.acknowledgedAtMs))} by ${esc(a.acknowledgedBy ?? "?")}${a.ackComment ? `: <span class="comment">“${esc(a.ackComment)}”</span>` : ""}` : " · not acknowledged"}</div>${ev}</div>`;
    })
    .join("\n");
}

function coverageSection(d: ReportData): string {
  const c = d.coverage;
  const cycle = c.medianIntervalS === null ? "unknown (fewer than two epochs)" : c.medianIntervalS >= 3600 ? `${(c.medianIntervalS / 3600).toFixed(c.medianIntervalS % 3600 ? 2 : 0)} h` : `${Math.round(c.medianIntervalS / 60)} min`;
  const missing = c.expected === null ? "–" : String(Math.max(0, c.expected - c.received));
  const rows = c.missedByPoint.length
    ? `<table><thead><tr><th>Point</th><th class="num">Epochs observed</th><th class="num">Epochs missed</th></tr></thead><tbody>${c.missedByPoint
        .map((p) => `<tr data-point="${esc(p.code)}"><td>${esc(p.code)}</td><td class="num">${p.observed}</td><td class="num">${p.missed}</td></tr>`)
        .join("")}</tbody></table>`
    : `<p>Every target was observed in every epoch received.</p>`;
  return `<dl class="rpt-facts">
<dt>Usual cycle (median interval)</dt><dd data-cycle-s="${c.medianIntervalS ?? ""}">${cycle}</dd>
<dt>Epochs expected</dt><dd data-expected="${c.expected ?? ""}">${c.expected ?? "–"}</dd>
<dt>Epochs received</dt><dd data-received="${c.received}">${c.received}</dd>
<dt>Epochs missing</dt><dd>${missing}</dd>
<dt>Targets in every epoch</dt><dd>${c.completePoints}</dd>
<dt>Targets with gaps</dt><dd>${c.missedByPoint.length}</dd>
</dl>${rows}`;
}

function planSection(d: ReportData): string {
  if (!d.plan || !d.endEpoch) return `<p>No epoch up to the end of the period: no plan.</p>`;
  const shownIds = new Set(d.elements.map((e) => e.id));
  const els: StaticPlanElement[] = d.plan.elements.map((e) => {
    const f = e.field;
    const isBase = e.kind === "baseline";
    const value = f && f.status === "ok" ? (isBase ? f.engineering : f.greenMax) : null;
    const sigma = f ? (isBase ? f.sigmaEngineering : f.sigmaGreenMax) : null;
    return { id: e.id, name: e.name, kind: e.kind, pointCodes: e.pointCodes, value, significant: value === null || sigma === null ? null : Math.abs(value) > d.k * sigma, highlight: shownIds.has(e.id) };
  });
  const svg = renderStaticPlanSvg(d.plan.points, els, { widthPx: 690, heightPx: 520, title: `Strain field at ${t(d, d.endEpoch.timeMs)}`, pointLabels: d.plan.points.length <= 80 });
  return `<figure class="plan-fig">${svg}<figcaption>Cumulative strain against the reference epoch at the last epoch of the period (${esc(t(d, d.endEpoch.timeMs))}); points at their reference positions; elements of the table below are named. Grid: ${esc(d.site.frameDescription)}.</figcaption></figure>`;
}

export function renderReportHtml(d: ReportData, opts: ReportHtmlOptions): ReportHtml {
  const period = `${t(d, d.period.fromMs)} – ${t(d, d.period.toMs)}`;
  const headerText = `${d.site.name} · monitoring report ${period}`;
  const footerText = `Epochal · produced ${formatSiteTime(d.producedAtMs, d.site.timeZone)} by ${d.producedBy}`;
  const flagged = d.elements.filter((e) => e.level !== null).length;
  const body = `<article class="report" data-report-site="${esc(d.site.slug)}" data-from="${new Date(d.period.fromMs).toISOString()}" data-to="${new Date(d.period.toMs).toISOString()}">
<header data-section="title">
<h1>Monitoring report · ${esc(d.site.name)}</h1>
<dl class="rpt-facts">
<dt>Site</dt><dd>${esc(d.site.name)} (${esc(d.site.slug)})</dd>
<dt>Time zone</dt><dd>${esc(describeZone(d.site.timeZone, d.period.toMs))}</dd>
<dt>Period from</dt><dd>${esc(t(d, d.period.fromMs))}</dd>
<dt>Period to</dt><dd>${esc(t(d, d.period.toMs))}</dd>
<dt>Reference epoch</dt><dd data-reference-epoch="${d.reference?.id ?? ""}">${d.reference ? esc(t(d, d.reference.timeMs)) : "none"}</dd>
<dt>Last epoch in period</dt><dd data-end-epoch="${d.endEpoch?.id ?? ""}">${d.endEpoch ? esc(t(d, d.endEpoch.timeMs)) : "none"}</dd>
<dt>Produced by</dt><dd>${esc(d.producedBy)}</dd>
<dt>Produced at</dt><dd>${esc(formatSiteTime(d.producedAtMs, d.site.timeZone))}</dd>
<dt>Significance</dt><dd>|value| &gt; ${d.k.toFixed(2)} σ</dd>
<dt>Strain</dt><dd>µε (1e-6), extension positive</dd>
</dl>
</header>
<p class="rpt-caution" role="note" data-section="caution"><strong>Caution.</strong> ${esc(d.caution)}</p>
<section data-section="summary"><h2>Summary</h2>
<p>${d.elements.length} of ${d.elementCount} elements are shown: ${flagged} at a trigger level at the end of the period, the others the largest movers or with alerts in the period. ${d.alerts.length} alert${d.alerts.length === 1 ? "" : "s"} in the period. ${d.coverage.received} epoch${d.coverage.received === 1 ? "" : "s"} received${d.coverage.expected !== null ? ` of ${d.coverage.expected} expected` : ""}.</p>
</section>
<section data-section="plan"><h2>Plan of the strain field at the end of the period</h2>${planSection(d)}</section>
<section data-section="table"><h2>Elements that moved most or reached a level</h2>
${
  d.elements.length
    ? `<p class="muted">Cumulative values against the reference epoch at the last epoch of the period${d.endEpoch ? ` (${esc(t(d, d.endEpoch.timeMs))})` : ""}; change = that value − the last value at or before the period's start. Level: the highest level of the element's rule that the value reaches (an alert keeps its level until the value falls back by the rule's hysteresis, so it can show a higher one).</p>
<table class="elements"><thead><tr><th>Element</th><th>Quantity</th><th class="num">Value (µε)</th><th class="num">σ (µε)</th><th>Significant</th><th>Level</th><th class="num">Change (µε)</th><th>Shown because</th></tr></thead><tbody>
${d.elements.map((e) => elementRow(d, e)).join("\n")}
</tbody></table>`
    : `<p>No element has results in the period.</p>`
}
</section>
<section data-section="charts"><h2>Charts</h2>
${d.elements.length ? d.elements.map((e) => chart(d, e)).join("\n") : `<p>No element to chart.</p>`}
</section>
<section data-section="alerts"><h2>Alerts raised, acknowledged and cleared</h2>
${alertsSection(d)}
</section>
<section data-section="coverage"><h2>Data coverage</h2>
${coverageSection(d)}
</section>
<p class="rpt-end">${esc(footerText)}. ${esc(d.caution)}</p>
</article>`;
  const css = cssFor(opts, headerText, footerText);
  const document = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${esc(headerText)}</title><style>${css}</style></head><body>${body}</body></html>`;
  return { css, body, document, headerText, footerText };
}
