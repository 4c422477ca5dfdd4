/**
 * Authentication for server components and server actions (Next-specific: cookies(), redirect,
 * notFound). Every page and action that needs a user calls one of these on the server; the
 * layout or a hidden link is never the check.
 *
 *   const user = await requireUser("/account");                  // → /sign-in?next=/account
 *   const { site, role } = await requireSiteRole(slug, "read", `/sites/${slug}`);
 */
import "server-only";
import { cache } from "react";
import { cookies, headers } from "next/headers";
import { notFound, redirect } from "next/navigation";
import { userFromSessionSecret, roleOnSite, type Actor, type SiteRow } from "@/lib/server/http/route.ts";
import { SESSION_COOKIE } from "@/lib/server/auth/secrets.ts";
import { roleAllows, type Permission, type Role } from "@/lib/server/auth/permissions.ts";
import { sessionCookieSpec, wantsSecureCookie, type NewSession } from "@/lib/server/auth/sessions.ts";
import { getDb } from "@/lib/server/db/client.ts";

export type PageUser = Extract<Actor, { kind: "user" }>;

/** Only same-site paths are followed after sign-in (no open redirect to another host). */
export function safeNext(raw: string | null | undefined, fallback = "/"): string {
  if (!raw || !raw.startsWith("/") || raw.startsWith("//") || raw.startsWith("/\\")) return fallback;
  return raw.slice(0, 500);
}

export async function sessionSecret(): Promise<string | null> {
  return (await cookies()).get(SESSION_COOKIE)?.value ?? null;
}

/**
 * The signed-in user, or null. Asked once per request (React's per-request cache): the top bar,
 * the site layout and the page all need it.
 */
export const currentUser = cache(async (): Promise<PageUser | null> => userFromSessionSecret(await sessionSecret()));

/** The signed-in user; otherwise redirects to /sign-in?next=<next>. */
export async function requireUser(next = "/"): Promise<PageUser> {
  const u = await currentUser();
  if (!u) redirect(`/sign-in?next=${encodeURIComponent(safeNext(next))}`);
  return u;
}

/** A global administrator; signed-in users without the right see the "not allowed" page. */
export async function requireAdmin(next = "/admin"): Promise<PageUser> {
  const u = await requireUser(next);
  if (!u.isAdmin) redirect(`/account/denied?need=administrator&from=${encodeURIComponent(safeNext(next))}`);
  return u;
}

/** The site and the user's role on it (null when either is missing), once per request: the site layout and its page both ask. */
const siteAndRoleOnce = cache(async (slug: string, user: PageUser): Promise<{ site: SiteRow; role: Role } | null> => {
  const site = await getDb().site.findUnique({ where: { slug }, select: { id: true, slug: true, name: true, timeZone: true } });
  if (!site) return null;
  const role = await roleOnSite(user, site.id);
  return role ? { site, role } : null;
});

/**
 * The site and the user's role on it, when the role allows `permission`. A site the user has
 * no role on is answered as not found (its existence is not revealed); a role too low for the
 * permission goes to the "not allowed" page.
 */
export async function requireSiteRole(slug: string, permission: Permission, next = `/sites/${slug}`): Promise<{ user: PageUser; site: SiteRow; role: Role }> {
  const user = await requireUser(next);
  const found = await siteAndRoleOnce(slug, user);
  if (!found) notFound();
  const { site, role } = found;
  if (!roleAllows(role, permission)) redirect(`/account/denied?need=${encodeURIComponent(permission)}&site=${encodeURIComponent(slug)}&from=${encodeURIComponent(safeNext(next))}`);
  return { user, site, role };
}

/** Secure flag for cookies set from a server action: https (as `next start` or the proxy reports it) or EPOCHAL_SECURE_COOKIES=1. */
async function secureCookies(): Promise<boolean> {
  const h = await headers();
  return wantsSecureCookie(null, h.get("x-forwarded-proto"));
}

export async function setSessionCookie(s: NewSession | null): Promise<void> {
  const spec = sessionCookieSpec(s, await secureCookies());
  const jar = await cookies();
  if (s) jar.set(spec.name, spec.value, { httpOnly: true, sameSite: "lax", secure: spec.secure, path: "/", expires: spec.expires });
  else jar.delete({ name: spec.name, path: "/" });
}

export async function requestHeaders(): Promise<Headers> {
  return new Headers(await headers());
}
