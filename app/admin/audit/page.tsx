import type { Metadata } from "next";
import Link from "next/link";
import { requireAdmin } from "@/app/_server/auth.ts";
import { listAudit } from "@/lib/server/audit.ts";
import { getDb } from "@/lib/server/db/client.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Audit log" };

type Search = Promise<Record<string, string | string[] | undefined>>;

const SHOWN = 200;

function json(v: unknown): string {
  if (v === null || v === undefined) return "";
  const s = JSON.stringify(v);
  return s.length > 400 ? s.slice(0, 400) + " …" : s;
}

export default async function AuditPage({ searchParams }: { searchParams: Search }) {
  await requireAdmin("/admin/audit");
  const sp = await searchParams;
  const slug = typeof sp.site === "string" && sp.site ? sp.site : null;
  const db = getDb();
  const sites = await db.site.findMany({ select: { id: true, slug: true, name: true }, orderBy: { slug: "asc" } });
  const site = slug ? sites.find((s) => s.slug === slug) : undefined;
  const rows = slug && !site ? [] : await listAudit(db, { siteId: site?.id, limit: SHOWN });
  const csvHref = `/api/v1/audit.csv${site ? `?site=${encodeURIComponent(site.slug)}` : ""}`;
  return (
    <main id="main">
      <h1>Audit log</h1>
      <p className="muted">
        Every change, newest first: who (a user, an API token by its prefix, or the command line), when (UTC), what, and the value before and after. The log
        can only grow: the database refuses to change or delete entries.
      </p>
      <form method="get" className="form-row no-print">
        <div>
          <label htmlFor="audit-site">Site</label>
          <select id="audit-site" name="site" defaultValue={site?.slug ?? ""}>
            <option value="">all sites and global changes</option>
            {sites.map((s) => (
              <option key={s.id} value={s.slug}>
                {s.name} ({s.slug})
              </option>
            ))}
          </select>
        </div>
        <div>
          <button type="submit" className="secondary">
            Show
          </button>
        </div>
        <div>
          <a className="button" href={csvHref} download>
            Export CSV
          </a>
        </div>
      </form>
      {slug && !site ? <p className="notice bad">No site “{slug}”.</p> : null}
      <p className="muted">
        Showing the latest {Math.min(rows.length, SHOWN)} entries{site ? ` of ${site.name}` : ""}; the CSV export holds all of them.
      </p>
      <table>
        <thead>
          <tr>
            <th scope="col">#</th>
            <th scope="col">Time (UTC)</th>
            <th scope="col">Actor</th>
            <th scope="col">Site</th>
            <th scope="col">Action</th>
            <th scope="col">Entity</th>
            <th scope="col">Before</th>
            <th scope="col">After</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.id}>
              <td>{r.id}</td>
              <td>
                <time dateTime={r.at.toISOString()}>{r.at.toISOString().replace("T", " ").slice(0, 19)}</time>
              </td>
              <td>{r.actor}</td>
              <td>{r.siteSlug ?? <span className="muted">—</span>}</td>
              <td>{r.action}</td>
              <td>
                {r.entityType}
                {r.entityId ? ` ${r.entityId}` : ""}
              </td>
              <td className="json">{json(r.before)}</td>
              <td className="json">{json(r.after)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <h2>CSV export columns</h2>
      <p className="muted">UTF-8, comma-separated (RFC 4180), one header row, oldest entry first. Cells that start with = + - @ get a leading apostrophe so spreadsheets do not run them.</p>
      <table>
        <thead>
          <tr>
            <th scope="col">Column</th>
            <th scope="col">Meaning</th>
          </tr>
        </thead>
        <tbody>
          <tr><td>id</td><td>Entry number, increasing with time</td></tr>
          <tr><td>at_utc</td><td>Time of the change, ISO 8601 in UTC (Z), milliseconds</td></tr>
          <tr><td>actor</td><td>user:&lt;e-mail&gt;, token:&lt;prefix&gt;, cli:&lt;OS user&gt; or system:&lt;task&gt;</td></tr>
          <tr><td>site</td><td>Site slug; empty for changes not tied to one site (users, sessions)</td></tr>
          <tr><td>action</td><td>&lt;entity&gt;.&lt;verb&gt;, e.g. epoch.upload, token.revoke, membership.grant</td></tr>
          <tr><td>entity_type, entity_id</td><td>What changed (table name and key)</td></tr>
          <tr><td>before, after</td><td>JSON of the previous and new value, in stored units: metres, seconds, strain dimensionless (not µε). Secrets are never included.</td></tr>
        </tbody>
      </table>
      <p>
        <Link href="/admin">Back to administration</Link>
      </p>
    </main>
  );
}
