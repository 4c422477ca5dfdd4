/**
 * Calls every API route handler in-process with every kind of caller and checks 401 (no
 * credentials), 403 (not allowed) or success, as test/support/access-table.ts says. A route
 * file under app/api without a row for one of its methods fails the first test.
 */
import { describe, expect, it, beforeAll } from "vitest";
import { readdirSync } from "node:fs";
import { join, relative, resolve } from "node:path";
import { getDb } from "../../../lib/server/db/client.ts";
import { hashPassword } from "../../../lib/server/auth/password.ts";
import { createSession } from "../../../lib/server/auth/sessions.ts";
import { hashSecret, SESSION_COOKIE } from "../../../lib/server/auth/secrets.ts";
import { uniqueSlug } from "../../support/unique.ts";
import { ACCESS_TABLE, CALLERS, METHODS, buildRequest, expectedOutcome, isOk, type AccessFixture, type AccessRow, type Caller } from "../../support/access-table.ts";

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

function routeFiles(dir: string): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...routeFiles(p));
    else if (e.name === "route.ts") out.push(p);
  }
  return out;
}

const appDir = resolve("app");
const files = routeFiles(join(appDir, "api"));
const routeOf = (file: string) => "/" + relative(appDir, file).replace(/\\/g, "/").replace(/\/route\.ts$/, "");
const modules = new Map<string, Record<string, unknown>>();

async function loadModules(): Promise<void> {
  for (const f of files) if (!modules.has(routeOf(f))) modules.set(routeOf(f), (await import(f)) as Record<string, unknown>);
}

const PASSWORD = "access-table password";
let hash = "";
let site: { id: number; slug: string };
let otherSite: { id: number; slug: string };
let signInUser: { id: number; email: string };
let n = 0;
const unique = (p: string) => `${p}-${uniqueSlug("x")}-${++n}`;

beforeAll(async () => {
  await loadModules();
  const db = getDb();
  hash = await hashPassword(PASSWORD);
  site = await db.site.create({ data: { slug: uniqueSlug("acc"), name: "Access A", timeZone: "UTC" }, select: { id: true, slug: true } });
  otherSite = await db.site.create({ data: { slug: uniqueSlug("acc-other"), name: "Access B", timeZone: "UTC" }, select: { id: true, slug: true } });
  signInUser = await db.user.create({ data: { email: `${unique("signin")}@example.test`, name: "Sign-in fixture", passwordHash: hash }, select: { id: true, email: true } });
});

/** Credentials for one call: a fresh user (and session) or a fresh token, so calls cannot disturb each other. */
async function credentialsFor(caller: Caller): Promise<{ cookie?: string; bearer?: string; userId: number | null }> {
  const db = getDb();
  if (caller.kind === "anonymous") return { userId: null };
  if (caller.kind === "token") {
    const secret = `ept_${unique("t")}`;
    await db.apiToken.create({ data: { siteId: caller.onOtherSite ? otherSite.id : site.id, scope: caller.scope, tokenHash: hashSecret(secret), prefix: secret.slice(0, 12) } });
    return { bearer: secret, userId: null };
  }
  const u = await db.user.create({ data: { email: `${unique(caller.kind)}@example.test`, name: caller.name, passwordHash: hash, isAdmin: caller.kind === "global-admin" } });
  if (caller.kind === "member") await db.membership.create({ data: { userId: u.id, siteId: caller.onOtherSite ? otherSite.id : site.id, role: caller.role } });
  const s = await createSession(u.id);
  return { cookie: `${SESSION_COOKIE}=${encodeURIComponent(s.secret)}`, userId: u.id };
}

describe("access table coverage", () => {
  it("every method exported by every app/api/**/route.ts has a row in the access table", async () => {
    await loadModules();
    const missing: string[] = [];
    for (const [route, mod] of modules)
      for (const m of METHODS) if (typeof mod[m] === "function" && !ACCESS_TABLE.some((r) => r.route === route && r.method === m)) missing.push(`${m} ${route}`);
    expect(missing, "add a row to test/support/access-table.ts for each of these").toEqual([]);
  });

  it("every row of the access table names an existing route and method", async () => {
    await loadModules();
    const stale = ACCESS_TABLE.filter((r) => typeof modules.get(r.route)?.[r.method] !== "function").map((r) => `${r.method} ${r.route}`);
    expect(stale).toEqual([]);
  });
});

const rows = ACCESS_TABLE.map((r) => [`${r.method} ${r.route}`, r] as [string, AccessRow]);

describe.each(rows)("%s", (_label, row) => {
  it.each(CALLERS.map((c) => [c.name, c] as [string, Caller]))("called as %s answers as the table expects", async (_name, caller) => {
    const mod = modules.get(row.route);
    const handler = mod?.[row.method] as Handler | undefined;
    if (!handler) throw new Error(`no handler ${row.method} ${row.route}`);
    const cred = await credentialsFor(caller);
    const fx: AccessFixture = { db: getDb(), site, signInUser, password: PASSWORD, callerUserId: cred.userId, unique };
    const { request, params } = await buildRequest(row, fx, { baseUrl: "http://localhost", cookie: cred.cookie, bearer: cred.bearer });
    const res = await handler(request, { params: Promise.resolve(params) });
    const expected = expectedOutcome(row.access, caller);
    const text = await res.text();
    if (expected === "ok") expect(isOk(row, res.status), `status ${res.status}: ${text.slice(0, 300)}`).toBe(true);
    else expect(res.status, text.slice(0, 300)).toBe(expected);
  });
});
