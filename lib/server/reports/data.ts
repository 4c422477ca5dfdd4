/**
 * The data of a periodic report for one site and period [from, to] (UTC milliseconds):
 *
 * - title block: site, period, reference epoch, the epoch at the period's end, who and when;
 * - the plan of the strain field at the last epoch at or before `to` (stored cumulative results,
 *   lib/server/dashboard/field.ts), with the points at their reference positions;
 * - the elements shown: those that reached a trigger level (an alert event in the period, or a
 *   value at the end at or above a rule's review level), then those that moved most — largest
 *   |value at end − value at start| of the element's main quantity (greenMax for triangles and groups,
 *   engineering strain for baselines), up to MAX_ELEMENTS in all; each with its cumulative series in
 *   the period, read through the same service as GET …/elements/{id}/series (so the report's numbers
 *   are the API's), its value, σ, significance and level at the end;
 * - the alerts: every alert with an event in the period (raised, escalated, acknowledged, cleared —
 *   with their comments) and every alert still open at the period's end;
 * - coverage: the site's usual cycle (median interval between its last MEDIAN_WINDOW epochs up to
 *   `to`), the epochs expected in the period on that cycle, those received, and per point the epochs
 *   of the period in which it was missing.
 */
import { getDb, type Db } from "../db/client.ts";
import type { SiteRow } from "../http/route.ts";
import { siteReferenceEpochId } from "../results/compute.ts";
import { getPlanGeometry, type PlanPoint } from "../dashboard/site.ts";
import { getStrainField } from "../dashboard/field.ts";
import { elementSeries } from "../series.ts";
import { CAUTION_TEXT } from "../../caution.ts";
import { twoSidedK } from "../../strain/normal-quantile.ts";
import { crossedLevel, higherLevel, levelRank, QUANTITY_SENSE, type BaseQuantity, type TriggerLevel } from "../../triggers/rule.ts";
import type { FieldElement, FieldPoint } from "../../plan/field.ts";
import type { Period } from "../schemas/reports.ts";
import { alertsSettled } from "../alerts/pending.ts";

export const MAX_ELEMENTS = 8;
export const MAX_MOVED = 6;
export const MEDIAN_WINDOW = 500;
export const CHART_MAX_POINTS = 400;

export interface ReportSeries {
  tMs: number[];
  value: number[];
  sigma: (number | null)[];
}

export interface ReportLevels {
  ruleName: string;
  review: number;
  alert: number;
  limit: number;
  /** How the rule compares the value: `value`, `negated`, `magnitude` (lib/triggers/rule.ts). */
  sense: string;
}

export interface ReportElement {
  id: number;
  name: string;
  label: string;
  kind: string;
  mode: string;
  quantity: "greenMax" | "engineering";
  /** Why it is in the report. */
  reasons: ("level" | "alert" | "moved")[];
  /** Change of the quantity over the period (end − last value at or before from), or null. */
  change: number | null;
  end: { timeMs: number; value: number; sigma: number | null; significant: boolean | null } | null;
  /** Highest level the end value reaches over the element's rules on this quantity. */
  level: TriggerLevel | null;
  levels: ReportLevels[];
  series: ReportSeries;
  /** Values in the period before downsampling (the chart shows at most CHART_MAX_POINTS). */
  count: number;
}

export interface ReportAlertEvent {
  atMs: number;
  kind: string;
  level: string | null;
  value: number | null;
  actor: string | null;
  comment: string | null;
}

export interface ReportAlert {
  id: number;
  elementId: number;
  elementName: string;
  ruleName: string;
  quantity: string;
  level: string;
  peakLevel: string;
  state: "open" | "watch" | "cleared";
  openedAtMs: number;
  clearedAtMs: number | null;
  acknowledgedAtMs: number | null;
  acknowledgedBy: string | null;
  /** The latest acknowledgement's comment (the events of the period hold each one). */
  ackComment: string | null;
  value: number;
  sigma: number | null;
  isSignificant: boolean;
  /** Events in the period, oldest first. */
  events: ReportAlertEvent[];
}

export interface ReportCoverage {
  medianIntervalS: number | null;
  /** Epochs expected in the period on the usual cycle (null with fewer than two epochs). */
  expected: number | null;
  received: number;
  /** Points with the epochs of the period in which they were not observed (only points that missed any). */
  missedByPoint: { code: string; observed: number; missed: number }[];
  /** Points observed in every epoch of the period. */
  completePoints: number;
}

export interface ReportPlan {
  points: (PlanPoint & { d: FieldPoint | null })[];
  elements: { id: number; name: string; kind: string; pointCodes: string[]; field: FieldElement | null }[];
}

export interface ReportData {
  site: { slug: string; name: string; timeZone: string; frameDescription: string };
  period: Period;
  reference: { id: number; timeMs: number } | null;
  endEpoch: { id: number; timeMs: number } | null;
  producedBy: string;
  producedAtMs: number;
  k: number;
  caution: string;
  elementCount: number;
  plan: ReportPlan | null;
  elements: ReportElement[];
  alerts: ReportAlert[];
  coverage: ReportCoverage;
}

type EndsRow = { id: number; name: string; label: string; kind: string; mode: string; startV: number | null; endV: number | null; endS: number | null };

/** Value of each element's main quantity at the last ok epoch at or before `from` and `to`. */
async function readEnds(db: Db, siteId: number, siteRef: number, period: Period): Promise<EndsRow[]> {
  return db.$queryRawUnsafe<EndsRow[]>(
    `WITH el AS (
       SELECT id, name, label, kind, mode, coalesce("referenceEpochId", $2) AS ref FROM "Element" WHERE "siteId" = $1 AND "disabledAt" IS NULL)
     SELECT el.id, el.name, el.label, el.kind, el.mode, s.v AS "startV", e.v AS "endV", e.s AS "endS"
       FROM el
       LEFT JOIN LATERAL (
         SELECT CASE WHEN el.kind = 'baseline' THEN r.engineering ELSE r."greenMax" END AS v
           FROM "ElementResult" r WHERE r."elementId" = el.id AND r."referenceEpochId" = el.ref AND r."time" <= $3 AND r.status = 'ok'
          ORDER BY r."time" DESC, r."epochId" DESC LIMIT 1) s ON true
       LEFT JOIN LATERAL (
         SELECT CASE WHEN el.kind = 'baseline' THEN r.engineering ELSE r."greenMax" END AS v,
                CASE WHEN el.kind = 'baseline' THEN r."sigmaEngineering" ELSE r."sigmaGreenMax" END AS s
           FROM "ElementResult" r WHERE r."elementId" = el.id AND r."referenceEpochId" = el.ref AND r."time" <= $4 AND r.status = 'ok'
          ORDER BY r."time" DESC, r."epochId" DESC LIMIT 1) e ON true
      ORDER BY el.name`,
    siteId,
    siteRef,
    new Date(period.fromMs),
    new Date(period.toMs),
  );
}

/** The compared value c of a rule (lib/triggers/rule.ts): value, −value or |value|. */
function compared(sense: string, v: number): number {
  return sense === "negated" ? -v : sense === "magnitude" ? Math.abs(v) : v;
}

async function readAlerts(db: Db, siteId: number, period: Period): Promise<ReportAlert[]> {
  const from = new Date(period.fromMs);
  const to = new Date(period.toMs);
  await alertsSettled(siteId);
  const alerts = await db.alert.findMany({
    where: {
      siteId,
      OR: [{ events: { some: { at: { gte: from, lte: to } } } }, { openedAt: { lte: to }, OR: [{ clearedAt: null }, { clearedAt: { gt: to } }] }],
    },
    include: { rule: { select: { name: true, quantity: true } }, element: { select: { name: true } }, events: { where: { at: { gte: from, lte: to } }, orderBy: { id: "asc" } } },
    orderBy: [{ openedAt: "asc" }, { id: "asc" }],
  });
  return alerts.map((a) => ({
    id: a.id,
    elementId: a.elementId,
    elementName: a.element.name,
    ruleName: a.rule.name,
    quantity: a.rule.quantity,
    level: a.level,
    peakLevel: a.peakLevel,
    state: a.clearedAt && a.clearedAt.getTime() <= period.toMs ? "cleared" : a.isSignificant ? "open" : "watch",
    openedAtMs: a.openedAt.getTime(),
    clearedAtMs: a.clearedAt?.getTime() ?? null,
    acknowledgedAtMs: a.acknowledgedAt?.getTime() ?? null,
    acknowledgedBy: a.acknowledgedBy,
    ackComment: a.ackComment,
    value: a.value,
    sigma: a.sigma,
    isSignificant: a.isSignificant,
    events: a.events.map((e) => ({ atMs: e.at.getTime(), kind: e.kind, level: e.level, value: e.value, actor: e.actor, comment: e.comment })),
  }));
}

/** Median of the intervals (seconds) between consecutive epochs; null with fewer than two. */
export function medianIntervalS(timesMs: readonly number[]): number | null {
  const d: number[] = [];
  for (let i = 1; i < timesMs.length; i++) if (timesMs[i] > timesMs[i - 1]) d.push((timesMs[i] - timesMs[i - 1]) / 1000);
  if (d.length === 0) return null;
  d.sort((a, b) => a - b);
  const m = d.length >> 1;
  return d.length % 2 ? d[m] : (d[m - 1] + d[m]) / 2;
}

/**
 * Epochs expected in [fromMs, toMs] on a cycle of `intervalS` through the anchor time `anchorMs` (an
 * epoch of the site): the count of instants anchor + i·interval (i integer) in the period.
 */
export function expectedEpochs(period: Period, intervalS: number, anchorMs: number): number {
  const m = intervalS * 1000;
  const lo = Math.ceil((period.fromMs - anchorMs) / m - 1e-9);
  const hi = Math.floor((period.toMs - anchorMs) / m + 1e-9);
  return Math.max(0, hi - lo + 1);
}

async function readCoverage(db: Db, siteId: number, period: Period): Promise<ReportCoverage> {
  const recent = await db.$queryRawUnsafe<{ t: number }[]>(
    `SELECT (extract(epoch FROM "time") * 1000)::float8 AS t FROM "Epoch" WHERE "siteId" = $1 AND "isCurrent" AND "time" <= $2 ORDER BY "time" DESC LIMIT ${MEDIAN_WINDOW}`,
    siteId,
    new Date(period.toMs),
  );
  const times = recent.map((r) => Number(r.t)).reverse();
  const median = medianIntervalS(times);
  const inPeriod = await db.$queryRawUnsafe<{ n: number }[]>(
    `SELECT count(*)::int AS n FROM "Epoch" WHERE "siteId" = $1 AND "isCurrent" AND "time" >= $2 AND "time" <= $3`,
    siteId,
    new Date(period.fromMs),
    new Date(period.toMs),
  );
  const received = inPeriod[0]?.n ?? 0;
  // Targets: every point ever observed on the site; per point, the period's epochs that hold it.
  const perPoint = await db.$queryRawUnsafe<{ code: string; observed: number }[]>(
    `SELECT p.code, count(e.id)::int AS observed
       FROM "Point" p
       LEFT JOIN "Observation" o ON o."pointId" = p.id
       LEFT JOIN "Epoch" e ON e.id = o."epochId" AND e."isCurrent" AND e."time" >= $2 AND e."time" <= $3
      WHERE p."siteId" = $1 AND EXISTS (SELECT 1 FROM "Observation" o2 WHERE o2."pointId" = p.id)
      GROUP BY p.code ORDER BY p.code`,
    siteId,
    new Date(period.fromMs),
    new Date(period.toMs),
  );
  const missedByPoint = perPoint.filter((p) => p.observed < received).map((p) => ({ code: p.code, observed: p.observed, missed: received - p.observed }));
  missedByPoint.sort((a, b) => b.missed - a.missed || a.code.localeCompare(b.code));
  return {
    medianIntervalS: median,
    expected: median === null || times.length === 0 ? null : expectedEpochs(period, median, times[times.length - 1]),
    received,
    missedByPoint,
    completePoints: perPoint.length - missedByPoint.length,
  };
}

export async function buildReportData(site: SiteRow, period: Period, producer: { label: string; nowMs?: number }, db: Db = getDb()): Promise<ReportData> {
  const s = await db.site.findUniqueOrThrow({ where: { id: site.id } });
  const k = twoSidedK(s.confidence);
  const siteRef = await siteReferenceEpochId(db, site.id);
  const [refEpoch, endEpoch] = await Promise.all([
    siteRef === null ? null : db.epoch.findUnique({ where: { id: siteRef }, select: { id: true, time: true } }),
    db.epoch.findFirst({ where: { siteId: site.id, isCurrent: true, time: { lte: new Date(period.toMs) } }, orderBy: [{ time: "desc" }, { id: "desc" }], select: { id: true, time: true } }),
  ]);

  const [alerts, coverage, geo] = await Promise.all([readAlerts(db, site.id, period), readCoverage(db, site.id, period), getPlanGeometry(site.id, siteRef)]);

  // Elements: reached a level or alerted in the period first, then the largest movers.
  const ends = siteRef === null ? [] : await readEnds(db, site.id, siteRef, period);
  const rules = await db.triggerRule.findMany({ where: { siteId: site.id, enabled: true }, select: { name: true, quantity: true, elementIds: true, reviewLevel: true, alertLevel: true, limitLevel: true } });
  const levelsOf = (id: number, q: BaseQuantity): ReportLevels[] =>
    rules
      .filter((r) => r.quantity === q && r.elementIds.includes(id))
      .map((r) => ({ ruleName: r.name, review: r.reviewLevel, alert: r.alertLevel, limit: r.limitLevel, sense: QUANTITY_SENSE[q] }));
  const alertedIds = new Set(alerts.filter((a) => a.events.length > 0 || a.state !== "cleared").map((a) => a.elementId));
  type Cand = { row: EndsRow; q: "greenMax" | "engineering"; levels: ReportLevels[]; level: TriggerLevel | null; change: number | null; alerted: boolean };
  const cands: Cand[] = ends.map((row) => {
    const q = row.kind === "baseline" ? "engineering" : "greenMax";
    const levels = levelsOf(row.id, q);
    let level: TriggerLevel | null = null;
    if (row.endV !== null) for (const l of levels) level = higherLevel(level, crossedLevel(l, compared(l.sense, row.endV)));
    const change = row.endV === null ? null : row.endV - (row.startV ?? 0);
    return { row, q, levels, level, change, alerted: alertedIds.has(row.id) };
  });
  const flagged = cands.filter((c) => c.level !== null || c.alerted).sort((a, b) => levelRank(b.level) - levelRank(a.level) || Math.abs(b.change ?? 0) - Math.abs(a.change ?? 0));
  const chosen = flagged.slice(0, MAX_ELEMENTS);
  const movers = cands
    .filter((c) => !chosen.includes(c) && c.change !== null && c.change !== 0)
    .sort((a, b) => Math.abs(b.change as number) - Math.abs(a.change as number))
    .slice(0, Math.max(0, Math.min(MAX_MOVED, MAX_ELEMENTS - chosen.length)));
  const picked = [...chosen, ...movers];
  const moverSet = new Set(movers);

  const elements: ReportElement[] = [];
  for (const c of picked) {
    const ser = await elementSeries(db, site, c.row.id, { quantity: c.q, mode: "cumulative", from: new Date(period.fromMs), to: new Date(period.toMs), maxPoints: CHART_MAX_POINTS });
    const last = ser.points[ser.points.length - 1];
    const reasons: ReportElement["reasons"] = [];
    if (c.level) reasons.push("level");
    if (c.alerted) reasons.push("alert");
    if (moverSet.has(c) || (c.change !== null && !c.level && !c.alerted)) reasons.push("moved");
    elements.push({
      id: c.row.id,
      name: c.row.name,
      label: c.row.label,
      kind: c.row.kind,
      mode: c.row.mode,
      quantity: c.q,
      reasons,
      change: c.change,
      end: last ? { timeMs: Date.parse(last.t), value: last.value, sigma: last.sigma, significant: last.sigma === null ? null : Math.abs(last.value) > k * last.sigma } : null,
      level: c.level,
      levels: c.levels,
      series: { tMs: ser.points.map((p) => Date.parse(p.t)), value: ser.points.map((p) => p.value), sigma: ser.points.map((p) => p.sigma) },
      count: ser.count,
    });
  }

  let plan: ReportPlan | null = null;
  if (endEpoch && siteRef !== null) {
    const field = await getStrainField(site.id, { epochId: endEpoch.id, k });
    const fe = new Map(field.elements.map((e) => [e.id, e]));
    const fp = new Map(field.points.map((p) => [p.code, p]));
    plan = {
      points: geo.points.map((p) => ({ ...p, d: fp.get(p.code) ?? null })),
      elements: geo.elements.map((e) => ({ id: e.id, name: e.name, kind: e.kind, pointCodes: e.pointCodes, field: fe.get(e.id) ?? null })),
    };
  }

  return {
    site: { slug: s.slug, name: s.name, timeZone: s.timeZone, frameDescription: s.frameDescription },
    period,
    reference: refEpoch ? { id: refEpoch.id, timeMs: refEpoch.time.getTime() } : null,
    endEpoch: endEpoch ? { id: endEpoch.id, timeMs: endEpoch.time.getTime() } : null,
    producedBy: producer.label,
    producedAtMs: producer.nowMs ?? Date.now(),
    k,
    caution: CAUTION_TEXT,
    elementCount: ends.length,
    plan,
    elements,
    alerts,
    coverage,
  };
}
