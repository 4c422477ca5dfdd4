/**
 * Trend of an element quantity over a window ending at its latest epoch: the least-squares line with
 * its uncertainty, when it would reach each level (given, or the element's trigger-rule levels for
 * the quantity), and the inverse-velocity forecast for accelerating movement. Every part carries a
 * caution; none is presented as a certainty.
 */
// No "server-only" marker: the benchmark and the CLI import this module outside Next.js too.
import type { Db } from "./db/client.ts";
import type { SiteRow } from "./http/route.ts";
import { AppError } from "./errors.ts";
import { getElementRow } from "./elements.ts";
import { effectiveReferenceEpochId } from "./results/element-history.ts";
import { readElementArrays } from "./series.ts";
import { fitLinearTrend, levelCrossingTimes, TREND_CAUTION, type LevelCrossing } from "../series/trend.ts";
import { inverseVelocityForecast, type InverseVelocityResult } from "../series/inverse-velocity.ts";
import type { TrendQuery } from "./schemas/elements.ts";

const iso = (ms: number | null): string | null => (ms === null || !Number.isFinite(ms) ? null : new Date(ms).toISOString());

export async function elementTrend(db: Db, site: SiteRow, elementId: number, query: TrendQuery) {
  const el = await getElementRow(db, site, elementId);
  if (query.quantity === "engineering" ? el.kind !== "baseline" : el.kind === "baseline")
    throw new AppError("invalid", `quantity: ${query.quantity} is not a quantity of a ${el.kind}`, { errors: [{ line: null, field: "quantity", message: `${query.quantity} is not a quantity of a ${el.kind}` }] });
  const refId = await effectiveReferenceEpochId(db, el);
  const head = { element: { id: el.id, name: el.name, label: el.label }, quantity: query.quantity, timeZone: site.timeZone, caution: TREND_CAUTION };
  if (refId === null) return { ...head, window: null, trend: { status: "insufficient-data", n: 0, message: "no epochs yet", caution: TREND_CAUTION }, levels: [], crossings: [], inverseVelocity: null };

  const superseded = (await db.epoch.findMany({ where: { siteId: site.id, isCurrent: false }, select: { id: true } })).map((e) => e.id);
  const last = await db.elementResult.findFirst({ where: { elementId: el.id, referenceEpochId: refId, status: "ok", epochId: { notIn: superseded } }, orderBy: { time: "desc" }, select: { time: true } });
  if (!last) return { ...head, window: null, trend: { status: "insufficient-data", n: 0, message: "no computed results yet", caution: TREND_CAUTION }, levels: [], crossings: [], inverseVelocity: null };
  const to = last.time;
  const from = new Date(to.getTime() - query.window);
  const s = await readElementArrays(db, el.id, refId, query.quantity, from, to);

  let levels = query.levels;
  let levelSource = "query";
  if (!levels) {
    const rules = await db.triggerRule.findMany({ where: { siteId: site.id, enabled: true, quantity: query.quantity, elementIds: { has: el.id } }, select: { name: true, reviewLevel: true, alertLevel: true, limitLevel: true } });
    levels = [...new Set(rules.flatMap((r) => [r.reviewLevel, r.alertLevel, r.limitLevel]))].sort((a, b) => a - b);
    levelSource = rules.length ? `trigger rules: ${rules.map((r) => r.name).join(", ")}` : "none";
  }

  const trend = fitLinearTrend(s.tMs, s.value, from.getTime());
  const crossings: (LevelCrossing & { time?: string | null })[] = trend.status === "ok" ? levelCrossingTimes(trend, levels).map((c) => (c.status === "projected" ? { ...c, time: iso(c.timeMs) } : c)) : [];
  const iv: InverseVelocityResult = inverseVelocityForecast(s.tMs, s.value, { smoothWindow: query.smoothWindow });
  return {
    ...head,
    window: { from: from.toISOString(), to: to.toISOString(), durationMs: query.window, points: s.tMs.length },
    trend:
      trend.status === "ok"
        ? { ...trend, origin: iso(trend.originMs), first: iso(trend.firstMs), last: iso(trend.lastMs), unit: `${query.quantity === "rotationDeg" ? "deg" : "strain"}/day` }
        : trend,
    levels,
    levelSource,
    crossings,
    inverseVelocity: {
      ...iv,
      failureTime: iso(iv.failureTimeMs),
      segmentStart: iso(iv.segmentStartMs),
      segmentEnd: iso(iv.segmentEndMs),
      applicable: iv.isAccelerating,
    },
  };
}
