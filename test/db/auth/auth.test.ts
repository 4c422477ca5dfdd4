/**
 * Sign-in, sessions, rate limiting, tokens across sites and the audit trail, through the route
 * handlers and services against the real database.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { hashPassword } from "../../../lib/server/auth/password.ts";
import { createSession } from "../../../lib/server/auth/sessions.ts";
import { hashSecret, SESSION_COOKIE } from "../../../lib/server/auth/secrets.ts";
import { MAX_FAILURES_PER_ADDRESS, MAX_FAILURES_PER_EMAIL } from "../../../lib/server/auth/signin.ts";
import { createToken, listTokens, revokeToken } from "../../../lib/server/auth/tokens.ts";
import { siteRoute, userFromSessionSecret } from "../../../lib/server/http/route.ts";
import { createUser, grantRole, updateUser } from "../../../lib/server/users.ts";
import { recordAudit } from "../../../lib/server/audit.ts";
import * as sessionRoute from "../../../app/api/v1/session/route.ts";
import * as meRoute from "../../../app/api/v1/me/route.ts";
import * as passwordRoute from "../../../app/api/v1/me/password/route.ts";
import * as auditCsvRoute from "../../../app/api/v1/audit.csv/route.ts";
import { uniqueSlug } from "../../support/unique.ts";

const PASSWORD = "a good long password";
let hash = "";
let n = 0;
const email = (p: string) => `${p}-${uniqueSlug("u")}-${++n}@example.test`;
const noParams = { params: Promise.resolve({}) };

beforeAll(async () => {
  hash = await hashPassword(PASSWORD);
});

async function newUser(opts: { isAdmin?: boolean } = {}) {
  return getDb().user.create({ data: { email: email("user"), name: "Test user", passwordHash: hash, isAdmin: opts.isAdmin ?? false } });
}

function signInRequest(body: unknown, address: string, headers: Record<string, string> = {}): Request {
  return new Request("http://localhost/api/v1/session", {
    method: "POST",
    headers: { "content-type": "application/json", host: "localhost", origin: "http://localhost", "x-forwarded-for": address, ...headers },
    body: JSON.stringify(body),
  });
}

function withSession(url: string, secret: string, init: RequestInit = {}): Request {
  const headers = new Headers(init.headers);
  headers.set("cookie", `${SESSION_COOKIE}=${encodeURIComponent(secret)}`);
  headers.set("host", "localhost");
  headers.set("origin", "http://localhost");
  return new Request(`http://localhost${url}`, { ...init, headers });
}

function cookieSecret(res: Response): string {
  const sc = res.headers.get("set-cookie") ?? "";
  const m = new RegExp(`${SESSION_COOKIE}=([^;]*)`).exec(sc);
  return m ? decodeURIComponent(m[1]) : "";
}

let addrN = 0;
const freshAddress = () => `203.0.113.${(process.pid % 200) + 1}-${Date.now().toString(36)}-${++addrN}`;

describe("POST /api/v1/session (sign in)", () => {
  it("signs in with the right password: 200, an http-only SameSite=Lax cookie without Secure on http, only the hash stored", async () => {
    const u = await newUser();
    const res = await sessionRoute.POST(signInRequest({ email: u.email.toUpperCase(), password: PASSWORD }, freshAddress()), noParams);
    expect(res.status).toBe(200);
    const sc = res.headers.get("set-cookie") ?? "";
    expect(sc).toContain("HttpOnly");
    expect(sc).toContain("SameSite=Lax");
    expect(sc).not.toContain("Secure");
    const secret = cookieSecret(res);
    expect(secret).toMatch(/^eps_/);
    const db = getDb();
    expect(await db.session.findUnique({ where: { id: secret } })).toBeNull();
    const row = await db.session.findUnique({ where: { id: hashSecret(secret) } });
    expect(row?.userId).toBe(u.id);
    expect(JSON.stringify(await res.json())).not.toContain(secret);
  });

  it("sets Secure on the cookie when the request is https", async () => {
    const u = await newUser();
    const req = new Request("https://monitor.example/api/v1/session", {
      method: "POST",
      headers: { "content-type": "application/json", host: "monitor.example", origin: "https://monitor.example", "x-forwarded-for": freshAddress() },
      body: JSON.stringify({ email: u.email, password: PASSWORD }),
    });
    const res = await sessionRoute.POST(req, noParams);
    expect(res.status).toBe(200);
    expect(res.headers.get("set-cookie")).toMatch(/; Secure/);
  });

  it("answers 401 with one message for a wrong password, an unknown e-mail and a disabled account", async () => {
    const u = await newUser();
    const d = await newUser();
    await updateUser(d.id, { disabled: true }, "test");
    const a = await sessionRoute.POST(signInRequest({ email: u.email, password: "wrong password!" }, freshAddress()), noParams);
    const b = await sessionRoute.POST(signInRequest({ email: email("nobody"), password: PASSWORD }, freshAddress()), noParams);
    const c = await sessionRoute.POST(signInRequest({ email: d.email, password: PASSWORD }, freshAddress()), noParams);
    expect([a.status, b.status, c.status]).toEqual([401, 401, 401]);
    const messages = await Promise.all([a, b, c].map(async (r) => ((await r.json()) as { error: { message: string } }).error.message));
    expect(new Set(messages).size).toBe(1);
  });

  it("refuses a sign-in from another origin with 403 (login CSRF)", async () => {
    const u = await newUser();
    const res = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, freshAddress(), { origin: "https://evil.example" }), noParams);
    expect(res.status).toBe(403);
  });

  it("answers 413 for an oversized body and 415 for a form post", async () => {
    const big = await sessionRoute.POST(signInRequest({ email: "a@b.c", password: "x".repeat(5000) }, freshAddress()), noParams);
    expect(big.status).toBe(413);
    const form = await sessionRoute.POST(
      new Request("http://localhost/api/v1/session", { method: "POST", headers: { "content-type": "application/x-www-form-urlencoded" }, body: "email=a&password=b" }),
      noParams,
    );
    expect(form.status).toBe(415);
  });
});

describe("sign-in rate limit", () => {
  it(`after ${MAX_FAILURES_PER_EMAIL} failures for one e-mail in 15 min answers 429 with Retry-After, even with the right password`, async () => {
    const u = await newUser();
    for (let i = 0; i < MAX_FAILURES_PER_EMAIL; i++) {
      const r = await sessionRoute.POST(signInRequest({ email: u.email, password: `wrong ${i} password` }, freshAddress()), noParams);
      expect(r.status).toBe(401);
    }
    const locked = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, freshAddress()), noParams);
    expect(locked.status).toBe(429);
    const retry = Number(locked.headers.get("retry-after"));
    expect(retry).toBeGreaterThan(14 * 60);
    expect(retry).toBeLessThanOrEqual(15 * 60);
  });

  it("does not count successful sign-ins: 4 failures, then 10 successes still sign in", async () => {
    const u = await newUser();
    for (let i = 0; i < MAX_FAILURES_PER_EMAIL - 1; i++) await sessionRoute.POST(signInRequest({ email: u.email, password: "wrong password" }, freshAddress()), noParams);
    for (let i = 0; i < 10; i++) {
      const r = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, freshAddress()), noParams);
      expect(r.status).toBe(200);
    }
  });

  it("ignores failures older than 15 minutes", async () => {
    const u = await newUser();
    const old = new Date(Date.now() - 16 * 60_000);
    await getDb().signInAttempt.createMany({ data: Array.from({ length: 10 }, () => ({ email: u.email, address: "x", ok: false, at: old })) });
    const r = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, freshAddress()), noParams);
    expect(r.status).toBe(200);
  });

  it(`after ${MAX_FAILURES_PER_ADDRESS} failures from one address (any e-mails) answers 429 to that address only`, async () => {
    const address = freshAddress();
    for (let i = 0; i < MAX_FAILURES_PER_ADDRESS; i++) await getDb().signInAttempt.create({ data: { email: email("spray"), address, ok: false } });
    const u = await newUser();
    const blocked = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, address), noParams);
    expect(blocked.status).toBe(429);
    expect(Number(blocked.headers.get("retry-after"))).toBeGreaterThan(0);
    const elsewhere = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, freshAddress()), noParams);
    expect(elsewhere.status).toBe(200);
  });
});

describe("sessions", () => {
  it("an expired session is refused: userFromSessionSecret null, GET /api/v1/me 401", async () => {
    const u = await newUser();
    const s = await createSession(u.id, new Date(Date.now() - 13 * 3_600_000));
    expect(s.expiresAt.getTime()).toBeLessThan(Date.now());
    expect(await userFromSessionSecret(s.secret)).toBeNull();
    const res = await meRoute.GET(withSession("/api/v1/me", s.secret), noParams);
    expect(res.status).toBe(401);
    const fresh = await createSession(u.id);
    expect((await meRoute.GET(withSession("/api/v1/me", fresh.secret), noParams)).status).toBe(200);
  });

  it("DELETE /api/v1/session ends the session and clears the cookie", async () => {
    const u = await newUser();
    const s = await createSession(u.id);
    const res = await sessionRoute.DELETE(withSession("/api/v1/session", s.secret, { method: "DELETE" }), noParams);
    expect(res.status).toBe(204);
    expect(res.headers.get("set-cookie")).toMatch(/Max-Age=0/);
    expect((await meRoute.GET(withSession("/api/v1/me", s.secret), noParams)).status).toBe(401);
  });

  it("a cookie-authenticated POST from another origin is refused with 403 (CSRF)", async () => {
    const u = await newUser();
    const s = await createSession(u.id);
    const req = withSession("/api/v1/me/password", s.secret, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ currentPassword: PASSWORD, newPassword: "another long password" }),
    });
    req.headers.set("origin", "https://evil.example");
    expect((await passwordRoute.POST(req, noParams)).status).toBe(403);
  });

  it("POST /api/v1/me/password changes the password and ends the other sessions, keeping this one", async () => {
    const u = await newUser();
    const here = await createSession(u.id);
    const other = await createSession(u.id);
    const body = JSON.stringify({ currentPassword: PASSWORD, newPassword: "the new long password" });
    const res = await passwordRoute.POST(withSession("/api/v1/me/password", here.secret, { method: "POST", headers: { "content-type": "application/json" }, body }), noParams);
    expect(res.status).toBe(200);
    expect(((await res.json()) as { endedSessions: number }).endedSessions).toBe(1);
    expect((await meRoute.GET(withSession("/api/v1/me", other.secret), noParams)).status).toBe(401);
    expect((await meRoute.GET(withSession("/api/v1/me", here.secret), noParams)).status).toBe(200);
    const oldPw = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, freshAddress()), noParams);
    expect(oldPw.status).toBe(401);
    const newPw = await sessionRoute.POST(signInRequest({ email: u.email, password: "the new long password" }, freshAddress()), noParams);
    expect(newPw.status).toBe(200);
  });

  it("POST /api/v1/me/password with a wrong current password answers 422 and changes nothing", async () => {
    const u = await newUser();
    const s = await createSession(u.id);
    const body = JSON.stringify({ currentPassword: "not the password", newPassword: "the new long password" });
    const res = await passwordRoute.POST(withSession("/api/v1/me/password", s.secret, { method: "POST", headers: { "content-type": "application/json" }, body }), noParams);
    expect(res.status).toBe(422);
    expect((await getDb().user.findUnique({ where: { id: u.id } }))?.passwordHash).toBe(hash);
  });

  it("disabling a user ends their sessions", async () => {
    const u = await newUser();
    const s = await createSession(u.id);
    await updateUser(u.id, { disabled: true }, "test");
    expect(await getDb().session.count({ where: { userId: u.id } })).toBe(0);
    expect(await userFromSessionSecret(s.secret)).toBeNull();
  });
});

describe("API tokens", () => {
  const ingest = siteRoute("ingest", async ({ site, actor }) => Response.json({ site: site.slug, actor: actor.label }));
  const post = (slug: string, secret: string) =>
    ingest(new Request(`http://localhost/api/v1/sites/${slug}/epochs`, { method: "POST", headers: { authorization: `Bearer ${secret}` } }), { params: Promise.resolve({ slug }) });

  it("a token of one site cannot post to another site (403), nor to a site that does not exist (403, no hint)", async () => {
    const db = getDb();
    const a = await db.site.create({ data: { slug: uniqueSlug("tok-a"), name: "A", timeZone: "UTC" } });
    const b = await db.site.create({ data: { slug: uniqueSlug("tok-b"), name: "B", timeZone: "UTC" } });
    const t = await createToken(a.id, "ingest", "logger", "test");
    expect((await post(a.slug, t.secret)).status).toBe(200);
    expect((await post(b.slug, t.secret)).status).toBe(403);
    expect((await post(uniqueSlug("no-such-site"), t.secret)).status).toBe(403);
  });

  it("a read token may not ingest; a revoked or unknown token is 401; last use is recorded", async () => {
    const db = getDb();
    const a = await db.site.create({ data: { slug: uniqueSlug("tok-r"), name: "R", timeZone: "UTC" } });
    const read = await createToken(a.id, "read", "", "test");
    expect((await post(a.slug, read.secret)).status).toBe(403);
    const ing = await createToken(a.id, "ingest", "", "test");
    expect((await listTokens(a.id)).find((x) => x.id === ing.token.id)?.lastUsedAt).toBeNull();
    expect((await post(a.slug, ing.secret)).status).toBe(200);
    expect((await listTokens(a.id)).find((x) => x.id === ing.token.id)?.lastUsedAt).toBeInstanceOf(Date);
    await revokeToken(ing.token.id, "test");
    expect((await post(a.slug, ing.secret)).status).toBe(401);
    expect((await post(a.slug, "ept_made_up")).status).toBe(401);
  });

  it("createToken stores only the hash and a 12-character prefix of the secret", async () => {
    const db = getDb();
    const a = await db.site.create({ data: { slug: uniqueSlug("tok-h"), name: "H", timeZone: "UTC" } });
    const t = await createToken(a.id, "read", "x", "test");
    const row = await db.apiToken.findUniqueOrThrow({ where: { id: t.token.id } });
    expect(row.tokenHash).toBe(hashSecret(t.secret));
    expect(row.prefix).toBe(t.secret.slice(0, 12));
    expect(JSON.stringify(row)).not.toContain(t.secret);
  });
});

describe("audit log", () => {
  it("records user, membership, token and session changes with actor, before and after, and never a secret", async () => {
    const db = getDb();
    const site = await db.site.create({ data: { slug: uniqueSlug("aud"), name: "Audit", timeZone: "UTC" } });
    const actor = `user:${email("boss")}`;
    const u = await createUser({ email: email("audited"), name: "Audited", password: PASSWORD }, actor);
    await grantRole(u.id, site.id, "viewer", actor);
    await grantRole(u.id, site.id, "engineer", actor);
    await grantRole(u.id, site.id, null, actor);
    await updateUser(u.id, { disabled: true }, actor);
    await updateUser(u.id, { disabled: false }, actor);
    const t = await createToken(site.id, "ingest", "logger", actor);
    await revokeToken(t.token.id, actor);
    const signIn = await sessionRoute.POST(signInRequest({ email: u.email, password: PASSWORD }, freshAddress()), noParams);
    const secret = cookieSecret(signIn);
    const pw = await passwordRoute.POST(
      withSession("/api/v1/me/password", secret, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ currentPassword: PASSWORD, newPassword: "a newer long password" }) }),
      noParams,
    );
    expect(pw.status).toBe(200);
    await sessionRoute.DELETE(withSession("/api/v1/session", secret, { method: "DELETE" }), noParams);

    const userRows = await db.auditEntry.findMany({ where: { entityType: "User", entityId: String(u.id) }, orderBy: { id: "asc" } });
    expect(userRows.map((r) => r.action)).toEqual(["user.create", "user.disable", "user.enable", "session.create", "user.password-change", "session.delete"]);
    expect(userRows[0].actor).toBe(actor);
    expect((userRows[1].before as { disabledAt: string | null }).disabledAt).toBeNull();
    expect((userRows[1].after as { disabledAt: string | null }).disabledAt).not.toBeNull();
    const memberRows = await db.auditEntry.findMany({ where: { entityType: "Membership", entityId: `${u.id}:${site.id}` }, orderBy: { id: "asc" } });
    expect(memberRows.map((r) => [r.action, (r.before as { role?: string } | null)?.role ?? null, (r.after as { role?: string } | null)?.role ?? null])).toEqual([
      ["membership.grant", null, "viewer"],
      ["membership.grant", "viewer", "engineer"],
      ["membership.revoke", "engineer", null],
    ]);
    expect(memberRows.every((r) => r.siteId === site.id)).toBe(true);
    const tokenRows = await db.auditEntry.findMany({ where: { entityType: "ApiToken", entityId: String(t.token.id) }, orderBy: { id: "asc" } });
    expect(tokenRows.map((r) => r.action)).toEqual(["token.create", "token.revoke"]);
    expect((tokenRows[1].before as { revokedAt: string | null }).revokedAt).toBeNull();
    const all = JSON.stringify([...userRows, ...memberRows, ...tokenRows], (_k, v: unknown) => (typeof v === "bigint" ? v.toString() : v));
    expect(all).not.toContain(t.secret);
    expect(all).not.toContain(secret);
    expect(all).not.toContain("passwordHash");
    expect(all).not.toContain(PASSWORD);
  });

  it("refuses to update or delete an audit entry through the app (the migration's rules)", async () => {
    const db = getDb();
    await recordAudit(db, { actor: "test", action: "test.write", entityType: "Test", entityId: uniqueSlug("immutable"), after: { v: 1 } });
    const row = await db.auditEntry.findFirstOrThrow({ where: { action: "test.write" }, orderBy: { id: "desc" } });
    // Prisma's update() uses UPDATE … RETURNING, which PostgreSQL refuses outright on a table with DO INSTEAD rules;
    // updateMany() is a plain UPDATE and reaches the rule's own message.
    await expect(db.auditEntry.update({ where: { id: row.id }, data: { actor: "someone else" } })).rejects.toThrow(/RETURNING|append-only/);
    await expect(db.auditEntry.updateMany({ where: { id: row.id }, data: { actor: "someone else" } })).rejects.toThrow(/append-only: update refused/);
    await expect(db.auditEntry.deleteMany({ where: { id: row.id } })).rejects.toThrow(/append-only: delete refused/);
    await expect(db.$executeRawUnsafe(`delete from "AuditEntry" where id = ${row.id}`)).rejects.toThrow(/append-only/);
    expect((await db.auditEntry.findUniqueOrThrow({ where: { id: row.id } })).actor).toBe("test");
  });

  it("recordAudit inside a transaction that fails leaves no audit row", async () => {
    const db = getDb();
    const tag = uniqueSlug("rolled-back");
    await expect(
      db.$transaction(async (tx) => {
        await recordAudit(tx, { actor: "test", action: "test.rollback", entityType: "Test", entityId: tag });
        throw new Error("change failed");
      }),
    ).rejects.toThrow("change failed");
    expect(await db.auditEntry.count({ where: { entityId: tag } })).toBe(0);
  });

  it("GET /api/v1/audit.csv gives administrators the documented columns, ?site= filters; others get 403", async () => {
    const db = getDb();
    const site = await db.site.create({ data: { slug: uniqueSlug("csv"), name: "CSV", timeZone: "UTC" } });
    await recordAudit(db, { actor: "user:x@y", siteId: site.id, action: "element.update", entityType: "Element", entityId: "3", before: { name: "a,b" }, after: { name: "c" } });
    const admin = await newUser({ isAdmin: true });
    const s = await createSession(admin.id);
    const res = await auditCsvRoute.GET(withSession(`/api/v1/audit.csv?site=${site.slug}`, s.secret), noParams);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
    const lines = (await res.text()).trimEnd().split("\r\n");
    expect(lines[0]).toBe("id,at_utc,actor,site,action,entity_type,entity_id,before,after");
    expect(lines).toHaveLength(2);
    expect(lines[1]).toMatch(new RegExp(`^\\d+,\\d{4}-\\d\\d-\\d\\dT[\\d:.]+Z,user:x@y,${site.slug},element.update,Element,3,"{""name"":""a,b""}","{""name"":""c""}"$`));
    const plain = await newUser();
    const ps = await createSession(plain.id);
    expect((await auditCsvRoute.GET(withSession("/api/v1/audit.csv", ps.secret), noParams)).status).toBe(403);
  });
});
