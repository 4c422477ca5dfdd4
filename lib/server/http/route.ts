/**
 * The one wrapper for route handlers: authenticates (session cookie or bearer token), checks the
 * permission on the site, checks the origin of state-changing requests, and maps errors to
 * responses. Handlers stay short: parse, call a service, map the result.
 *
 *   export const POST = siteRoute("ingest", async ({ req, site, actor }) => Response.json(...));
 */
import { getDb } from "../db/client.ts";
import { AppError, isAppError } from "../errors.ts";
import { hashSecret, SESSION_COOKIE } from "../auth/secrets.ts";
import { isRole, roleAllows, scopeAllows, type Permission, type Role, type TokenScope } from "../auth/permissions.ts";
import { PhaseTimer } from "../timing.ts";
import { pgQuery } from "../ingest/pg-tx.ts";

export type Actor =
  | { kind: "user"; userId: number; email: string; name: string; isAdmin: boolean; label: string }
  | { kind: "token"; tokenId: number; siteId: number; scope: TokenScope; label: string };

export type SiteRow = { id: number; slug: string; name: string; timeZone: string };

type Params = Record<string, string | string[]>;
// The context Next.js passes: its params hold the route's dynamic segments. Typed loosely on
// purpose, so that tests may call a handler with `{ params: Promise.resolve({ slug }) }`; each
// wrapper narrows it to the handler's own P (Next guarantees the segments of the folder path).
type NextCtx = { params: Promise<Params> };

export function readCookie(req: Request, name: string): string | null {
  const raw = req.headers.get("cookie");
  if (!raw) return null;
  for (const part of raw.split(";")) {
    const [k, ...v] = part.trim().split("=");
    if (k !== name) continue;
    try {
      return decodeURIComponent(v.join("="));
    } catch {
      return null;
    }
  }
  return null;
}

/** The signed-in user of a session secret, or null (expired, unknown, disabled). */
export async function userFromSessionSecret(secret: string | null): Promise<Extract<Actor, { kind: "user" }> | null> {
  if (!secret) return null;
  const db = getDb();
  const s = await db.session.findUnique({ where: { id: hashSecret(secret) }, include: { user: true } });
  if (!s || s.expiresAt.getTime() <= Date.now() || s.user.disabledAt) return null;
  return { kind: "user", userId: s.user.id, email: s.user.email, name: s.user.name, isAdmin: s.user.isAdmin, label: `user:${s.user.email}` };
}

async function actorFromRequest(req: Request): Promise<Actor | null> {
  const auth = req.headers.get("authorization");
  if (auth) {
    const m = /^Bearer\s+(\S+)$/i.exec(auth);
    if (!m) throw new AppError("unauthenticated", "Authorization header must be `Bearer <token>`.");
    // Every ingest post comes through here: plain pg (lib/server/ingest/pg-tx.ts), not Prisma's per-call cost.
    const [t] = await pgQuery<{ id: number; siteId: number; scope: string; prefix: string; revokedAt: Date | null; lastUsedAt: Date | null }>(
      `SELECT id, "siteId", scope, prefix, "revokedAt", "lastUsedAt" FROM "ApiToken" WHERE "tokenHash" = $1`,
      [hashSecret(m[1])],
    );
    if (!t || t.revokedAt) throw new AppError("unauthenticated", "Unknown or revoked API token.");
    // Last use: at most one write a minute per token, so a busy logger does not hammer the row.
    if (!t.lastUsedAt || Date.now() - t.lastUsedAt.getTime() > 60_000)
      await getDb().apiToken.update({ where: { id: t.id }, data: { lastUsedAt: new Date() } }).catch(() => undefined);
    return { kind: "token", tokenId: t.id, siteId: t.siteId, scope: t.scope as TokenScope, label: `token:${t.prefix}` };
  }
  return userFromSessionSecret(readCookie(req, SESSION_COOKIE));
}

/** The role a user holds on a site (global administrators hold `admin` everywhere), or null. */
export async function roleOnSite(actor: Extract<Actor, { kind: "user" }>, siteId: number): Promise<Role | null> {
  if (actor.isAdmin) return "admin";
  const m = await getDb().membership.findUnique({ where: { userId_siteId: { userId: actor.userId, siteId } } });
  return m && isRole(m.role) ? m.role : null;
}

export async function assertSitePermission(actor: Actor, site: { id: number }, permission: Permission): Promise<void> {
  if (actor.kind === "token") {
    if (actor.siteId !== site.id) throw new AppError("forbidden", "This token belongs to another site.");
    if (!scopeAllows(actor.scope, permission)) throw new AppError("forbidden", `A token of scope "${actor.scope}" may not ${permission}.`);
    return;
  }
  const role = await roleOnSite(actor, site.id);
  if (!role || !roleAllows(role, permission)) throw new AppError("forbidden", `Your role on this site does not allow: ${permission}.`);
}

const UNSAFE = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** CSRF: a cookie-authenticated state-changing request must come from our own origin. */
function assertSameOrigin(req: Request, actor: Actor | null): void {
  if (!UNSAFE.has(req.method) || !actor || actor.kind === "token") return;
  const origin = req.headers.get("origin");
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host");
  if (!origin || !host) throw new AppError("forbidden", "Missing Origin header on a state-changing request.");
  let originHost: string;
  try {
    originHost = new URL(origin).host;
  } catch {
    throw new AppError("forbidden", "Malformed Origin header.");
  }
  if (originHost !== host) throw new AppError("forbidden", "Cross-site request refused.");
}

// Lost or refused database connections (Prisma's codes, its driver adapter's error kinds, PostgreSQL's
// shutdown and connection SQLSTATEs, socket errors): the client is told 503, not a raw 500.
const DB_DOWN_CODES = new Set(["P1001", "P1002", "P1017", "P2024", "57P01", "57P02", "57P03", "08000", "08001", "08003", "08004", "08006", "ECONNREFUSED", "ECONNRESET", "EPIPE", "ETIMEDOUT"]);
const DB_DOWN_KINDS = new Set(["DatabaseNotReachable", "ConnectionClosed", "SocketTimeout", "TooManyConnections"]);

/** True when an error (or its cause, or its driver-adapter error) says the database cannot be reached. */
export function isDatabaseUnavailable(err: unknown, depth = 0): boolean {
  if (!err || typeof err !== "object" || depth > 4) return false;
  const e = err as { code?: unknown; kind?: unknown; originalCode?: unknown; cause?: unknown; meta?: { driverAdapterError?: unknown } };
  if ((typeof e.code === "string" && DB_DOWN_CODES.has(e.code)) || (typeof e.originalCode === "string" && DB_DOWN_CODES.has(e.originalCode))) return true;
  if (typeof e.kind === "string" && DB_DOWN_KINDS.has(e.kind)) return true;
  if (/^Connection terminated|^Can't reach database server/.test((err as Error).message ?? "")) return true;
  return isDatabaseUnavailable(e.cause, depth + 1) || isDatabaseUnavailable(e.meta?.driverAdapterError, depth + 1);
}

export function errorResponse(err: unknown): Response {
  if (!isAppError(err) && isDatabaseUnavailable(err)) {
    console.error("epochal: database unavailable in a route:", (err as Error).message?.split("\n").filter(Boolean).pop());
    err = new AppError("unavailable", "The database is not reachable at the moment; the request was not carried out. Retry in a few seconds.", { details: { retryAfterS: 5 } });
  }
  if (isAppError(err)) {
    const body: Record<string, unknown> = { error: { code: err.code, message: err.message } };
    if (err.errors) body.errors = err.errors;
    if (err.details) Object.assign(body, err.details);
    const headers: Record<string, string> = { "Cache-Control": "no-store" };
    const retry = err.details?.retryAfterS;
    if ((err.code === "rate_limited" || err.code === "unavailable") && typeof retry === "number") headers["Retry-After"] = String(Math.ceil(retry));
    return Response.json(body, { status: err.status, headers });
  }
  console.error("epochal: unexpected error in a route", err);
  return Response.json({ error: { code: "internal", message: "Internal error; it has been logged." } }, { status: 500 });
}

/** `timer` started when the request reached the wrapper; its first lap, "auth", is the authentication and site look-up. */
export type SiteHandler<P> = (ctx: { req: Request; params: P; site: SiteRow; actor: Actor; timer: PhaseTimer }) => Promise<Response>;

/** A route under /api/v1/sites/{slug}/…: 401 without credentials, 404 unknown site, 403 without the permission. */
export function siteRoute<P extends Params & { slug: string }>(permission: Permission, handler: SiteHandler<P>) {
  return async (req: Request, ctx: NextCtx): Promise<Response> => {
    const timer = new PhaseTimer();
    try {
      const params = (await ctx.params) as P;
      // The caller and the site are looked up side by side; the answers keep their order (401 before 404/403).
      const [who, where] = await Promise.allSettled([
        actorFromRequest(req),
        pgQuery<SiteRow>(`SELECT id, slug, name, "timeZone" FROM "Site" WHERE slug = $1`, [String(params.slug)]).then((r) => r[0] ?? null),
      ]);
      if (who.status === "rejected") throw who.reason;
      const actor = who.value;
      if (!actor) throw new AppError("unauthenticated", "Sign in or send `Authorization: Bearer <token>`.");
      assertSameOrigin(req, actor);
      if (where.status === "rejected") throw where.reason;
      const site = where.value;
      // Unknown site and no access look the same to a token of another site: 403, never a hint.
      if (!site) {
        if (actor.kind === "token") throw new AppError("forbidden", "This token belongs to another site.");
        throw new AppError("not_found", `No site "${params.slug}".`);
      }
      await assertSitePermission(actor, site, permission);
      timer.lap("auth");
      return await handler({ req, params, site, actor, timer });
    } catch (err) {
      return errorResponse(err);
    }
  };
}

export type UserHandler<P> = (ctx: { req: Request; params: P; actor: Extract<Actor, { kind: "user" }> }) => Promise<Response>;

/** A route for any signed-in user (tokens are refused); `adminOnly` requires a global administrator. */
export function userRoute<P extends Params>(opts: { adminOnly?: boolean }, handler: UserHandler<P>) {
  return async (req: Request, ctx: NextCtx): Promise<Response> => {
    try {
      const params = (await ctx.params) as P;
      const actor = await actorFromRequest(req);
      if (!actor) throw new AppError("unauthenticated", "Sign in first.");
      if (actor.kind !== "user") throw new AppError("forbidden", "API tokens may not use this route.");
      assertSameOrigin(req, actor);
      if (opts.adminOnly && !actor.isAdmin) throw new AppError("forbidden", "Administrators only.");
      return await handler({ req, params, actor });
    } catch (err) {
      return errorResponse(err);
    }
  };
}

/** A route open to everyone (health, sign-in). Errors are still mapped. */
export function publicRoute<P extends Params>(handler: (ctx: { req: Request; params: P }) => Promise<Response>) {
  return async (req: Request, ctx: NextCtx): Promise<Response> => {
    try {
      return await handler({ req, params: (await ctx.params) as P });
    } catch (err) {
      return errorResponse(err);
    }
  };
}
