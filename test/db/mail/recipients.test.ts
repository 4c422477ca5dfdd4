// Mail recipients per site and level: the service, the API routes (validation, permission, audit),
// and that a recipient added through the service gets the next alert's mail over a real SMTP server
// (smtp-server) through the pg-boss queue, as test/db/alerts/mail.test.ts does for seeded rows.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { runAlerting } from "../../../lib/server/alerts/evaluate.ts";
import { startMailWorker, stopMailWorker } from "../../../lib/server/mail/queue.ts";
import { addRecipient, listRecipients, removeRecipient, updateRecipient } from "../../../lib/server/mail/recipients.ts";
import { RecipientCreateBody } from "../../../lib/server/schemas/recipients.ts";
import * as list from "../../../app/api/v1/sites/[slug]/recipients/route.ts";
import * as one from "../../../app/api/v1/sites/[slug]/recipients/[id]/route.ts";
import { call, sessionFor } from "../elements/fixtures.ts";
import { addEpoch, createGreenMaxRule, createSite, mailSubject, mailText, startSmtp, waitFor } from "../alerts/fixtures.ts";

const ENGINEER = { label: "user:engineer@example.test" };

async function auditOf(siteId: number, entityId: number) {
  const rows = await getDb().auditEntry.findMany({ where: { siteId, entityType: "MailRecipient", entityId: String(entityId) }, orderBy: { id: "asc" } });
  return rows.map((r) => ({ action: r.action, actor: r.actor, before: r.before, after: r.after }));
}

describe("mail recipient service", () => {
  it("addRecipient / listRecipients / updateRecipient / removeRecipient change the rows and write one audit row each, with before and after", async () => {
    const fx = await createSite(getDb());
    const a = await addRecipient(fx.siteId, RecipientCreateBody.parse({ email: "  Site.Engineer@Example.TEST ", minLevel: "review" }), ENGINEER);
    const b = await addRecipient(fx.siteId, RecipientCreateBody.parse({ email: "manager@example.test", minLevel: "alert", digest: true }), ENGINEER);
    expect(a).toMatchObject({ email: "site.engineer@example.test", minLevel: "review", digest: false });
    expect((await listRecipients(fx.siteId)).map((r) => [r.email, r.minLevel, r.digest])).toEqual([
      ["manager@example.test", "alert", true],
      ["site.engineer@example.test", "review", false],
    ]);

    const changed = await updateRecipient(fx.siteId, a.id, { minLevel: "limit", digest: true }, ENGINEER);
    expect(changed).toMatchObject({ id: a.id, email: "site.engineer@example.test", minLevel: "limit", digest: true });
    // Only the given field changes.
    expect(await updateRecipient(fx.siteId, a.id, { digest: false }, ENGINEER)).toMatchObject({ minLevel: "limit", digest: false });

    const removed = await removeRecipient(fx.siteId, b.id, ENGINEER);
    expect(removed.email).toBe("manager@example.test");
    expect((await listRecipients(fx.siteId)).map((r) => r.id)).toEqual([a.id]);

    const trailA = await auditOf(fx.siteId, a.id);
    expect(trailA.map((t) => t.action)).toEqual(["recipient.create", "recipient.update", "recipient.update"]);
    expect(trailA.every((t) => t.actor === ENGINEER.label)).toBe(true);
    expect(trailA[0].before).toBeNull();
    expect(trailA[0].after).toMatchObject({ email: "site.engineer@example.test", minLevel: "review", digest: false });
    expect(trailA[1].before).toMatchObject({ minLevel: "review", digest: false });
    expect(trailA[1].after).toMatchObject({ minLevel: "limit", digest: true });
    const trailB = await auditOf(fx.siteId, b.id);
    expect(trailB.map((t) => t.action)).toEqual(["recipient.create", "recipient.delete"]);
    expect(trailB[1].before).toMatchObject({ email: "manager@example.test", minLevel: "alert", digest: true });
    expect(trailB[1].after).toBeNull();
  });

  it("refuses an address already on the site whatever its case, and a recipient of another site, without writing", async () => {
    const db = getDb();
    const fx = await createSite(db);
    const other = await createSite(db);
    // A row written before the addresses were kept in lower case (as the seed could).
    const old = await db.mailRecipient.create({ data: { siteId: fx.siteId, email: "Old.Style@Example.test" } });
    await expect(addRecipient(fx.siteId, RecipientCreateBody.parse({ email: "old.style@example.test" }), ENGINEER)).rejects.toMatchObject({
      code: "conflict",
      errors: [{ field: "email" }],
    });
    await expect(updateRecipient(other.siteId, old.id, { digest: true }, ENGINEER)).rejects.toMatchObject({ code: "not_found" });
    await expect(removeRecipient(other.siteId, old.id, ENGINEER)).rejects.toMatchObject({ code: "not_found" });
    expect(await db.mailRecipient.count({ where: { siteId: fx.siteId } })).toBe(1);
    expect(await db.auditEntry.count({ where: { entityType: "MailRecipient", entityId: String(old.id) } })).toBe(0);
  });
});

describe("/api/v1/sites/{slug}/recipients", () => {
  let fx: Awaited<ReturnType<typeof createSite>>;
  let engineer: string;
  let viewer: string;
  beforeAll(async () => {
    fx = await createSite(getDb());
    engineer = await sessionFor(fx.siteId, "engineer");
    viewer = await sessionFor(fx.siteId, "viewer");
  });
  const post = (cookie: string, body: unknown) => call(list.POST, { method: "POST", path: "/x", params: { slug: fx.slug }, cookie, body });
  const patch = (cookie: string, id: number, body: unknown) => call(one.PATCH, { method: "PATCH", path: "/x", params: { slug: fx.slug, id: String(id) }, cookie, body });
  const del = (cookie: string, id: number) => call(one.DELETE, { method: "DELETE", path: "/x", params: { slug: fx.slug, id: String(id) }, cookie });

  it("POST adds (201), GET lists, PATCH changes the level and digest flag, DELETE removes; each change audited as the signed-in user", async () => {
    const c = await post(engineer, { email: "crew@example.test", minLevel: "alert" });
    expect(c.status).toBe(201);
    const r = c.json.recipient as { id: number; email: string; minLevel: string; digest: boolean };
    expect(r).toMatchObject({ email: "crew@example.test", minLevel: "alert", digest: false });
    const g = await call(list.GET, { method: "GET", path: "/x", params: { slug: fx.slug }, cookie: engineer });
    expect(g.status).toBe(200);
    expect(g.json.recipients).toEqual([{ id: r.id, siteId: fx.siteId, email: "crew@example.test", minLevel: "alert", digest: false }]);
    const p = await patch(engineer, r.id, { minLevel: "limit", digest: true });
    expect(p.status).toBe(200);
    expect(p.json.recipient).toMatchObject({ minLevel: "limit", digest: true });
    const d = await del(engineer, r.id);
    expect(d.status).toBe(200);
    expect(await getDb().mailRecipient.count({ where: { id: r.id } })).toBe(0);
    const trail = await auditOf(fx.siteId, r.id);
    expect(trail.map((t) => t.action)).toEqual(["recipient.create", "recipient.update", "recipient.delete"]);
    expect(new Set(trail.map((t) => t.actor)).size).toBe(1);
    expect(trail[0].actor).toMatch(/^user:.+@example\.test$/);
  });

  it("answers 422 naming the field for a bad address, level or digest flag, an unknown field and an empty change; 409 naming email for a duplicate", async () => {
    const field = async (res: Promise<{ status: number; json: Record<string, unknown> }>) => {
      const r = await res;
      return [r.status, (r.json.errors as { field: string | null }[] | undefined)?.map((e) => e.field)];
    };
    expect(await field(post(engineer, { email: "not an address" }))).toEqual([422, ["email"]]);
    expect(await field(post(engineer, { email: "x@example.test", minLevel: "warning" }))).toEqual([422, ["minLevel"]]);
    expect(await field(post(engineer, { email: "x@example.test", digest: "yes" }))).toEqual([422, ["digest"]]);
    expect(await field(post(engineer, { minLevel: "review" }))).toEqual([422, ["email"]]);
    const unknown = await post(engineer, { email: "x@example.test", level: "alert" });
    expect(unknown.status).toBe(422);
    expect(String((unknown.json.error as { message: string }).message)).toContain("level");
    const made = await post(engineer, { email: "twice@example.test" });
    expect(made.status).toBe(201);
    expect(await field(post(engineer, { email: "TWICE@example.test" }))).toEqual([409, ["email"]]);
    const id = (made.json.recipient as { id: number }).id;
    expect(await field(patch(engineer, id, { minLevel: "high" }))).toEqual([422, ["minLevel"]]);
    expect((await patch(engineer, id, {})).status).toBe(422);
    expect((await patch(engineer, id, { email: "new@example.test" })).status).toBe(422);
    expect((await patch(engineer, 2_000_000_000, { digest: true })).status).toBe(404);
    // Nothing was written by the refused calls: one recipient, one audit row.
    expect((await listRecipients(fx.siteId)).map((r) => r.email)).toEqual(["twice@example.test"]);
    expect((await auditOf(fx.siteId, id)).map((t) => t.action)).toEqual(["recipient.create"]);
  });

  it("refuses a viewer (403) for every method, and anyone signed out (401), without writing", async () => {
    const db = getDb();
    const r = await db.mailRecipient.create({ data: { siteId: fx.siteId, email: "kept@example.test" } });
    const before = await db.mailRecipient.count({ where: { siteId: fx.siteId } });
    expect((await call(list.GET, { method: "GET", path: "/x", params: { slug: fx.slug }, cookie: viewer })).status).toBe(403);
    expect((await post(viewer, { email: "viewer-added@example.test" })).status).toBe(403);
    expect((await patch(viewer, r.id, { digest: true })).status).toBe(403);
    expect((await del(viewer, r.id)).status).toBe(403);
    expect((await post("", { email: "anon@example.test" })).status).toBe(401);
    expect(await db.mailRecipient.count({ where: { siteId: fx.siteId } })).toBe(before);
    expect(await db.mailRecipient.findUnique({ where: { id: r.id } })).toMatchObject({ digest: false });
    expect(await auditOf(fx.siteId, r.id)).toEqual([]);
  });
});

describe("a recipient added through the service gets the next alert's mail (real SMTP server)", () => {
  let smtp: Awaited<ReturnType<typeof startSmtp>>;
  beforeAll(async () => {
    smtp = await startSmtp();
    await startMailWorker({
      smtpUrl: `smtp://127.0.0.1:${smtp.port}`,
      from: "epochal@example.test",
      publicUrl: "https://epochal.example.test",
      retryLimit: 8,
      retryDelayS: 1,
      digestMinutes: 60,
      jobsSchema: `pgboss_recipients_${process.pid}`,
    });
  });
  afterAll(async () => {
    await stopMailWorker();
    await smtp.close();
  });

  it("review and alert crossings mail the review recipient twice and the alert recipient once; a removed recipient gets nothing", async () => {
    const db = getDb();
    const fx = await createSite(db);
    await createGreenMaxRule(db, fx, { elementIds: [fx.triangles[0]] });
    const reviewAddr = `review-${fx.slug}@example.test`;
    const alertAddr = `alert-${fx.slug}@example.test`;
    const goneAddr = `gone-${fx.slug}@example.test`;
    await addRecipient(fx.siteId, RecipientCreateBody.parse({ email: reviewAddr }), ENGINEER);
    await addRecipient(fx.siteId, RecipientCreateBody.parse({ email: alertAddr, minLevel: "alert" }), ENGINEER);
    const gone = await addRecipient(fx.siteId, RecipientCreateBody.parse({ email: goneAddr }), ENGINEER);
    await removeRecipient(fx.siteId, gone.id, ENGINEER);

    // 520 µε crosses review (500), 760 µε alert (750): the rule's levels in test/db/alerts/fixtures.ts.
    await runAlerting(fx.siteId, [await addEpoch(db, fx, { [fx.triangles[0]]: { greenMax: 520 } })]);
    await runAlerting(fx.siteId, [await addEpoch(db, fx, { [fx.triangles[0]]: { greenMax: 760 } })]);
    const sentRows = await waitFor("2 mails sent", async () => {
      const rows = await db.mailMessage.findMany({ where: { siteId: fx.siteId }, orderBy: { id: "asc" } });
      return rows.length === 2 && rows.every((r) => r.status === "sent") ? rows : null;
    });
    expect(sentRows.map((r) => r.recipients)).toEqual([[reviewAddr], [alertAddr, reviewAddr].sort()]);
    const to = (addr: string) => smtp.mails.filter((m) => m.to.includes(addr));
    expect(to(reviewAddr).map((m) => mailSubject(m.raw))).toEqual([expect.stringContaining("REVIEW opened"), expect.stringContaining("ALERT escalated from REVIEW")]);
    expect(to(alertAddr).map((m) => mailSubject(m.raw))).toEqual([expect.stringContaining("ALERT escalated from REVIEW")]);
    expect(mailText(to(alertAddr)[0].raw)).toContain("Value: 760 µε ± 20.0 µε (1σ)");
    expect(to(goneAddr)).toEqual([]);
  });
});
