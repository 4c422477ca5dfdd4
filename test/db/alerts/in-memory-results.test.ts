/**
 * Alert evaluation takes the results of epochs this process has just computed from memory
 * (lib/server/results/columns.ts `computedResultsOf`) instead of reading them back. Both paths must
 * give the same alerts: two sites with the same points, elements, epochs and rules, one evaluated
 * from memory, one after the kept rows are dropped (read from the database), give equal transitions.
 * Values: a triangle stretched uniformly by (1 + s) in plan has Green-Lagrange greenMax = s + s²/2
 * (derived analytically; domain.md §8), so the series below rises through review, alert and limit.
 */
import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { ingestEpochs } from "../../../lib/server/ingest/service.ts";
import { parseEpochCsvInput } from "../../../lib/server/ingest/csv-input.ts";
import { computedResultsOf, forgetComputedResults } from "../../../lib/server/results/columns.ts";
import { evaluateAlerts } from "../../../lib/server/alerts/evaluate.ts";
import { uniqueSlug } from "../../support/unique.ts";

const PTS: [string, number, number][] = [["A", 1000, 2000], ["B", 1020, 2000], ["C", 1010, 2017.32], ["D", 1030, 2017.32]];
const STRETCH = [0, 2e-4, 6e-4, 1.2e-3, 2.5e-3, 4e-4];
const opts = { hasSmtp: false, publicUrl: "https://epochal.example.test" };

function csv(time: string, s: number): string {
  return ["point,east,north,height,sigma_east,sigma_north", ...PTS.map(([p, e, n]) => `${p},${1000 + (e - 1000) * (1 + s)},${2000 + (n - 2000) * (1 + s)},100,0.0001,0.0001`)].join("\n") + "\n";
}

async function siteWithEpochs(): Promise<{ siteId: number; epochIds: number[] }> {
  const db = getDb();
  const slug = uniqueSlug("mem");
  const site = await db.site.create({ data: { slug, name: slug, timeZone: "UTC" } });
  await db.element.createMany({
    data: [
      { siteId: site.id, name: "T1", kind: "triangle", mode: "plan", pointCodes: ["A", "B", "C"] },
      { siteId: site.id, name: "T2", kind: "triangle", mode: "plan", pointCodes: ["B", "D", "C"] },
      { siteId: site.id, name: "L1", kind: "baseline", mode: "slope", pointCodes: ["A", "D"] },
    ],
  });
  const epochIds: number[] = [];
  for (let i = 0; i < STRETCH.length; i++) {
    const parsed = parseEpochCsvInput(csv(new Date(Date.UTC(2024, 5, 1, i)).toISOString(), STRETCH[i]), { defaultTime: new Date(Date.UTC(2024, 5, 1, i)).toISOString() });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    const r = await ingestEpochs(parsed.epochs, { siteId: site.id, actor: "test" });
    epochIds.push(r.epochs[0].id);
  }
  const els = await db.element.findMany({ where: { siteId: site.id }, orderBy: { name: "asc" } });
  const tri = els.filter((e) => e.kind === "triangle").map((e) => e.id);
  const base = els.filter((e) => e.kind === "baseline").map((e) => e.id);
  await db.triggerRule.createMany({
    data: [
      { siteId: site.id, name: "stretch", quantity: "greenMax", elementIds: tri, reviewLevel: 5e-4, alertLevel: 1e-3, limitLevel: 2e-3, hysteresis: 5e-5, significantOnly: false },
      { siteId: site.id, name: "stretch rate", quantity: "greenMax.ratePerDay", elementIds: tri, reviewLevel: 5e-3, alertLevel: 1e-2, limitLevel: 3e-2, hysteresis: 1e-4, significantOnly: false },
      { siteId: site.id, name: "baseline", quantity: "engineering", elementIds: base, reviewLevel: 5e-4, alertLevel: 1e-3, limitLevel: 2e-3, hysteresis: 5e-5, significantOnly: false },
    ],
  });
  return { siteId: site.id, epochIds };
}

type Seen = { rule: string; element: string; epoch: number; kind: string; level: string | null };

async function evaluateInOrder(siteId: number, epochIds: number[], fromMemory: boolean): Promise<Seen[]> {
  const db = getDb();
  const rules = new Map((await db.triggerRule.findMany({ where: { siteId } })).map((r) => [r.id, r.name]));
  const els = new Map((await db.element.findMany({ where: { siteId } })).map((e) => [e.id, e.name]));
  const seen: Seen[] = [];
  for (let i = 1; i < epochIds.length; i++) {
    if (!fromMemory) forgetComputedResults([epochIds[i], epochIds[i - 1]]);
    const r = await evaluateAlerts(db, siteId, [epochIds[i]], opts);
    for (const t of r.transitions) {
      const tr = t.transition as { kind: string; level?: string };
      seen.push({ rule: rules.get(t.ruleId) as string, element: els.get(t.elementId) as string, epoch: i, kind: tr.kind, level: tr.level ?? null });
    }
  }
  return seen;
}

describe("alert evaluation from in-memory results", () => {
  it("gives the same transitions as evaluation from the stored rows", async () => {
    const a = await siteWithEpochs();
    // The rows of A's epochs are still held by this process (the computation that stored them).
    expect(a.epochIds.every((id) => computedResultsOf(id) !== undefined)).toBe(true);
    const fromMemory = await evaluateInOrder(a.siteId, a.epochIds, true);
    const b = await siteWithEpochs();
    const fromDb = await evaluateInOrder(b.siteId, b.epochIds, false);
    expect(fromMemory.length).toBeGreaterThan(5);
    expect(fromMemory.map((t) => t.kind)).toContain("escalate");
    expect(fromMemory).toEqual(fromDb);
    // And the alerts kept in the table agree, value for value.
    const rows = async (siteId: number) =>
      (await getDb().alert.findMany({ where: { siteId }, orderBy: [{ ruleId: "asc" }, { elementId: "asc" }] })).map((x) => [x.level, x.peakLevel, x.value, x.sigma, x.clearedAt === null]);
    expect(await rows(a.siteId)).toEqual(await rows(b.siteId));
  });
});
