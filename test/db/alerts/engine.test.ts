// The alert engine on ElementResult rows written with chosen values (no job queue: mails stay rows).
import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { evaluateAlerts } from "../../../lib/server/alerts/evaluate.ts";
import { acknowledgeAlert } from "../../../lib/server/alerts/alerts.ts";
import { createRule, updateRule } from "../../../lib/server/rules.ts";
import { CAUTION_TEXT } from "../../../lib/caution.ts";
import { addEpoch, createGreenMaxRule, createSite, UE } from "./fixtures.ts";

const opts = { hasSmtp: false, publicUrl: "https://epochal.example.test" };

async function eventsOf(alertId: number) {
  const ev = await getDb().alertEvent.findMany({ where: { alertId }, orderBy: { id: "asc" } });
  return ev.map((e) => [e.kind, e.level]);
}

describe("evaluateAlerts", () => {
  it("evaluateAlerts: a series rising through review, alert and limit and falling back gives one alert with the expected events and three mails", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    await db.mailRecipient.createMany({
      data: [
        { siteId: fx.siteId, email: "review@example.test", minLevel: "review" },
        { siteId: fx.siteId, email: "limit@example.test", minLevel: "limit" },
      ],
    });
    const T1 = fx.triangles[0];
    const series = [100, 520, 760, 1600, 1550, 1460, 900, 600, 470, 440];
    const kinds: string[] = [];
    for (const ue of series) {
      const ep = await addEpoch(db, fx, { [T1]: { greenMax: ue } });
      const r = await evaluateAlerts(db, fx.siteId, [ep], opts);
      kinds.push(r.transitions.map((t) => t.transition.kind).join(",") || "-");
    }
    expect(kinds).toEqual(["-", "open", "escalate", "escalate", "stay", "stay", "de-escalate", "de-escalate", "stay", "clear"]);

    const alerts = await db.alert.findMany({ where: { ruleId: rule.id } });
    expect(alerts).toHaveLength(1);
    const a = alerts[0];
    expect(a.peakLevel).toBe("limit");
    expect(a.clearedAt).not.toBeNull();
    expect(a.value).toBeCloseTo(440 * UE, 12);
    expect(await eventsOf(a.id)).toEqual([
      ["open", "review"],
      ["escalate", "alert"],
      ["escalate", "limit"],
      ["de-escalate", "alert"],
      ["de-escalate", "review"],
      ["clear", "review"],
    ]);

    const mails = await db.mailMessage.findMany({ where: { siteId: fx.siteId }, orderBy: { id: "asc" } });
    expect(mails.map((m) => [m.status, m.recipients])).toEqual([
      ["outbox", ["review@example.test"]],
      ["outbox", ["review@example.test"]],
      ["outbox", ["limit@example.test", "review@example.test"]],
    ]);
    const last = mails[2];
    expect(last.subject).toContain("LIMIT");
    expect(last.body).toContain(`Site: Site ${fx.slug}`);
    expect(last.body).toContain("Element: T1 — Building A, bay 1 (triangle)");
    expect(last.body).toContain("Value: 1600 µε ± 20.0 µε (1σ), significant at 95 %");
    expect(last.body).toContain("Response (limit): Stop excavation in bay 3.");
    expect(last.body).toContain(`https://epochal.example.test/sites/${fx.slug}/elements/${T1}`);
    // Epoch 4 is 2026-01-09T08:00Z = 09:00 in Berlin (CET, UTC+1).
    expect(last.body).toContain("Time: 2026-01-09 09:00:00 GMT+1 (Europe/Berlin)");
    expect(last.body).toContain(CAUTION_TEXT);

    // A later rise opens a new alert: one alert per rule and element while the condition lasts.
    const ep = await addEpoch(db, fx, { [T1]: { greenMax: 800 } });
    await evaluateAlerts(db, fx.siteId, [ep], opts);
    expect(await db.alert.count({ where: { ruleId: rule.id } })).toBe(2);
  });

  it("evaluateAlerts: a value wobbling around the alert level within the hysteresis does not flap", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx);
    const T2 = fx.triangles[1];
    for (const ue of [760, 715, 790, 712, 745, 751, 705]) {
      const ep = await addEpoch(db, fx, { [T2]: { greenMax: ue } });
      await evaluateAlerts(db, fx.siteId, [ep], opts);
    }
    const alerts = await db.alert.findMany({ where: { ruleId: rule.id } });
    expect(alerts).toHaveLength(1);
    expect(alerts[0].level).toBe("alert");
    expect(alerts[0].clearedAt).toBeNull();
    expect(alerts[0].value).toBeCloseTo(705 * UE, 12);
    expect(await eventsOf(alerts[0].id)).toEqual([["open", "alert"]]);
  });

  it("evaluateAlerts: with significantOnly, a non-significant crossing is a recorded watch (no mail), a significant one opens; a non-significant rise is held", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    await db.mailRecipient.create({ data: { siteId: fx.siteId, email: "eng@example.test" } });
    const T1 = fx.triangles[0];
    // 800 ± 500 µε: |800| ≤ 1.96·500 = 980, not significant.
    let ep = await addEpoch(db, fx, { [T1]: { greenMax: 800, sigmaGreenMax: 500 } });
    let r = await evaluateAlerts(db, fx.siteId, [ep], opts);
    expect(r.transitions.map((t) => t.transition)).toEqual([{ kind: "watch", level: "alert" }]);
    let a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    expect(a.isSignificant).toBe(false);
    expect(await db.mailMessage.count({ where: { siteId: fx.siteId } })).toBe(0);

    ep = await addEpoch(db, fx, { [T1]: { greenMax: 600, sigmaGreenMax: 20 } });
    await evaluateAlerts(db, fx.siteId, [ep], opts);
    a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    expect(a.isSignificant).toBe(true);
    expect(a.level).toBe("review");

    // 1600 ± 1000: not significant, the level stays review; the crossing is recorded.
    ep = await addEpoch(db, fx, { [T1]: { greenMax: 1600, sigmaGreenMax: 1000 } });
    r = await evaluateAlerts(db, fx.siteId, [ep], opts);
    expect(r.transitions.map((t) => t.transition)).toEqual([{ kind: "held", level: "review", wouldBe: "limit" }]);
    a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    expect(a.level).toBe("review");
    expect(await eventsOf(a.id)).toEqual([
      ["not-significant", "alert"],
      ["open", "review"],
      ["not-significant", "limit"],
    ]);
    expect(await db.mailMessage.count({ where: { siteId: fx.siteId } })).toBe(1);

    // The same values with significantOnly=false open and escalate.
    const fx2 = await createSite(db);
    await createGreenMaxRule(db, fx2, { elementIds: [fx2.triangles[0]], significantOnly: false });
    const ep2 = await addEpoch(db, fx2, { [fx2.triangles[0]]: { greenMax: 800, sigmaGreenMax: 500 } });
    const r2 = await evaluateAlerts(db, fx2.siteId, [ep2], opts);
    expect(r2.transitions.map((t) => t.transition)).toEqual([{ kind: "open", level: "alert" }]);
  });

  it("evaluateAlerts: evaluating the same epochs again, or twice at once, never opens a second alert nor a second mail", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx);
    await db.mailRecipient.create({ data: { siteId: fx.siteId, email: "eng@example.test" } });
    const [T1, T2] = fx.triangles;
    const e1 = await addEpoch(db, fx, { [T1]: { greenMax: 900 }, [T2]: { greenMax: 100 } });
    const e2 = await addEpoch(db, fx, { [T1]: { greenMax: 1700 }, [T2]: { greenMax: 1700 } });
    const results = await Promise.all([evaluateAlerts(db, fx.siteId, [e1, e2], opts), evaluateAlerts(db, fx.siteId, [e2, e1], opts)]);
    expect(results.map((r) => r.transitions.length).sort()).toEqual([0, 3]);
    await evaluateAlerts(db, fx.siteId, [e1, e2], opts);
    const alerts = await db.alert.findMany({ where: { ruleId: rule.id }, orderBy: { elementId: "asc" } });
    expect(alerts.map((a) => [a.elementId, a.level])).toEqual([
      [T1, "limit"],
      [T2, "limit"],
    ]);
    expect(await db.mailMessage.count({ where: { siteId: fx.siteId } })).toBe(3);
  });

  it("evaluateAlerts: degenerate results and missing rows change nothing", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    const T1 = fx.triangles[0];
    await evaluateAlerts(db, fx.siteId, [await addEpoch(db, fx, { [T1]: { greenMax: 900 } })], opts);
    const r = await evaluateAlerts(db, fx.siteId, [await addEpoch(db, fx, { [T1]: { status: "degenerate" } }), await addEpoch(db, fx, {})], opts);
    expect(r.transitions.length).toBe(0);
    const a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    expect(a.level).toBe("alert");
    expect(a.clearedAt).toBeNull();
  });

  it("evaluateAlerts: a rate rule compares the change per day between consecutive epochs", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]], quantity: "greenMax.ratePerDay" });
    const T1 = fx.triangles[0];
    const kinds: string[] = [];
    for (const ue of [0, 600, 1400, 1400]) {
      const r = await evaluateAlerts(db, fx.siteId, [await addEpoch(db, fx, { [T1]: { greenMax: ue } })], opts);
      kinds.push(r.transitions.map((t) => t.transition.kind).join(",") || "-");
    }
    // Rates 600, 800 and 0 µε/day against 500 / 750 / 1500 µε/day.
    expect(kinds).toEqual(["-", "open", "escalate", "clear"]);
    const a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    expect(a.peakLevel).toBe("alert");
  });

  it("acknowledgeAlert stops escalation mails but the escalation and the acknowledgement stay in the record", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    await db.mailRecipient.create({ data: { siteId: fx.siteId, email: "eng@example.test" } });
    const T1 = fx.triangles[0];
    await evaluateAlerts(db, fx.siteId, [await addEpoch(db, fx, { [T1]: { greenMax: 550 } })], opts);
    const a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    const actor = { kind: "user", label: "user:eng@example.test" };
    await expect(acknowledgeAlert(fx.siteId, a.id, "   ", actor)).rejects.toMatchObject({ code: "invalid" });
    await expect(acknowledgeAlert(fx.siteId, a.id, "seen", { kind: "token", label: "token:x" })).rejects.toMatchObject({ code: "forbidden" });
    const acked = await acknowledgeAlert(fx.siteId, a.id, "Inspected, hairline crack at gridline 3.", actor);
    expect(acked.alert.acknowledgedBy).toBe("user:eng@example.test");
    await evaluateAlerts(db, fx.siteId, [await addEpoch(db, fx, { [T1]: { greenMax: 1600 } })], opts);
    expect(await eventsOf(a.id)).toEqual([
      ["open", "review"],
      ["acknowledge", "review"],
      ["escalate", "limit"],
    ]);
    expect(await db.mailMessage.count({ where: { siteId: fx.siteId } })).toBe(1);
    const audit = await db.auditEntry.findMany({ where: { siteId: fx.siteId, action: "alert.acknowledge" } });
    expect(audit.map((x) => x.actor)).toEqual(["user:eng@example.test"]);
  });
});

describe("rules service", () => {
  const actor = { label: "user:lead@example.test" };

  it("createRule from a preset takes the literature levels; every change is audited; disabling closes open alerts", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const rule = await createRule(fx.siteId, { name: "Bldg A", preset: "building-tensile-strain", elementIds: fx.triangles }, actor);
    expect([rule.quantity, rule.reviewLevel, rule.alertLevel, rule.limitLevel]).toEqual(["greenMax", 0.0005, 0.00075, 0.0015]);
    expect(rule.preset).toBe("building-tensile-strain");
    expect(rule.responseLimit).not.toBe("");
    await evaluateAlerts(db, fx.siteId, [await addEpoch(db, fx, { [fx.triangles[0]]: { greenMax: 900 } })], opts);
    const edited = await updateRule(fx.siteId, rule.id, { limitLevel: 0.002, responseLimit: "Stop and call the client." }, actor);
    expect(edited.limitLevel).toBe(0.002);
    const disabled = await updateRule(fx.siteId, rule.id, { enabled: false }, actor);
    expect(disabled.enabled).toBe(false);
    const a = await db.alert.findFirstOrThrow({ where: { ruleId: rule.id } });
    expect(a.clearedAt).not.toBeNull();
    expect((await eventsOf(a.id)).map((e) => e[0])).toEqual(["open", "rule-disabled"]);
    const audit = await db.auditEntry.findMany({ where: { siteId: fx.siteId, entityType: "TriggerRule" }, orderBy: { id: "asc" } });
    expect(audit.map((x) => [x.action, x.actor])).toEqual([
      ["rule.create", actor.label],
      ["rule.update", actor.label],
      ["rule.disable", actor.label],
    ]);
    expect(await db.triggerRule.count({ where: { id: rule.id } })).toBe(1);
  });

  it("createRule refuses levels that do not rise, elements of another site and a quantity the element kind lacks", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const other = await createSite(db);
    const base = { name: "r", quantity: "greenMax", reviewLevel: 0.001, alertLevel: 0.002, limitLevel: 0.003 };
    await expect(createRule(fx.siteId, { ...base, alertLevel: 0.0005, elementIds: fx.triangles }, actor)).rejects.toMatchObject({ code: "invalid" });
    await expect(createRule(fx.siteId, { ...base, elementIds: [other.triangles[0]] }, actor)).rejects.toMatchObject({ code: "invalid" });
    await expect(createRule(fx.siteId, { ...base, quantity: "engineering", elementIds: fx.triangles }, actor)).rejects.toMatchObject({ code: "invalid" });
    await expect(createRule(fx.siteId, { name: "r", elementIds: fx.triangles }, actor)).rejects.toMatchObject({ code: "invalid" });
    const ok = await createRule(fx.siteId, { ...base, quantity: "engineering", elementIds: [fx.baseline] }, actor);
    expect(ok.quantity).toBe("engineering");
    await expect(updateRule(fx.siteId, ok.id, { limitLevel: 0.0001 }, actor)).rejects.toMatchObject({ code: "invalid" });
    await expect(updateRule(other.siteId, ok.id, { name: "x" }, actor)).rejects.toMatchObject({ code: "not_found" });
  });
});
