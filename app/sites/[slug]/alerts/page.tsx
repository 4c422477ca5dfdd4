/** Alerts of one site: open and past, filter by level and element, acknowledge (engineers), outbox. */
import type { Metadata } from "next";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { roleAllows } from "@/lib/server/auth/permissions.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { listAlertsAcross, listOutboxAcross } from "@/lib/server/dashboard/alerts.ts";
import { AlertsView, parseAlertFilters } from "@/app/_components/alerts/AlertsView.tsx";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Alerts" };

export default async function SiteAlertsPage({ params, searchParams }: { params: Promise<{ slug: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { slug } = await params;
  const sp = await searchParams;
  const { site, role } = await requireSiteRole(slug, "read", `/sites/${slug}/alerts`);
  const f = parseAlertFilters(sp);
  const elementId = Number(f.element) || undefined;
  const [alerts, outbox, elements] = await Promise.all([
    listAlertsAcross([site.id], { state: f.state, minLevel: f.level || undefined, elementId }),
    roleAllows(role, "acknowledge") ? listOutboxAcross([site.id]) : Promise.resolve([]),
    getDb().element.findMany({ where: { siteId: site.id, alerts: { some: {} } }, select: { id: true, name: true }, orderBy: { name: "asc" } }),
  ]);
  const q = new URLSearchParams(Object.entries({ state: f.state, level: f.level, element: f.element }).filter(([, v]) => v));
  const back = `/sites/${site.slug}/alerts${q.size ? `?${q}` : ""}`;
  const one = (k: string) => (Array.isArray(sp[k]) ? sp[k]![0] : (sp[k] as string | undefined));
  return (
    <main id="main" className="wide">
      <h1>Alerts · {site.name}</h1>
      <AlertsView
        action={`/sites/${site.slug}/alerts`}
        filters={f}
        alerts={alerts}
        outbox={outbox}
        elements={elements}
        canAcknowledge={roleAllows(role, "acknowledge")}
        back={back}
        notice={one("acked") ? `Alert ${one("acked")} acknowledged.` : null}
        errorText={one("ackError") ?? null}
      />
    </main>
  );
}
