/**
 * Sessions: a random secret in an http-only, SameSite=Lax cookie; the database keeps only
 * hashSecret(secret) as Session.id, so a database leak reveals no usable session. Sessions
 * expire after EPOCHAL_SESSION_HOURS (default 12 h) from sign-in; sign-out deletes the row.
 */
import { getDb } from "../db/client.ts";
import { hashSecret, newSecret, SESSION_COOKIE } from "./secrets.ts";

export const DEFAULT_SESSION_HOURS = 12;

export function sessionLifetimeMs(): number {
  const h = Number(process.env.EPOCHAL_SESSION_HOURS ?? DEFAULT_SESSION_HOURS);
  return (Number.isFinite(h) && h > 0 && h <= 24 * 30 ? h : DEFAULT_SESSION_HOURS) * 3_600_000;
}

export type NewSession = { secret: string; expiresAt: Date };

export async function createSession(userId: number, now = new Date()): Promise<NewSession> {
  const db = getDb();
  const secret = newSecret("eps");
  const expiresAt = new Date(now.getTime() + sessionLifetimeMs());
  // Housekeeping: the user's expired sessions go when a new one starts.
  await db.session.deleteMany({ where: { userId, expiresAt: { lte: now } } });
  await db.session.create({ data: { id: hashSecret(secret), userId, expiresAt } });
  return { secret, expiresAt };
}

export async function deleteSession(secret: string): Promise<void> {
  await getDb().session.deleteMany({ where: { id: hashSecret(secret) } });
}

/** Ends every session of the user except the one holding `keepSecret` (password change, disabling). */
export async function deleteOtherSessions(userId: number, keepSecret: string | null): Promise<number> {
  const r = await getDb().session.deleteMany({ where: { userId, ...(keepSecret ? { id: { not: hashSecret(keepSecret) } } : {}) } });
  return r.count;
}

/**
 * Whether the cookie gets the `Secure` flag: when the request came over https (its URL, or the
 * X-Forwarded-Proto of a reverse proxy) or EPOCHAL_SECURE_COOKIES=1. Plain http://localhost (the
 * demo) keeps working because browsers drop Secure cookies sent over http.
 */
export function wantsSecureCookie(requestUrl: string | null, forwardedProto: string | null): boolean {
  if (process.env.EPOCHAL_SECURE_COOKIES === "1") return true;
  if (forwardedProto && forwardedProto.split(",")[0].trim().toLowerCase() === "https") return true;
  return requestUrl !== null && requestUrl.startsWith("https:");
}

export type CookieSpec = { name: string; value: string; httpOnly: true; sameSite: "lax"; secure: boolean; path: "/"; expires: Date };

export function sessionCookieSpec(s: NewSession | null, secure: boolean): CookieSpec {
  return { name: SESSION_COOKIE, value: s ? s.secret : "", httpOnly: true, sameSite: "lax", secure, path: "/", expires: s ? s.expiresAt : new Date(0) };
}

/** A Set-Cookie header value; `null` session clears the cookie. */
export function sessionSetCookie(s: NewSession | null, secure: boolean): string {
  const c = sessionCookieSpec(s, secure);
  const parts = [`${c.name}=${encodeURIComponent(c.value)}`, "Path=/", "HttpOnly", "SameSite=Lax", `Expires=${c.expires.toUTCString()}`];
  if (!s) parts.push("Max-Age=0");
  if (secure) parts.push("Secure");
  return parts.join("; ");
}
