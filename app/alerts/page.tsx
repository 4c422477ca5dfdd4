/** Alerts across every site the user may read, with filters by state, level and site. */
import type { Metadata } from "next";
import { requireUser } from "@/app/_server/auth.ts";
import { roleAllows, isRole } from "@/lib/server/auth/permissions.ts";
import { listUserSites } from "@/lib/server/dashboard/overview.ts";
import { listAlertsAcross, listOutboxAcross } from "@/lib/server/dashboard/alerts.ts";
import { AlertsView, parseAlertFilters } from "@/app/_components/alerts/AlertsView.tsx";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Alerts" };

export default async function AlertsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const sp = await searchParams;
  const user = await requireUser("/alerts");
  const sites = await listUserSites(user);
  const f = parseAlertFilters(sp);
  const chosen = f.site ? sites.filter((s) => s.slug === f.site) : sites;
  const ackSites = new Set(sites.filter((s) => isRole(s.role) && roleAllows(s.role, "acknowledge")).map((s) => s.id));
  const [alerts, outbox] = await Promise.all([
    listAlertsAcross(chosen.map((s) => s.id), { state: f.state, minLevel: f.level || undefined }),
    listOutboxAcross(chosen.filter((s) => ackSites.has(s.id)).map((s) => s.id)),
  ]);
  const q = new URLSearchParams(Object.entries({ state: f.state, level: f.level, site: f.site }).filter(([, v]) => v));
  const one = (k: string) => (Array.isArray(sp[k]) ? sp[k]![0] : (sp[k] as string | undefined));
  return (
    <main id="main" className="wide">
      <h1>Alerts on your sites</h1>
      <AlertsView
        action="/alerts"
        filters={f}
        alerts={alerts}
        outbox={outbox}
        sites={sites.map((s) => ({ slug: s.slug, name: s.name }))}
        canAcknowledge={(siteId) => ackSites.has(siteId)}
        back={`/alerts${q.size ? `?${q}` : ""}`}
        notice={one("acked") ? `Alert ${one("acked")} acknowledged.` : null}
        errorText={one("ackError") ?? null}
      />
    </main>
  );
}
