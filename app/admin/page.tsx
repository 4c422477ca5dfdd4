import type { Metadata } from "next";
import Link from "next/link";
import { requireAdmin } from "@/app/_server/auth.ts";
import { listUsers } from "@/lib/server/users.ts";
import { ROLES } from "@/lib/server/auth/permissions.ts";
import { PASSWORD_MIN_CHARS } from "@/lib/server/auth/password.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { createUserAction, grantRoleAction, setDisabledAction } from "./actions.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Administration" };

type Search = Promise<Record<string, string | string[] | undefined>>;

const DONE: Record<string, string> = { created: "User created.", disabled: "User disabled; their sessions ended.", enabled: "User enabled.", granted: "Role saved." };
const ERRORS: Record<string, string> = {
  exists: "A user with that e-mail already exists.",
  weak: `The password needs at least ${PASSWORD_MIN_CHARS} characters (at most 72 bytes).`,
  invalid: "Check the fields: a valid e-mail, a name, a role.",
  missing: "That user or site no longer exists.",
  self: "You may not disable or demote yourself.",
};

export default async function AdminPage({ searchParams }: { searchParams: Search }) {
  const me = await requireAdmin("/admin");
  const sp = await searchParams;
  const [users, sites] = await Promise.all([
    listUsers(),
    getDb().site.findMany({ select: { id: true, slug: true, name: true, timeZone: true, createdAt: true }, orderBy: { slug: "asc" } }),
  ]);
  const done = typeof sp.done === "string" ? DONE[sp.done] : undefined;
  const error = typeof sp.error === "string" ? ERRORS[sp.error] : undefined;
  return (
    <main id="main">
      <h1>Administration</h1>
      <p>
        <Link href="/admin/audit">Audit log</Link>
      </p>
      {done ? (
        <p className="notice" role="status">
          {done}
        </p>
      ) : null}
      {error ? (
        <p className="notice bad" role="alert">
          {error}
        </p>
      ) : null}

      <h2>Users</h2>
      <table>
        <thead>
          <tr>
            <th scope="col">E-mail</th>
            <th scope="col">Name</th>
            <th scope="col">Roles per site</th>
            <th scope="col">State</th>
            <th scope="col">
              <span className="skip">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {users.map((u) => (
            <tr key={u.id}>
              <td>{u.email}</td>
              <td>{u.name}</td>
              <td>{u.isAdmin ? <span className="tag">administrator (all sites)</span> : u.memberships.map((m) => `${m.siteSlug}: ${m.role}`).join(", ") || <span className="muted">none</span>}</td>
              <td>{u.disabledAt ? <span className="tag disabled">disabled</span> : "active"}</td>
              <td>
                {u.id === me.userId ? (
                  <span className="muted">you</span>
                ) : (
                  <form action={setDisabledAction}>
                    <input type="hidden" name="userId" value={u.id} />
                    <input type="hidden" name="disabled" value={u.disabledAt ? "0" : "1"} />
                    <button type="submit" className="secondary small">
                      {u.disabledAt ? "Enable" : "Disable"} {u.email}
                    </button>
                  </form>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>

      <h2>Grant a role on a site</h2>
      <form action={grantRoleAction} className="panel form-row">
        <div>
          <label htmlFor="grant-user">User</label>
          <select id="grant-user" name="userId" required>
            {users.map((u) => (
              <option key={u.id} value={u.id}>
                {u.email}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="grant-site">Site</label>
          <select id="grant-site" name="siteId" required>
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name} ({s.slug})
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="grant-role">Role</label>
          <select id="grant-role" name="role" defaultValue="viewer">
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
            <option value="none">none (remove)</option>
          </select>
        </div>
        <div>
          <button type="submit">Save role</button>
        </div>
      </form>
      <p className="muted">viewer reads · surveyor also uploads epochs and manages points · engineer also elements, trigger rules and acknowledgements · admin also tokens and site settings.</p>

      <h2>Create a user</h2>
      <form action={createUserAction} className="panel form-row">
        <div>
          <label htmlFor="new-email">E-mail</label>
          <input id="new-email" name="email" type="email" required maxLength={254} autoComplete="off" />
        </div>
        <div>
          <label htmlFor="new-name">Name</label>
          <input id="new-name" name="name" required maxLength={120} autoComplete="off" />
        </div>
        <div>
          <label htmlFor="new-password">Initial password</label>
          <input id="new-password" name="password" type="password" required minLength={PASSWORD_MIN_CHARS} autoComplete="new-password" />
        </div>
        <div>
          <label htmlFor="new-admin">
            <input id="new-admin" name="isAdmin" type="checkbox" /> administrator (all sites)
          </label>
        </div>
        <div>
          <button type="submit">Create user</button>
        </div>
      </form>

      <h2>Sites</h2>
      {sites.length === 0 ? <p className="muted">No site yet: create one with `epochal site create`.</p> : null}
      {sites.length ? (
        <table>
          <thead>
            <tr>
              <th scope="col">Site</th>
              <th scope="col">Slug</th>
              <th scope="col">Time zone</th>
              <th scope="col">Settings</th>
            </tr>
          </thead>
          <tbody>
            {sites.map((s) => (
              <tr key={s.id}>
                <td>
                  <Link href={`/sites/${encodeURIComponent(s.slug)}`}>{s.name}</Link>
                </td>
                <td>{s.slug}</td>
                <td>{s.timeZone}</td>
                <td>
                  <Link href={`/sites/${encodeURIComponent(s.slug)}/settings/tokens`}>API tokens</Link> · <Link href={`/admin/audit?site=${encodeURIComponent(s.slug)}`}>audit</Link>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </main>
  );
}
