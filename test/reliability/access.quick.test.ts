/**
 * The access table (test/support/access-table.ts) over HTTP against the production build: every
 * API route and method, called without credentials, as each site role (signed in through
 * POST /api/v1/session, the real session cookie sent back), as a role on another site only, as a
 * global administrator and with API tokens; state-changing requests carry the Origin header a
 * browser sends. Each answer must be 401, 403 or success as the table says.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { useServer } from "./support/harness.ts";
import { addMembership, cheapHash, createToken, createUser, printFigures, signIn, uniqueSlug } from "./support/fixtures.ts";
import { ACCESS_TABLE, CALLERS, buildRequest, expectedOutcome, isOk, type AccessFixture, type AccessRow, type Caller } from "../support/access-table.ts";
import type { Db } from "../../lib/server/db/client.ts";

const h = useServer("access");
const PASSWORD = "access over http password";
let hash = "";
let db: Db;
let site: { id: number; slug: string };
let otherSite: { id: number; slug: string };
let signInUser: { id: number; email: string };
let n = 0;
const unique = (p: string) => `${p}-${uniqueSlug("h")}-${++n}`;
const tally = { calls: 0, allowed: 0, denied401: 0, denied403: 0 };

beforeAll(async () => {
  // The table's factories write with a Prisma client: point this process's client at the server's database.
  process.env.DATABASE_URL = h.db.url;
  db = (await import("../../lib/server/db/client.ts")).getDb();
  hash = await cheapHash(PASSWORD);
  const mk = async (name: string) => {
    const slug = uniqueSlug("acc");
    const r = await h.pool.query<{ id: number }>(`insert into "Site"(slug, name, "timeZone") values ($1, $2, 'UTC') returning id`, [slug, name]);
    return { id: r.rows[0].id, slug };
  };
  site = await mk("Access A");
  otherSite = await mk("Access B");
  const email = `${unique("signin")}@example.test`;
  signInUser = { id: await createUser(h.pool, { email, passwordHash: hash }), email };
});

/** A fresh user signed in over HTTP (POST /api/v1/session), or a fresh token. */
async function credentialsFor(caller: Caller): Promise<{ cookie?: string; bearer?: string; userId: number | null }> {
  if (caller.kind === "anonymous") return { userId: null };
  if (caller.kind === "token") return { bearer: await createToken(h.pool, caller.onOtherSite ? otherSite.id : site.id, caller.scope), userId: null };
  const email = `${unique(caller.kind)}@example.test`;
  const id = await createUser(h.pool, { email, passwordHash: hash, isAdmin: caller.kind === "global-admin", name: caller.name });
  if (caller.kind === "member") await addMembership(h.pool, id, caller.onOtherSite ? otherSite.id : site.id, caller.role);
  return { cookie: await signIn(h.server.baseUrl, email, PASSWORD), userId: id };
}

// One signed-in user per caller kind, reused across rows; rows that end or change the caller's
// session (sign-out, password change) get a fresh one.
const cached = new Map<string, Promise<{ cookie?: string; bearer?: string; userId: number | null }>>();
const ENDS_SESSION = new Set(["DELETE /api/v1/session", "POST /api/v1/me/password"]);
function credentialsForRow(row: AccessRow, caller: Caller) {
  if (caller.kind === "token" || caller.kind === "anonymous" || ENDS_SESSION.has(`${row.method} ${row.route}`)) return credentialsFor(caller);
  if (!cached.has(caller.name)) cached.set(caller.name, credentialsFor(caller));
  return cached.get(caller.name) as Promise<{ cookie?: string; bearer?: string; userId: number | null }>;
}

const rows = ACCESS_TABLE.map((r) => [`${r.method} ${r.route}`, r] as [string, AccessRow]);

describe.each(rows)("HTTP %s", (_label, row) => {
  it.each(CALLERS.map((c) => [c.name, c] as [string, Caller]))("called as %s over HTTP answers as the access table expects", async (_name, caller) => {
    const cred = await credentialsForRow(row, caller);
    const fx: AccessFixture = { db, site, signInUser, password: PASSWORD, callerUserId: cred.userId, unique };
    const { request } = await buildRequest(row, fx, { baseUrl: h.server.baseUrl, cookie: cred.cookie, bearer: cred.bearer });
    const headers = new Headers(request.headers);
    headers.delete("host"); // fetch sends the real one, which equals the Origin's host
    const res = await fetch(request.url, { method: request.method, headers, body: request.body ? await request.text() : undefined, redirect: "manual" });
    const text = await res.text();
    const expected = expectedOutcome(row.access, caller);
    tally.calls++;
    if (expected === "ok") {
      tally.allowed++;
      expect(isOk(row, res.status), `status ${res.status}: ${text.slice(0, 300)}`).toBe(true);
    } else {
      if (expected === 401) tally.denied401++;
      else tally.denied403++;
      expect(res.status, text.slice(0, 300)).toBe(expected);
    }
  });
});

describe("access over HTTP, summary", () => {
  it("a cookie-authenticated state-changing request without Origin, or from another origin, is refused 403", async () => {
    const cred = await credentialsFor({ kind: "global-admin", name: "global administrator" });
    const url = `${h.server.baseUrl}/api/v1/sites/${site.slug}/tokens`;
    const body = JSON.stringify({ scope: "read", name: "csrf probe" });
    const none = await fetch(url, { method: "POST", headers: { cookie: cred.cookie as string, "content-type": "application/json" }, body });
    const cross = await fetch(url, { method: "POST", headers: { cookie: cred.cookie as string, "content-type": "application/json", origin: "http://evil.example" }, body });
    expect([none.status, cross.status]).toEqual([403, 403]);
    printFigures("access table over HTTP", { rows: ACCESS_TABLE.length, callers: CALLERS.length, ...tally });
  });
});
