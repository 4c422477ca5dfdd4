/** Site header on every site page: name, time zone, reference epoch, latest epoch, and the site's sections. */
import Link from "next/link";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { siteHeaderOnce } from "./site-data.ts";
import { describeZone, formatSiteTime } from "@/lib/plan/index.ts";
import { roleAllows } from "@/lib/server/auth/permissions.ts";
import { LiveRefresh } from "@/app/_components/LiveRefresh.tsx";

export default async function SiteLayout({ children, params }: { children: React.ReactNode; params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site, role } = await requireSiteRole(slug, "read");
  const h = await siteHeaderOnce(site.id);
  const base = `/sites/${encodeURIComponent(site.slug)}`;
  return (
    <>
      <div className="site-head">
        <div className="site-title">
          <span className="site-name">{site.name}</span>
          <span className="muted small">{site.slug}</span>
        </div>
        <dl className="site-facts">
          <dt>Time zone</dt>
          <dd data-testid="site-zone">{describeZone(site.timeZone, h?.latest?.timeMs)}</dd>
          <dt>Reference epoch</dt>
          <dd data-testid="site-reference">{h?.reference ? formatSiteTime(h.reference.timeMs, site.timeZone) : "none yet"}</dd>
          <dt>Latest epoch</dt>
          <dd>{h?.latest ? formatSiteTime(h.latest.timeMs, site.timeZone) : "none yet"}</dd>
          <dt>Epochs</dt>
          <dd>{h?.epochCount ?? 0}</dd>
        </dl>
        <nav aria-label="Site" className="site-nav no-print">
          <Link prefetch={false} href={base}>Plan</Link>
          <Link prefetch={false} href={`${base}/elements`}>Elements</Link>
          <Link prefetch={false} href={`${base}/alerts`}>Alerts</Link>
          <Link prefetch={false} href={`${base}/reports`}>Reports</Link>
          {roleAllows(role, "manage-points") ? <Link prefetch={false} href={`${base}/setup`}>Set-up</Link> : null}
          {roleAllows(role, "administer") ? <Link prefetch={false} href={`${base}/settings`}>Settings</Link> : null}
        </nav>
        <LiveRefresh slug={site.slug} />
      </div>
      {children}
    </>
  );
}
