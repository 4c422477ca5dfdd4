/** Sites overview: every site the signed-in user may read, with its latest epoch, open alerts and largest strain. */
import Link from "next/link";
import { requireUser } from "@/app/_server/auth.ts";
import { getSitesOverview } from "@/lib/server/dashboard/overview.ts";
import { formatSiteTime, formatStrain, isSignificant } from "@/lib/plan/index.ts";
import { LevelBadge } from "./_components/LevelBadge.tsx";

export const dynamic = "force-dynamic";

export default async function Home() {
  const user = await requireUser("/");
  const sites = await getSitesOverview(user);
  return (
    <main id="main">
      <h1>Your sites</h1>
      {sites.length === 0 ? (
        <p className="panel">You hold no role on any site yet. Ask an administrator to add you to one.</p>
      ) : (
        <ul className="site-cards">
          {sites.map((s) => {
            const sig = s.largest ? isSignificant(s.largest.greenMax, s.largest.sigma) : null;
            const open = s.openAlerts.review + s.openAlerts.alert + s.openAlerts.limit;
            return (
              <li key={s.id} className="panel site-card">
                <h2>
                  <Link href={`/sites/${s.slug}`}>{s.name}</Link>
                </h2>
                <p className="muted small">
                  {s.slug} · your role: {s.role} · times in {s.timeZone}
                </p>
                <dl className="facts">
                  <dt>Latest epoch</dt>
                  <dd>{s.latest ? formatSiteTime(s.latest.timeMs, s.timeZone) : "none yet"}</dd>
                  <dt>Points reported</dt>
                  <dd>{s.latest ? `${s.latest.pointsReported} of ${s.pointCount}` : `0 of ${s.pointCount}`}</dd>
                  <dt>Open alerts</dt>
                  <dd>
                    {open === 0 ? (
                      <span className="muted">none</span>
                    ) : (
                      <span className="badges">
                        {(["limit", "alert", "review"] as const).map((l) => (s.openAlerts[l] > 0 ? <LevelBadge key={l} level={l} count={s.openAlerts[l]} /> : null))}
                      </span>
                    )}
                  </dd>
                  <dt>Largest major strain</dt>
                  <dd>
                    {s.largest ? (
                      <>
                        <Link href={`/sites/${s.slug}/elements/${s.largest.elementId}`}>{s.largest.elementName}</Link>: {formatStrain(s.largest.greenMax, "ue", { signed: true })}
                        {s.largest.sigma !== null ? ` ± ${formatStrain(s.largest.sigma, "ue", { withUnit: false })}` : ""}{" "}
                        <span className={sig ? "sig yes" : "sig no"}>{sig === null ? "" : sig ? "significant" : "not significant"}</span>
                      </>
                    ) : (
                      <span className="muted">no results</span>
                    )}
                  </dd>
                </dl>
                <p className="card-links">
                  <Link href={`/sites/${s.slug}`}>Plan</Link> · <Link href={`/sites/${s.slug}/alerts`}>Alerts</Link> · <Link href={`/sites/${s.slug}/elements`}>Elements</Link>
                </p>
              </li>
            );
          })}
        </ul>
      )}
    </main>
  );
}
