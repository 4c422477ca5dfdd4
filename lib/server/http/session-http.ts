/** Session cookies on API responses, and the origin check for the (unauthenticated) sign-in POST. */
import { AppError } from "../errors.ts";
import { sessionSetCookie, wantsSecureCookie, type NewSession } from "../auth/sessions.ts";

export function setSessionCookieHeader(req: Request, s: NewSession | null): string {
  return sessionSetCookie(s, wantsSecureCookie(req.url, req.headers.get("x-forwarded-proto")));
}

/** Login CSRF: a browser sign-in from another origin is refused (no Origin header: not a browser form, allowed). */
export function assertOriginIfPresent(req: Request): void {
  const origin = req.headers.get("origin");
  if (!origin) return;
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host");
  let originHost: string | null = null;
  try {
    originHost = new URL(origin).host;
  } catch {
    originHost = null;
  }
  if (!host || originHost !== host) throw new AppError("forbidden", "Cross-site request refused.");
}
