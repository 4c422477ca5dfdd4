/**
 * The access table: every API route and method, who may call it, and a minimal valid request.
 * test/db/auth/access-table.test.ts finds every app/api/**\/route.ts and FAILS for an exported
 * method without a row here; it then calls each row without a session, with each site role, with
 * a role on another site only, as a global administrator and with API tokens, and checks 401 /
 * 403 / success. The reliability suite can run the same rows over HTTP (see `buildRequest`).
 *
 * Adding a row for a new route:
 *   { route: "/api/v1/sites/[slug]/widgets", method: "POST", access: "manage-elements",
 *     body: (fx) => ({ name: fx.unique("w") }) },
 * - `route` is the folder path under app/ (brackets kept), `method` the exported handler.
 * - `access`: "public" (anyone), "user" (any signed-in user, no tokens), "admin" (global
 *   administrators only), or a site Permission (site routes: the caller's role on the site, or a
 *   token of that site whose scope allows it).
 * - `params(fx)` fills the dynamic segments other than [slug] (slug is always fx.site.slug);
 *   it may create rows (it runs once per call, so deleting or revoking handlers get a fresh target).
 * - `body(fx)` is a JSON body; `query` a query string (without "?").
 * - `ok(status)` when success is not 2xx (e.g. a 404 for a deliberately missing entity still shows
 *   the caller got past the permission check). Default: 200–299.
 */
import type { Db } from "../../lib/server/db/client.ts";
import { roleAllows, scopeAllows, type Permission, type Role, type TokenScope } from "../../lib/server/auth/permissions.ts";
import { hashSecret } from "../../lib/server/auth/secrets.ts";

export type Method = "GET" | "POST" | "PUT" | "PATCH" | "DELETE";
export const METHODS: readonly Method[] = ["GET", "POST", "PUT", "PATCH", "DELETE"];

export type Access = "public" | "user" | "admin" | Permission;

/** What a row's factories may use. `db` is a Prisma client on the database the server uses. */
export type AccessFixture = {
  db: Db;
  site: { id: number; slug: string };
  /** A user that exists with password `password` (for sign-in rows). */
  signInUser: { id: number; email: string };
  /** The password of every fixture user, including the caller. */
  password: string;
  /** The calling user's id (null for anonymous or token callers). */
  callerUserId: number | null;
  unique: (prefix: string) => string;
};

export type AccessRow = {
  route: string;
  method: Method;
  access: Access;
  params?: (fx: AccessFixture) => Promise<Record<string, string>> | Record<string, string>;
  body?: (fx: AccessFixture) => unknown;
  query?: string;
  ok?: (status: number) => boolean;
  note?: string;
};

/** Past the permission check: anything but 401/403 and no server error. For rows whose valid body is not written yet. */
export const notDenied = (s: number) => s !== 401 && s !== 403 && s < 500;
const is2xx = (s: number) => s >= 200 && s < 300;

async function freshUser(fx: AccessFixture): Promise<string> {
  const u = await fx.db.user.create({ data: { email: `${fx.unique("victim")}@example.test`, name: "Victim", passwordHash: "$2b$04$invalidinvalidinvalidinvalidinvalidinvalidinvalidinva" } });
  return String(u.id);
}

async function freshToken(fx: AccessFixture): Promise<string> {
  const secret = fx.unique("ept_fixture");
  const t = await fx.db.apiToken.create({ data: { siteId: fx.site.id, scope: "read", tokenHash: hashSecret(secret), prefix: secret.slice(0, 12) } });
  return String(t.id);
}

/** Points AT1–AT3 and one epoch observing them on the fixture site (idempotent). */
async function elementFixture(fx: AccessFixture): Promise<void> {
  const ids: number[] = [];
  for (const [i, code] of ["AT1", "AT2", "AT3"].entries()) {
    const p = await fx.db.point.upsert({ where: { siteId_code: { siteId: fx.site.id, code } }, create: { siteId: fx.site.id, code }, update: {}, select: { id: true } });
    ids[i] = p.id;
  }
  const time = new Date("2001-02-03T04:05:06Z");
  if (await fx.db.epoch.findFirst({ where: { siteId: fx.site.id, time }, select: { id: true } })) return;
  const e = await fx.db.epoch.create({ data: { siteId: fx.site.id, time, contentHash: fx.unique("access-epoch") } });
  const xy = [[0, 0], [10, 0], [5, 8.66]];
  await fx.db.observation.createMany({
    data: ids.map((pointId, i) => ({ epochId: e.id, pointId, east: xy[i][0], north: xy[i][1], height: 0, sigmaEast: 0.001, sigmaNorth: 0.001, sigmaHeight: 0.0015 })),
  });
}

async function freshElement(fx: AccessFixture): Promise<string> {
  await elementFixture(fx);
  const el = await fx.db.element.create({ data: { siteId: fx.site.id, name: fx.unique("el"), kind: "baseline", mode: "slope", pointCodes: ["AT1", "AT2"] } });
  return String(el.id);
}

async function freshRecipient(fx: AccessFixture): Promise<string> {
  const r = await fx.db.mailRecipient.create({ data: { siteId: fx.site.id, email: `${fx.unique("to")}@example.test` } });
  return String(r.id);
}

export const ACCESS_TABLE: AccessRow[] = [
  { route: "/api/health", method: "GET", access: "public" },

  // Sessions and the signed-in user (issue 5).
  { route: "/api/v1/session", method: "POST", access: "public", body: (fx) => ({ email: fx.signInUser.email, password: fx.password }) },
  { route: "/api/v1/session", method: "DELETE", access: "user", ok: (s) => s === 204 },
  { route: "/api/v1/me", method: "GET", access: "user" },
  { route: "/api/v1/me/password", method: "POST", access: "user", body: (fx) => ({ currentPassword: fx.password, newPassword: `${fx.password}-changed` }) },

  // Users (global administrators).
  { route: "/api/v1/users", method: "GET", access: "admin" },
  { route: "/api/v1/users", method: "POST", access: "admin", body: (fx) => ({ email: `${fx.unique("new")}@example.test`, name: "New user", password: "a long enough password" }) },
  { route: "/api/v1/users/[id]", method: "PATCH", access: "admin", params: async (fx) => ({ id: await freshUser(fx) }), body: () => ({ disabled: true }) },
  {
    route: "/api/v1/users/[id]/memberships",
    method: "POST",
    access: "admin",
    params: async (fx) => ({ id: await freshUser(fx) }),
    body: (fx) => ({ site: fx.site.slug, role: "viewer" }),
  },
  { route: "/api/v1/audit.csv", method: "GET", access: "admin" },

  // Site tokens (site administrators).
  { route: "/api/v1/sites/[slug]/tokens", method: "GET", access: "administer" },
  { route: "/api/v1/sites/[slug]/tokens", method: "POST", access: "administer", body: () => ({ scope: "read", name: "access test" }) },
  { route: "/api/v1/sites/[slug]/tokens/[id]", method: "DELETE", access: "administer", params: async (fx) => ({ id: await freshToken(fx) }) },

  // Dashboard, ingest and element routes (other owners: replace `ok: notDenied` by a valid body and the strict default).
  { route: "/api/v1/sites/[slug]/epochs", method: "GET", access: "read", ok: notDenied },
  { route: "/api/v1/sites/[slug]/epochs", method: "POST", access: "ingest", ok: notDenied, note: "owner: add a minimal valid epoch body" },
  { route: "/api/v1/sites/[slug]/points", method: "GET", access: "read", ok: notDenied },
  { route: "/api/v1/sites/[slug]/field", method: "GET", access: "read", ok: notDenied },
  // Live events (issue 10): maxS=0 sends `ready` and closes, so the stream ends and the body can be read.
  { route: "/api/v1/sites/[slug]/events", method: "GET", access: "read", query: "maxS=0" },
  // Elements, series and trends (issue 6): valid requests on the fixture points AT1–AT3 and epoch.
  { route: "/api/v1/sites/[slug]/points/[code]/series", method: "GET", access: "read", params: async (fx) => (await elementFixture(fx), { code: "AT1" }), query: "component=d2D" },
  { route: "/api/v1/sites/[slug]/points/[code]", method: "PATCH", access: "manage-points", params: async (fx) => (await elementFixture(fx), { code: "AT1" }), body: () => ({ note: "access test", group: "access" }) },
  { route: "/api/v1/sites/[slug]/elements", method: "GET", access: "read" },
  {
    route: "/api/v1/sites/[slug]/elements",
    method: "POST",
    access: "manage-elements",
    params: async (fx) => (await elementFixture(fx), {}),
    body: (fx) => ({ name: fx.unique("el"), kind: "baseline", points: ["AT1", "AT2"] }),
  },
  { route: "/api/v1/sites/[slug]/elements/preview-triangulation", method: "POST", access: "manage-elements", params: async (fx) => (await elementFixture(fx), {}), body: () => ({}) },
  { route: "/api/v1/sites/[slug]/elements/[id]", method: "GET", access: "read", params: async (fx) => ({ id: await freshElement(fx) }) },
  { route: "/api/v1/sites/[slug]/elements/[id]", method: "PATCH", access: "manage-elements", params: async (fx) => ({ id: await freshElement(fx) }), body: () => ({ label: "access test" }) },
  { route: "/api/v1/sites/[slug]/elements/[id]", method: "DELETE", access: "manage-elements", params: async (fx) => ({ id: await freshElement(fx) }) },
  { route: "/api/v1/sites/[slug]/elements/[id]/series", method: "GET", access: "read", params: async (fx) => ({ id: await freshElement(fx) }), query: "quantity=engineering" },
  { route: "/api/v1/sites/[slug]/elements/[id]/trend", method: "GET", access: "read", params: async (fx) => ({ id: await freshElement(fx) }), query: "quantity=engineering" },
  // Trigger rules, alerts, outbox (issue 6, alerting).
  { route: "/api/v1/rule-presets", method: "GET", access: "user" },
  { route: "/api/v1/sites/[slug]/rules", method: "GET", access: "read" },
  {
    route: "/api/v1/sites/[slug]/rules",
    method: "POST",
    access: "manage-rules",
    params: async (fx) => ((alertingFixtureElement = await alertingTriangle(fx)), {}),
    body: (fx) => ({ name: fx.unique("rule"), preset: "building-tensile-strain", elementIds: [alertingFixtureElement] }),
  },
  { route: "/api/v1/sites/[slug]/rules/[id]", method: "GET", access: "read", params: async (fx) => ({ id: String((await alertingFixture(fx)).ruleId) }) },
  { route: "/api/v1/sites/[slug]/rules/[id]", method: "PATCH", access: "manage-rules", params: async (fx) => ({ id: String((await alertingFixture(fx)).ruleId) }), body: () => ({ enabled: false }) },
  { route: "/api/v1/sites/[slug]/alerts", method: "GET", access: "read", query: "state=all" },
  { route: "/api/v1/sites/[slug]/alerts/[id]", method: "GET", access: "read", params: async (fx) => ({ id: String((await alertingFixture(fx)).alertId) }) },
  {
    route: "/api/v1/sites/[slug]/alerts/[id]/acknowledge",
    method: "POST",
    access: "acknowledge",
    params: async (fx) => ({ id: String((await alertingFixture(fx)).alertId) }),
    body: () => ({ comment: "access test: seen" }),
  },
  { route: "/api/v1/sites/[slug]/outbox", method: "GET", access: "read" },
  // Mail recipients per site and level (issue 6): the role that edits trigger rules, also to read (addresses).
  { route: "/api/v1/sites/[slug]/recipients", method: "GET", access: "manage-rules" },
  { route: "/api/v1/sites/[slug]/recipients", method: "POST", access: "manage-rules", body: (fx) => ({ email: `${fx.unique("to")}@example.test`, minLevel: "alert" }) },
  { route: "/api/v1/sites/[slug]/recipients/[id]", method: "PATCH", access: "manage-rules", params: async (fx) => ({ id: await freshRecipient(fx) }), body: () => ({ digest: true }) },
  { route: "/api/v1/sites/[slug]/recipients/[id]", method: "DELETE", access: "manage-rules", params: async (fx) => ({ id: await freshRecipient(fx) }) },
  // Reports, exports and the column mapping (issue 9). The PDF row asks for a reversed period (422 after
  // the permission check) so that the table does not start Chromium for every caller.
  { route: "/api/v1/sites/[slug]/report.pdf", method: "GET", access: "read", query: "from=2026-03-05&to=2026-03-01", ok: (s) => s === 422 },
  { route: "/api/v1/sites/[slug]/export/[file]", method: "GET", access: "read", params: () => ({ file: "observations.csv" }) },
  { route: "/api/v1/sites/[slug]/column-mapping", method: "GET", access: "read" },
  {
    route: "/api/v1/sites/[slug]/column-mapping",
    method: "PUT",
    access: "ingest",
    body: () => ({ hasHeader: true, columns: { point: "Name", east: "E", north: "N", height: "H" }, coordinateUnit: "mm", sigmaUnit: "mm", timeFormat: "iso" }),
  },
];

// Alerting fixtures: a triangle, a rule on it and an open alert (fresh for each call).
let alertingFixtureElement = 0;
let alertingEpochs = 0;
async function alertingTriangle(fx: AccessFixture): Promise<number> {
  const el = await fx.db.element.create({ data: { siteId: fx.site.id, name: fx.unique("tri"), kind: "triangle", mode: "plan", pointCodes: ["AT1", "AT2", "AT3"] } });
  return el.id;
}
async function alertingFixture(fx: AccessFixture): Promise<{ ruleId: number; alertId: number }> {
  const elementId = await alertingTriangle(fx);
  const rule = await fx.db.triggerRule.create({ data: { siteId: fx.site.id, name: fx.unique("rule"), quantity: "greenMax", elementIds: [elementId], reviewLevel: 0.0005, alertLevel: 0.00075, limitLevel: 0.0015 } });
  const epoch = await fx.db.epoch.create({ data: { siteId: fx.site.id, time: new Date(Date.UTC(2002, 0, 1) + ++alertingEpochs * 1000), contentHash: fx.unique("alert-epoch") } });
  const alert = await fx.db.alert.create({
    data: { siteId: fx.site.id, ruleId: rule.id, elementId, level: "review", peakLevel: "review", openedAt: epoch.time, openedEpochId: epoch.id, lastEpochId: epoch.id, value: 0.0006 },
  });
  return { ruleId: rule.id, alertId: alert.id };
}

// ---------------------------------------------------------------------------------------------
// Callers and the expected outcome: shared by the in-process test and any HTTP runner.

export type Caller =
  | { kind: "anonymous"; name: "anonymous" }
  | { kind: "member"; name: string; role: Role; onOtherSite: boolean }
  | { kind: "plain-user"; name: "signed-in, no role" }
  | { kind: "global-admin"; name: "global administrator" }
  | { kind: "token"; name: string; scope: TokenScope; onOtherSite: boolean };

export const CALLERS: Caller[] = [
  { kind: "anonymous", name: "anonymous" },
  { kind: "member", name: "viewer", role: "viewer", onOtherSite: false },
  { kind: "member", name: "surveyor", role: "surveyor", onOtherSite: false },
  { kind: "member", name: "engineer", role: "engineer", onOtherSite: false },
  { kind: "member", name: "site admin", role: "admin", onOtherSite: false },
  { kind: "member", name: "admin of another site", role: "admin", onOtherSite: true },
  { kind: "plain-user", name: "signed-in, no role" },
  { kind: "global-admin", name: "global administrator" },
  { kind: "token", name: "ingest token", scope: "ingest", onOtherSite: false },
  { kind: "token", name: "read token", scope: "read", onOtherSite: false },
  { kind: "token", name: "ingest token of another site", scope: "ingest", onOtherSite: true },
];

export type Expected = "ok" | 401 | 403;

export function expectedOutcome(access: Access, caller: Caller): Expected {
  if (access === "public") return "ok";
  if (caller.kind === "anonymous") return 401;
  if (caller.kind === "token") {
    if (access === "user" || access === "admin") return 403;
    return !caller.onOtherSite && scopeAllows(caller.scope, access) ? "ok" : 403;
  }
  if (access === "user") return "ok";
  if (access === "admin") return caller.kind === "global-admin" ? "ok" : 403;
  if (caller.kind === "global-admin") return "ok";
  if (caller.kind === "plain-user") return 403;
  return !caller.onOtherSite && roleAllows(caller.role, access) ? "ok" : 403;
}

export function isOk(row: AccessRow, status: number): boolean {
  return (row.ok ?? is2xx)(status);
}

/** The concrete request for a row: path with segments filled in, JSON body, same-origin headers. */
export async function buildRequest(
  row: AccessRow,
  fx: AccessFixture,
  opts: { baseUrl: string; cookie?: string; bearer?: string },
): Promise<{ request: Request; params: Record<string, string> }> {
  const extra = row.params ? await row.params(fx) : {};
  const params: Record<string, string> = { ...(row.route.includes("[slug]") ? { slug: fx.site.slug } : {}), ...extra };
  const path = row.route.replace(/\[(\w+)\]/g, (_m, k: string) => {
    if (!(k in params)) throw new Error(`access table: row ${row.method} ${row.route} gives no value for [${k}]`);
    return encodeURIComponent(params[k]);
  });
  const url = new URL(path + (row.query ? `?${row.query}` : ""), opts.baseUrl);
  const headers = new Headers({ host: url.host, origin: url.origin, "x-forwarded-for": "198.51.100.7" });
  if (opts.cookie) headers.set("cookie", opts.cookie);
  if (opts.bearer) headers.set("authorization", `Bearer ${opts.bearer}`);
  let body: string | undefined;
  if (row.body) {
    body = JSON.stringify(row.body(fx));
    headers.set("content-type", "application/json");
  }
  return { request: new Request(url, { method: row.method, headers, body }), params };
}
