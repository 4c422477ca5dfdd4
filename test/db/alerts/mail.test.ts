// Alert mails end to end: the pg-boss queue in its own schema of the test database, a real SMTP
// server (smtp-server) on a free port, and the ingest service's post-commit hook.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { runAlerting } from "../../../lib/server/alerts/evaluate.ts";
import { acknowledgeAlert } from "../../../lib/server/alerts/alerts.ts";
import { registerAlerting } from "../../../lib/server/alerts/register.ts";
import { enqueueMails, startMailWorker, stopMailWorker } from "../../../lib/server/mail/queue.ts";
import type { MailConfig } from "../../../lib/server/mail/config.ts";
import { ingestEpochs } from "../../../lib/server/ingest/service.ts";
import { parseEpochJson } from "../../../lib/formats/epoch-json.ts";
import { CAUTION_TEXT } from "../../../lib/caution.ts";
import { addEpoch, createGreenMaxRule, createSite, mailSubject, mailText, startSmtp, waitFor, type ReceivedMail } from "./fixtures.ts";

let smtp: Awaited<ReturnType<typeof startSmtp>>;
let config: MailConfig;

beforeAll(async () => {
  smtp = await startSmtp();
  config = {
    smtpUrl: `smtp://127.0.0.1:${smtp.port}`,
    from: "epochal@example.test",
    publicUrl: "https://epochal.example.test",
    retryLimit: 8,
    retryDelayS: 1,
    digestMinutes: 0.05, // 3 s
    jobsSchema: `pgboss_alerts_${process.pid}`,
  };
  await startMailWorker(config);
});

afterAll(async () => {
  await stopMailWorker();
  await smtp.close();
});

const to = (addr: string) => (m: ReceivedMail) => m.to.includes(addr);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function allSent(siteId: number, n: number) {
  const rows = await getDb().mailMessage.findMany({ where: { siteId, alertId: { not: null } } });
  return rows.length === n && rows.every((r) => r.status === "sent") ? rows : null;
}

describe("alert mails over SMTP", () => {
  it("runAlerting: review → alert → limit and back sends exactly one mail per opening and escalation, each once", async () => {
    const db = getDb();
    const fx = await createSite(db);
    await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    const addr = `${fx.slug}@example.test`;
    await db.mailRecipient.create({ data: { siteId: fx.siteId, email: addr } });
    for (const ue of [100, 520, 760, 1600, 1460, 900, 600, 440]) await runAlerting(fx.siteId, [await addEpoch(db, fx, { [fx.triangles[0]]: { greenMax: ue } })]);
    const rows = await waitFor("3 mails sent", () => allSent(fx.siteId, 3));
    // Queueing the same mails again (as a restart does) sends nothing more.
    await enqueueMails(rows.map((r) => r.id));
    await sleep(1500);
    const got = smtp.mails.filter(to(addr));
    expect(got).toHaveLength(3);
    const texts = got.map((m) => mailText(m.raw));
    expect(got.map((m) => mailSubject(m.raw))).toEqual([
      expect.stringContaining("REVIEW opened"),
      expect.stringContaining("ALERT escalated from REVIEW"),
      expect.stringContaining("LIMIT escalated from ALERT"),
    ]);
    expect(mailSubject(got[2].raw)).toBe(`[Epochal] LIMIT escalated from ALERT: Site ${fx.slug} — T1 greenMax`);
    expect(texts[2]).toContain("Value: 1600 µε ± 20.0 µε (1σ)");
    expect(texts[2]).toContain("Response (limit): Stop excavation in bay 3.");
    expect(texts[2]).toContain(CAUTION_TEXT);
    expect(got[0].from).toBe("epochal@example.test");
    expect(rows.every((r) => r.attempts === 1)).toBe(true);
  });

  it("a mail server down then up: the mails wait, are retried with backoff, and each arrives once", async () => {
    const db = getDb();
    const fx = await createSite(db);
    await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    const addr = `${fx.slug}@example.test`;
    await db.mailRecipient.create({ data: { siteId: fx.siteId, email: addr } });
    const port = smtp.port;
    await smtp.close();
    for (const ue of [600, 900]) await runAlerting(fx.siteId, [await addEpoch(db, fx, { [fx.triangles[0]]: { greenMax: ue } })]);
    const failed = await waitFor("a failed attempt on each mail", async () => {
      const rows = await db.mailMessage.findMany({ where: { siteId: fx.siteId } });
      return rows.length === 2 && rows.every((r) => r.attempts >= 1 && r.status === "queued" && r.lastError) ? rows : null;
    });
    expect(failed[0].lastError).toMatch(/ECONNREFUSED|connect/i);
    smtp = await startSmtp(port);
    const rows = await waitFor("2 mails sent after the server came back", () => allSent(fx.siteId, 2), 45_000);
    await sleep(1500);
    expect(smtp.mails.filter(to(addr))).toHaveLength(2);
    expect(rows.every((r) => r.attempts >= 2 && r.sentAt !== null)).toBe(true);
  });

  it("acknowledging stops escalation mails but the escalation stays in the alert's record", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    const addr = `${fx.slug}@example.test`;
    await db.mailRecipient.create({ data: { siteId: fx.siteId, email: addr } });
    await runAlerting(fx.siteId, [await addEpoch(db, fx, { [fx.triangles[0]]: { greenMax: 600 } })]);
    await waitFor("the opening mail", () => allSent(fx.siteId, 1));
    const a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    await acknowledgeAlert(fx.siteId, a.id, "On it: inspection booked.", { kind: "user", label: "user:eng@example.test" });
    await runAlerting(fx.siteId, [await addEpoch(db, fx, { [fx.triangles[0]]: { greenMax: 1700 } })]);
    await sleep(2000);
    expect(smtp.mails.filter(to(addr))).toHaveLength(1);
    const kinds = (await db.alertEvent.findMany({ where: { alertId: a.id }, orderBy: { id: "asc" } })).map((e) => e.kind);
    expect(kinds).toEqual(["open", "acknowledge", "escalate"]);
    expect((await db.alert.findUniqueOrThrow({ where: { id: a.id } })).level).toBe("limit");
  });

  it("a digest recipient gets one summary mail for the period, an immediate recipient one mail per event", async () => {
    const db = getDb();
    const fx = await createSite(db);
    await createGreenMaxRule(db, fx);
    const now = `${fx.slug}-now@example.test`;
    const digest = `${fx.slug}-digest@example.test`;
    await db.mailRecipient.createMany({ data: [{ siteId: fx.siteId, email: now }, { siteId: fx.siteId, email: digest, digest: true }] });
    const [T1, T2] = fx.triangles;
    await runAlerting(fx.siteId, [await addEpoch(db, fx, { [T1]: { greenMax: 600 }, [T2]: { greenMax: 800 } })]);
    await runAlerting(fx.siteId, [await addEpoch(db, fx, { [T1]: { greenMax: 1600 }, [T2]: { greenMax: 800 } })]);
    const got = await waitFor("the digest", async () => (smtp.mails.some(to(digest)) ? smtp.mails : null), 30_000);
    await sleep(4000); // a further period: nothing new to digest, no second digest
    expect(smtp.mails.filter(to(now))).toHaveLength(3);
    const digests = smtp.mails.filter(to(digest));
    expect(digests).toHaveLength(1);
    const text = mailText(digests[0].raw);
    expect(digests[0].raw).toMatch(/Subject: \[Epochal\] Digest: 3 alert events/);
    expect(text).toContain("Element: T1");
    expect(text).toContain("Element: T2");
    expect(text).toContain(CAUTION_TEXT);
    expect(got.length).toBeGreaterThan(0);
    const items = await db.mailMessage.findMany({ where: { siteId: fx.siteId, status: "digested" } });
    expect(items).toHaveLength(3);
  });

  it("ingestEpochs → post-commit hook → alert and mail, through the real results engine", async () => {
    const db = getDb();
    registerAlerting();
    const fx = await createSite(db, { triangles: 0 });
    const tri = await db.element.create({ data: { siteId: fx.siteId, name: "BLD-1", label: "north facade", kind: "triangle", mode: "plan", pointCodes: ["A", "B", "C"] } });
    // Let the results engine pick the site's first epoch as reference.
    await db.site.update({ where: { id: fx.siteId }, data: { referenceEpochId: null } });
    await db.epoch.delete({ where: { id: fx.refEpochId } });
    await createGreenMaxRule(db, fx, { elementIds: [tri.id] });
    const addr = `${fx.slug}@example.test`;
    await db.mailRecipient.create({ data: { siteId: fx.siteId, email: addr } });
    const epoch = (time: string, stretch: number) => ({
      time,
      observations: [
        { point: "A", east: 1000, north: 2000, height: 50, sigma_east: 0.0001, sigma_north: 0.0001, sigma_height: 0.0001 },
        { point: "B", east: 1000 + 20 * (1 + stretch), north: 2000, height: 50, sigma_east: 0.0001, sigma_north: 0.0001, sigma_height: 0.0001 },
        { point: "C", east: 1000, north: 2020, height: 50, sigma_east: 0.0001, sigma_north: 0.0001, sigma_height: 0.0001 },
      ],
    });
    const parsed = parseEpochJson({ epochs: [epoch("2026-02-01T10:00:00Z", 0), epoch("2026-02-02T10:00:00Z", 0.0002)] });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    await ingestEpochs(parsed.epochs, { siteId: fx.siteId, actor: "cli:test" });
    expect(await db.alert.count({ where: { siteId: fx.siteId } })).toBe(0);
    const next = parseEpochJson(epoch("2026-02-03T10:00:00Z", 0.0009));
    if (!next.ok) throw new Error(JSON.stringify(next.errors));
    await ingestEpochs(next.epochs, { siteId: fx.siteId, actor: "cli:test" });
    const alert = await db.alert.findFirstOrThrow({ where: { siteId: fx.siteId } });
    // Uniaxial stretch 0.0009: Green = 0.0009 + 0.0009²/2 ≈ 900.4 µε (derived) → alert level.
    expect(alert.level).toBe("alert");
    expect(alert.value).toBeCloseTo(0.0009 + 0.0009 ** 2 / 2, 7);
    await waitFor("the mail", () => allSent(fx.siteId, 1));
    const m = smtp.mails.filter(to(addr));
    expect(m).toHaveLength(1);
    expect(mailText(m[0].raw)).toContain(`Element: BLD-1 — north facade (triangle)`);
    expect(mailText(m[0].raw)).toContain(`/sites/${fx.slug}/elements/${tri.id}`);
  });
});
