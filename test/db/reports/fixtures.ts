/**
 * A small monitored site for the report and export tests, built through the real services: a 4 × 4
 * grid of targets at 10 m (P00 … P33) and a reference point, epochs every 6 h ingested as CSV,
 * Delaunay triangles and one baseline, a greenMax rule, alerts evaluated and one acknowledged.
 * Point P11 moves 0.4 mm east per epoch (so the triangles around it stretch); P33 is missing from
 * epochs 10 and 20; nothing else moves.
 */
import { getDb } from "../../../lib/server/db/client.ts";
import { parseEpochCsvInput } from "../../../lib/server/ingest/csv-input.ts";
import { ingestEpochs } from "../../../lib/server/ingest/service.ts";
import { createElement, generateElements } from "../../../lib/server/elements.ts";
import { evaluateAlerts } from "../../../lib/server/alerts/evaluate.ts";
import { acknowledgeAlert } from "../../../lib/server/alerts/alerts.ts";
import type { Actor, SiteRow } from "../../../lib/server/http/route.ts";
import { uniqueSlug } from "../../support/unique.ts";

export const T0_MS = Date.UTC(2026, 2, 1, 0, 0, 0);
export const CYCLE_MS = 6 * 3600_000;
export const EPOCHS = 30;
export const UE = 1e-6;
export const ORIGIN = { originLatDeg: 47.3769, originLonDeg: 8.5417, originHeightM: 408 };

export const ACTOR: Actor = { kind: "user", userId: 0, email: "fixture@example.test", name: "Fixture", isAdmin: true, label: "user:fixture@example.test" };

export function gridPoints(): [string, number, number, number][] {
  const out: [string, number, number, number][] = [["REF", -30, -30, 400]];
  for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) out.push([`P${i}${j}`, 1000 + 10 * i + (j % 2) * 3, 2000 + 10 * j, 400 + 0.1 * i]);
  return out;
}

/** Epoch CSV of epoch k (0-based). */
export function epochCsv(k: number): string {
  const time = new Date(T0_MS + k * CYCLE_MS).toISOString();
  const rows = gridPoints()
    .filter(([code]) => !(code === "P33" && (k === 10 || k === 20)))
    .map(([code, e, n, h]) => `${code},${code === "P11" ? e + 0.0004 * k : e},${n},${h},${time}`);
  return ["point,east,north,height,time", ...rows].join("\n") + "\n";
}

async function ingest(siteId: number, csv: string): Promise<number[]> {
  const parsed = parseEpochCsvInput(csv);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
  const r = await ingestEpochs(parsed.epochs, { siteId, actor: ACTOR.label, source: "test" });
  return r.epochs.map((e) => e.id);
}

export interface ReportFixture {
  site: SiteRow;
  epochIds: number[];
  triangleIds: number[];
  baselineId: number;
  ruleId: number;
  acknowledgedAlertId: number | null;
}

export async function makeReportSite(opts: { withOrigin?: boolean } = {}): Promise<ReportFixture> {
  const db = getDb();
  const slug = uniqueSlug("rpt");
  const row = await db.site.create({ data: { slug, name: `Report site ${slug}`, timeZone: "Europe/Zurich", ...(opts.withOrigin === false ? {} : ORIGIN) } });
  const site: SiteRow = { id: row.id, slug, name: row.name, timeZone: row.timeZone };
  await db.point.create({ data: { siteId: site.id, code: "REF", isReference: true, group: "reference" } });
  const epochIds = await ingest(site.id, epochCsv(0));
  const gen = await generateElements(db, site, ACTOR, { minAngleDeg: 20, maxEdgeM: 15 });
  const triangleIds = gen.created.map((e) => e.id);
  const b = await createElement(db, site, ACTOR, { name: "B-P01-P21", label: "across the mover", kind: "baseline", mode: "horizontal", points: ["P01", "P21"] });
  const rule = await db.triggerRule.create({
    data: { siteId: site.id, name: "Ground tension", quantity: "greenMax", elementIds: triangleIds, reviewLevel: 150 * UE, alertLevel: 300 * UE, limitLevel: 1200 * UE, hysteresis: 10 * UE, significantOnly: false },
  });
  for (let k = 1; k < EPOCHS; k++) epochIds.push(...(await ingest(site.id, epochCsv(k))));
  await evaluateAlerts(db, site.id, epochIds, { hasSmtp: false, publicUrl: "http://epochal.test" });
  const first = await db.alert.findFirst({ where: { siteId: site.id }, orderBy: { id: "asc" } });
  if (first) await acknowledgeAlert(site.id, first.id, "Seen on site; cracks mapped, no change.", ACTOR);
  return { site, epochIds, triangleIds, baselineId: b.element.id, ruleId: rule.id, acknowledgedAlertId: first?.id ?? null };
}
