/**
 * Signing in: rate limit, password check, session. Failed attempts are counted in
 * "SignInAttempt" over a sliding window of 15 minutes:
 *   - 5 failures for one e-mail address  → that account is refused (429) until the oldest ages out;
 *   - 20 failures from one client address → that address is refused (429) likewise.
 * The check runs before the password is compared, so a locked account cannot be guessed at.
 * Successful sign-ins are recorded (ok = true) but not counted. Unknown e-mails cost the same
 * bcrypt time as wrong passwords (no account enumeration by timing), and get the same message.
 */
import { getDb } from "../db/client.ts";
import { AppError } from "../errors.ts";
import { recordAudit } from "../audit.ts";
import { burnPasswordCheck, verifyPassword } from "./password.ts";
import { createSession, type NewSession } from "./sessions.ts";

export const SIGN_IN_WINDOW_MS = 15 * 60_000;
export const MAX_FAILURES_PER_EMAIL = 5;
export const MAX_FAILURES_PER_ADDRESS = 20;

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

/**
 * The client address for rate limiting: the right-most X-Forwarded-For entry (the one added by
 * the nearest proxy, or by `next start` itself, so a client cannot choose it), else X-Real-IP.
 */
export function clientAddress(headers: Headers): string {
  const xff = headers.get("x-forwarded-for");
  if (xff) {
    const parts = xff.split(",").map((s) => s.trim()).filter(Boolean);
    if (parts.length) return parts[parts.length - 1].slice(0, 100);
  }
  return (headers.get("x-real-ip") ?? "unknown").slice(0, 100);
}

async function retryAfterS(where: { email: string } | { address: string }, max: number, now: Date): Promise<number | null> {
  const since = new Date(now.getTime() - SIGN_IN_WINDOW_MS);
  const failures = await getDb().signInAttempt.findMany({
    where: { ...where, ok: false, at: { gt: since } },
    orderBy: { at: "desc" },
    take: max,
    select: { at: true },
  });
  if (failures.length < max) return null;
  // Refused until the max-th newest failure leaves the window.
  const oldest = failures[failures.length - 1].at.getTime();
  return Math.max(1, Math.ceil((oldest + SIGN_IN_WINDOW_MS - now.getTime()) / 1000));
}

export type SignedIn = { user: { id: number; email: string; name: string; isAdmin: boolean }; session: NewSession };

export async function signIn(input: { email: string; password: string; address: string }, now = new Date()): Promise<SignedIn> {
  const db = getDb();
  const email = normaliseEmail(input.email);
  const address = input.address;
  const waitEmail = await retryAfterS({ email }, MAX_FAILURES_PER_EMAIL, now);
  const waitAddr = await retryAfterS({ address }, MAX_FAILURES_PER_ADDRESS, now);
  const wait = Math.max(waitEmail ?? 0, waitAddr ?? 0);
  if (wait > 0) {
    throw new AppError("rate_limited", `Too many failed sign-ins. Try again in ${Math.ceil(wait / 60)} minute(s).`, { details: { retryAfterS: wait } });
  }
  const user = await db.user.findUnique({ where: { email } });
  let ok = false;
  if (user && !user.disabledAt) ok = await verifyPassword(input.password, user.passwordHash);
  else await burnPasswordCheck(input.password);
  await db.signInAttempt.create({ data: { email, address, ok, at: now } });
  if (!ok || !user) throw new AppError("unauthenticated", "E-mail or password is wrong, or the account is disabled.");
  const session = await createSession(user.id, now);
  await recordAudit(db, { actor: `user:${user.email}`, action: "session.create", entityType: "User", entityId: String(user.id), after: { address, expiresAt: session.expiresAt } });
  return { user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin }, session };
}
