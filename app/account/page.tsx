import type { Metadata } from "next";
import Link from "next/link";
import { requireUser } from "@/app/_server/auth.ts";
import { membershipsOf } from "@/lib/server/users.ts";
import { PASSWORD_MIN_CHARS } from "@/lib/server/auth/password.ts";
import { changePasswordAction } from "./actions.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Account" };

const ERRORS: Record<string, string> = {
  mismatch: "The new password and its repetition differ.",
  current: "The current password is wrong.",
  same: "The new password must differ from the current one.",
  weak: `The new password needs at least ${PASSWORD_MIN_CHARS} characters (and at most 72 bytes).`,
};

type Search = Promise<Record<string, string | string[] | undefined>>;

export default async function AccountPage({ searchParams }: { searchParams: Search }) {
  const user = await requireUser("/account");
  const sp = await searchParams;
  const memberships = await membershipsOf(user.userId);
  // Only our own fixed messages, chosen by code: a link cannot put its own words on this page.
  const error = typeof sp.error === "string" ? (ERRORS[sp.error] ?? null) : null;
  return (
    <main id="main">
      <h1>Your account</h1>
      <div className="panel">
        <p>
          <strong>{user.name}</strong> · {user.email}
          {user.isAdmin ? <span className="tag"> administrator (all sites)</span> : null}
        </p>
        <h2>Your sites</h2>
        {memberships.length === 0 && !user.isAdmin ? <p className="muted">No site yet. An administrator grants roles per site.</p> : null}
        {memberships.length ? (
          <table>
            <thead>
              <tr>
                <th scope="col">Site</th>
                <th scope="col">Role</th>
              </tr>
            </thead>
            <tbody>
              {memberships.map((m) => (
                <tr key={m.siteId}>
                  <td>
                    <Link href={`/sites/${encodeURIComponent(m.siteSlug)}`}>{m.siteName}</Link>
                  </td>
                  <td>{m.role}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : null}
      </div>
      <h2>Change password</h2>
      <div className="panel" style={{ maxWidth: 420 }}>
        {sp.changed ? (
          <p className="notice" role="status">
            Password changed. Other sessions signed out: {Number(sp.ended ?? 0)}.
          </p>
        ) : null}
        {error ? (
          <p className="notice bad" role="alert">
            {error}
          </p>
        ) : null}
        <form action={changePasswordAction}>
          <label htmlFor="currentPassword">Current password</label>
          <input id="currentPassword" name="currentPassword" type="password" autoComplete="current-password" required />
          <label htmlFor="newPassword">New password (at least {PASSWORD_MIN_CHARS} characters)</label>
          <input id="newPassword" name="newPassword" type="password" autoComplete="new-password" minLength={PASSWORD_MIN_CHARS} required />
          <label htmlFor="repeatPassword">Repeat the new password</label>
          <input id="repeatPassword" name="repeatPassword" type="password" autoComplete="new-password" minLength={PASSWORD_MIN_CHARS} required />
          <p>
            <button type="submit">Change password</button>
          </p>
        </form>
        <p className="muted">Changing the password signs out your other browsers and devices.</p>
      </div>
    </main>
  );
}
