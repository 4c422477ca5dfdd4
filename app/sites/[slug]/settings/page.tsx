import type { Metadata } from "next";
import Link from "next/link";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getDb } from "@/lib/server/db/client.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Site settings" };

/** A site's settings for its administrators: who has which role, and links to tokens and the audit log. */
export default async function SiteSettingsPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site, user } = await requireSiteRole(slug, "administer", `/sites/${slug}/settings`);
  const members = await getDb().membership.findMany({
    where: { siteId: site.id },
    select: { role: true, user: { select: { email: true, name: true, disabledAt: true } } },
    orderBy: { user: { email: "asc" } },
  });
  return (
    <main id="main">
      <p className="muted">
        <Link href={`/sites/${encodeURIComponent(site.slug)}`}>{site.name}</Link> › Settings
      </p>
      <h1>Settings · {site.name}</h1>
      <ul>
        <li>
          <Link href={`/sites/${encodeURIComponent(site.slug)}/settings/tokens`}>API tokens</Link> (loggers and scripts)
        </li>
        {user.isAdmin ? (
          <li>
            <Link href={`/admin/audit?site=${encodeURIComponent(site.slug)}`}>Audit log of this site</Link>
          </li>
        ) : null}
      </ul>
      <h2>People with a role on this site</h2>
      <p className="muted">Global administrators hold the admin role on every site. Roles are granted on the administration page.</p>
      {members.length === 0 ? <p className="muted">Nobody yet.</p> : null}
      {members.length ? (
        <table>
          <thead>
            <tr>
              <th scope="col">E-mail</th>
              <th scope="col">Name</th>
              <th scope="col">Role</th>
            </tr>
          </thead>
          <tbody>
            {members.map((m) => (
              <tr key={m.user.email}>
                <td>{m.user.email}</td>
                <td>{m.user.name}</td>
                <td>
                  {m.role}
                  {m.user.disabledAt ? <span className="tag disabled"> disabled</span> : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </main>
  );
}
