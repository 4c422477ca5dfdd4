/**
 * The alert backlog (lib/server/alerts/backlog.ts): every stored epoch is queued for evaluation in
 * its own transaction, evaluated once, after the HTTP response when there is one, and swept when the
 * process that stored it stopped before evaluating it. Values: a triangle stretched uniformly by
 * (1 + s) in plan has Green-Lagrange greenMax = s + s²/2 (analytic; domain.md §8): s = 6e-4 is above
 * the review level 5e-4 and below the alert level 1e-3.
 */
import { afterAll, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { ingestEpochs } from "../../../lib/server/ingest/service.ts";
import { parseEpochCsvInput } from "../../../lib/server/ingest/csv-input.ts";
import { runAlerting } from "../../../lib/server/alerts/evaluate.ts";
import { sweepAlertBacklog } from "../../../lib/server/alerts/backlog.ts";
import { registerAlerting } from "../../../lib/server/alerts/register.ts";
import { listAlerts } from "../../../lib/server/alerts/alerts.ts";
import { stopMailWorker } from "../../../lib/server/mail/queue.ts";
import { uniqueSlug } from "../../support/unique.ts";

const PTS: [string, number, number][] = [["A", 1000, 2000], ["B", 1020, 2000], ["C", 1010, 2017.32]];

afterAll(async () => {
  await stopMailWorker();
});

async function makeSite(): Promise<number> {
  const db = getDb();
  const slug = uniqueSlug("backlog");
  const site = await db.site.create({ data: { slug, name: slug, timeZone: "UTC" } });
  const el = await db.element.create({ data: { siteId: site.id, name: "T1", kind: "triangle", mode: "plan", pointCodes: ["A", "B", "C"] } });
  await db.triggerRule.create({
    data: { siteId: site.id, name: "stretch", quantity: "greenMax", elementIds: [el.id], reviewLevel: 5e-4, alertLevel: 1e-3, limitLevel: 2e-3, hysteresis: 5e-5, significantOnly: false },
  });
  return site.id;
}

async function store(siteId: number, hour: number, s: number, afterResponse?: (task: () => Promise<void>) => boolean): Promise<number> {
  const time = new Date(Date.UTC(2024, 6, 1, hour)).toISOString();
  const text = ["point,east,north,height,sigma_east,sigma_north", ...PTS.map(([p, e, n]) => `${p},${1000 + (e - 1000) * (1 + s)},${2000 + (n - 2000) * (1 + s)},100,0.0001,0.0001`)].join("\n") + "\n";
  const parsed = parseEpochCsvInput(text, { defaultTime: time });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
  const r = await ingestEpochs(parsed.epochs, { siteId, actor: "test", afterResponse });
  return r.epochs[0].id;
}

async function queued(siteId: number): Promise<number[]> {
  return (await getDb().alertBacklog.findMany({ where: { siteId }, orderBy: { epochId: "asc" } })).map((b) => b.epochId);
}

async function openEvents(siteId: number): Promise<number> {
  return getDb().alertEvent.count({ where: { kind: "open", alert: { siteId } } });
}

describe("alert backlog", () => {
  it("an epoch stored while nothing evaluates it stays queued until the sweep evaluates it, once", async () => {
    const siteId = await makeSite();
    const e0 = await store(siteId, 0, 0);
    const e1 = await store(siteId, 1, 6e-4);
    expect(await queued(siteId)).toEqual([e0, e1]);
    expect(await getDb().alert.count({ where: { siteId } })).toBe(0);
    // Rows younger than the sweep's age (30 s by default) are left to the process that stored them.
    expect(await sweepAlertBacklog({ siteIds: [siteId] })).toEqual({ sites: 0, epochs: 0 });
    expect(await sweepAlertBacklog({ siteIds: [siteId], olderThanMs: 0 })).toEqual({ sites: 1, epochs: 2 });
    expect(await queued(siteId)).toEqual([]);
    const alerts = await getDb().alert.findMany({ where: { siteId } });
    expect(alerts.map((a) => [a.level, a.openedEpochId])).toEqual([["review", e1]]);
    expect(await sweepAlertBacklog({ siteIds: [siteId], olderThanMs: 0 })).toEqual({ sites: 0, epochs: 0 });
    expect(await openEvents(siteId)).toBe(1);
  });

  it("two evaluations racing for the same queued epochs evaluate them once", async () => {
    const siteId = await makeSite();
    const ids = [await store(siteId, 0, 0), await store(siteId, 1, 6e-4)];
    const [a, b] = await Promise.all([runAlerting(siteId, ids, undefined, { onlyQueued: true }), runAlerting(siteId, ids, undefined, { onlyQueued: true })]);
    expect([a.evaluatedEpochs, b.evaluatedEpochs].sort()).toEqual([0, 2]);
    expect(await openEvents(siteId)).toBe(1);
    expect(await queued(siteId)).toEqual([]);
  });

  it("with an after-response hook the post returns before its alerts; a read of alerts waits for them", async () => {
    registerAlerting({ startWorker: false });
    const siteId = await makeSite();
    const tasks: (() => Promise<void>)[] = [];
    const hook = (task: () => Promise<void>) => (tasks.push(task), true);
    await store(siteId, 0, 0, hook);
    await tasks.shift()!();
    const e1 = await store(siteId, 1, 6e-4, hook);
    // Returned: the epoch is committed and computed, its alert not evaluated yet.
    expect(await getDb().elementResult.count({ where: { epochId: e1 } })).toBe(1);
    expect(await getDb().alert.count({ where: { siteId } })).toBe(0);
    expect(await queued(siteId)).toEqual([e1]);
    let listed = false;
    const listing = listAlerts(siteId, { state: "all", limit: 10 }).then((r) => ((listed = true), r));
    await new Promise((r) => setTimeout(r, 50));
    expect(listed).toBe(false);
    expect(tasks).toHaveLength(1);
    await tasks.shift()!();
    const alerts = await listing;
    expect(alerts.map((a) => [a.level, a.openedEpochId])).toEqual([["review", e1]]);
    expect(await queued(siteId)).toEqual([]);

    // A hook that cannot defer (no request scope): the evaluation is done when the post returns.
    const e2 = await store(siteId, 2, 1.2e-3, () => false);
    expect((await getDb().alert.findFirst({ where: { siteId } }))?.lastEpochId).toBe(e2);
    expect((await getDb().alert.findFirst({ where: { siteId } }))?.level).toBe("alert");
    expect(await queued(siteId)).toEqual([]);
  });
});
