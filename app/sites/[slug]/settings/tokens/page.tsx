import type { Metadata } from "next";
import Link from "next/link";
import { DateTime } from "luxon";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { listTokens } from "@/lib/server/auth/tokens.ts";
import { CreateTokenForm } from "./CreateTokenForm.tsx";
import { createTokenAction, revokeTokenAction } from "./actions.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "API tokens" };

function when(d: Date | null, zone: string): string {
  if (!d) return "—";
  return DateTime.fromJSDate(d).setZone(zone).toFormat("yyyy-LL-dd HH:mm ZZZZ");
}

export default async function TokensPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site } = await requireSiteRole(slug, "administer", `/sites/${slug}/settings/tokens`);
  const tokens = await listTokens(site.id);
  return (
    <main id="main">
      <p className="muted">
        <Link href={`/sites/${encodeURIComponent(site.slug)}`}>{site.name}</Link> › <Link href={`/sites/${encodeURIComponent(site.slug)}/settings`}>Settings</Link> › API tokens
      </p>
      <h1>API tokens · {site.name}</h1>
      <p className="muted">
        A token lets a logger or script reach this site only. Only a hash is stored: the token is shown once, when it is made. Revoke a token that may have leaked and
        make a new one. Times in {site.timeZone}.
      </p>
      <CreateTokenForm action={createTokenAction.bind(null, site.slug)} />
      <h2>Tokens</h2>
      {tokens.length === 0 ? <p className="muted">No token yet.</p> : null}
      {tokens.length ? (
        <table>
          <thead>
            <tr>
              <th scope="col">#</th>
              <th scope="col">Prefix</th>
              <th scope="col">Name</th>
              <th scope="col">Scope</th>
              <th scope="col">Created</th>
              <th scope="col">Last used</th>
              <th scope="col">State</th>
            </tr>
          </thead>
          <tbody>
            {tokens.map((t) => (
              <tr key={t.id}>
                <td>{t.id}</td>
                <td>
                  <code>{t.prefix}…</code>
                </td>
                <td>{t.name || <span className="muted">—</span>}</td>
                <td>{t.scope}</td>
                <td>
                  {when(t.createdAt, site.timeZone)}
                  {t.createdBy ? <span className="muted"> by {t.createdBy}</span> : null}
                </td>
                <td>{t.lastUsedAt ? when(t.lastUsedAt, site.timeZone) : <span className="muted">never</span>}</td>
                <td>
                  {t.revokedAt ? (
                    <span className="tag revoked">revoked {when(t.revokedAt, site.timeZone)}</span>
                  ) : (
                    <form action={revokeTokenAction.bind(null, site.slug)}>
                      <input type="hidden" name="tokenId" value={t.id} />
                      <button type="submit" className="secondary small" aria-label={`Revoke token ${t.prefix}`}>
                        Revoke
                      </button>
                    </form>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </main>
  );
}
