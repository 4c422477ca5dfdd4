/**
 * seedDemo on a fresh migrated database: the whole scenario goes in through the ingest service, the
 * story opens with alerts at review and alert level and a history of cleared ones, and a second run
 * adds nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import pg from "pg";
import { createTestDatabase, type TestDatabase } from "../../support/database.ts";
import { seedDemo, type SeedDemoResult } from "../../../seed/demo.ts";
import { generateScenario } from "../../../seed/scenario.ts";
import { DEMO_RECIPIENTS, DEMO_USERS } from "../../../seed/demo-users.ts";
import { verifyPassword } from "../../../lib/server/auth/password.ts";

const TABLES = ["Site", "Point", "Epoch", "Observation", "Element", "ElementResult", "TriggerRule", "Alert", "AlertEvent", "MailMessage", "MailRecipient", "User", "Membership", "AuditEntry"];

let tdb: TestDatabase;
let client: pg.Client;
let first: SeedDemoResult;
const sc = generateScenario();

async function counts(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of TABLES) out[t] = Number((await client.query(`SELECT count(*)::int AS n FROM "${t}"`)).rows[0].n);
  return out;
}

beforeAll(async () => {
  tdb = await createTestDatabase("seed");
  first = await seedDemo({ databaseUrl: tdb.url, quiet: true });
  client = new pg.Client({ connectionString: tdb.url });
  await client.connect();
}, 600_000);

afterAll(async () => {
  await client?.end();
  await tdb?.drop();
});

describe("seedDemo", () => {
  it("seedDemo on an empty database stores every epoch and observation of the scenario", async () => {
    expect(first.siteSlug).toBe(sc.site.slug);
    expect(first.epochsStored).toBe(730);
    expect(first.epochsCreated).toBe(730);
    const c = await counts();
    expect(c.Site).toBe(1);
    expect(c.Point).toBe(sc.points.length);
    expect(c.Epoch).toBe(730);
    expect(c.Observation).toBe(sc.epochs.reduce((s, e) => s + e.observations.length, 0));
    const site = (await client.query(`SELECT "timeZone", "sigmaHM", "sigmaVM", "originLatDeg", "frameDescription" FROM "Site"`)).rows[0];
    expect(site).toMatchObject({ timeZone: sc.site.timeZone, sigmaHM: 0.001, sigmaVM: 0.0015, originLatDeg: sc.site.originLatDeg, frameDescription: sc.site.frameDescription });
    const refs = (await client.query(`SELECT code FROM "Point" WHERE "isReference" ORDER BY code`)).rows.map((r) => r.code);
    expect(refs).toEqual(sc.points.filter((p) => p.isReference).map((p) => p.code).sort());
    const sources = (await client.query(`SELECT DISTINCT source FROM "Epoch"`)).rows.map((r) => r.source);
    expect(sources).toEqual(["demo"]);
  });

  it("seedDemo creates the hand-made elements, the ground triangulation and the two gable rules from the preset", async () => {
    const el = (await client.query(`SELECT source, kind, mode, count(*)::int AS n FROM "Element" GROUP BY 1, 2, 3 ORDER BY 1, 2, 3`)).rows;
    const n = (source: string, kind: string, mode: string) => el.find((r) => r.source === source && r.kind === kind && r.mode === mode)?.n ?? 0;
    expect(n("manual", "triangle", "surface")).toBe(12);
    expect(n("manual", "baseline", "horizontal")).toBe(22);
    expect(n("triangulation", "triangle", "plan")).toBeGreaterThan(100);
    const rules = (await client.query(`SELECT name, preset, quantity, "reviewLevel", "alertLevel", "limitLevel", cardinality("elementIds") AS n FROM "TriggerRule" ORDER BY name`)).rows;
    expect(rules).toHaveLength(2);
    for (const r of rules) {
      expect(r).toMatchObject({ preset: "building-baseline-strain", quantity: "engineering", n: 3 });
      // Half the onset of damage category 1 (Boscardin & Cording 1989: 0.05 %), then categories 1 and 2.
      expect(r.reviewLevel).toBeCloseTo(0.00025, 12);
      expect(r.alertLevel).toBeCloseTo(0.0005, 12);
      expect(r.limitLevel).toBeCloseTo(0.00075, 12);
    }
    // Every element has a result at every epoch where its points were read.
    const perElement = (await client.query(`SELECT max(n)::int AS mx FROM (SELECT count(*) AS n FROM "ElementResult" GROUP BY "elementId") s`)).rows[0].mx;
    expect(perElement).toBe(730);
  });

  it("the demo opens with alerts at review and at alert level, and a history of cleared ones mailed to the outbox", async () => {
    const open = (await client.query(`SELECT level FROM "Alert" WHERE "clearedAt" IS NULL AND "isSignificant"`)).rows.map((r) => r.level);
    expect(open).toContain("review");
    expect(open).toContain("alert");
    expect(open).not.toContain("limit");
    expect(first.alertsOpen).toBe(open.length);
    expect(first.alertsCleared).toBeGreaterThan(0);
    const mails = (await client.query(`SELECT status, count(*)::int AS n FROM "MailMessage" GROUP BY 1`)).rows;
    expect(mails.find((m) => m.status === "outbox")?.n ?? 0).toBeGreaterThan(0);
    expect(mails.some((m) => m.status === "queued" || m.status === "sent")).toBe(false);
    const rcpt = (await client.query(`SELECT email FROM "MailRecipient" ORDER BY email`)).rows.map((r) => r.email);
    expect(rcpt).toEqual(DEMO_RECIPIENTS.map((r) => r.email).sort());
    expect(rcpt.every((e) => e.endsWith("@example.org"))).toBe(true);
  });

  it("seedDemo creates one demo user per role whose password is the printed one", async () => {
    const rows = (await client.query(`SELECT u.email, u."passwordHash", u."isAdmin", m.role FROM "User" u JOIN "Membership" m ON m."userId" = u.id ORDER BY u.email`)).rows;
    expect(rows.map((r) => r.role).sort()).toEqual(["admin", "engineer", "surveyor", "viewer"]);
    for (const u of DEMO_USERS) {
      const row = rows.find((r) => r.email === u.email);
      expect(row?.role).toBe(u.role);
      expect(row?.isAdmin).toBe(u.role === "admin");
      expect(await verifyPassword(u.password, row!.passwordHash)).toBe(true);
    }
    expect(first.users.map((u) => u.email)).toEqual(DEMO_USERS.map((u) => u.email));
  });

  it("a second seedDemo adds nothing: every table keeps its row count", async () => {
    const before = await counts();
    const again = await seedDemo({ databaseUrl: tdb.url, quiet: true });
    expect(again.epochsCreated).toBe(0);
    expect(again.epochsStored).toBe(730);
    expect(again.alertsOpen).toBe(first.alertsOpen);
    expect(await counts()).toEqual(before);
  }, 120_000);
});
