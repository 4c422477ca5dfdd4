/** The site plan: the screen a site team keeps open. Data on the server, drawing in a client component. */
import type { Metadata } from "next";
import Link from "next/link";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getPlanGeometry, listEpochs } from "@/lib/server/dashboard/site.ts";
import { siteHeaderOnce } from "./site-data.ts";
import { getStrainField } from "@/lib/server/dashboard/field.ts";
import { encodePlanData, formatSiteTime, isPlanQuantity, isStrainUnit } from "@/lib/plan/index.ts";
import { SitePlan } from "@/app/_components/plan/SitePlan.tsx";
import { TopElements } from "@/app/_components/plan/TopElements.tsx";

export const dynamic = "force-dynamic";

export async function generateMetadata({ params }: { params: Promise<{ slug: string }> }): Promise<Metadata> {
  return { title: `Plan · ${(await params).slug}` };
}

export default async function SitePage({ params, searchParams }: { params: Promise<{ slug: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { slug } = await params;
  const sp = await searchParams;
  const { site } = await requireSiteRole(slug, "read");
  const header = await siteHeaderOnce(site.id);
  const refId = header?.reference?.id ?? null;
  const [geometry, epochs, field] = await Promise.all([
    getPlanGeometry(site.id, refId),
    listEpochs(site.id),
    header?.latest ? getStrainField(site.id, { epochId: header.latest.id }, { siteReferenceEpochId: refId }) : Promise.resolve(null),
  ]);
  // SVG works in single precision: draw about a local origin (whole metres near the centroid) so
  // grid coordinates of millions of metres keep millimetre detail; sent to 0.1 mm.
  const n = Math.max(1, geometry.points.length);
  const originE = Math.round(geometry.points.reduce((s, p) => s + p.east, 0) / n);
  const originN = Math.round(geometry.points.reduce((s, p) => s + p.north, 0) / n);
  const r4 = (v: number) => Math.round(v * 1e4) / 1e4;
  // The times the first render shows (latest, previous, reference), formatted here on the site's clock.
  const timeLabels: Record<string, string> = {};
  for (const ms of [epochs.timesMs[epochs.timesMs.length - 1], epochs.timesMs[epochs.timesMs.length - 2], epochs.timesMs[0], header?.reference?.timeMs])
    if (ms !== undefined) timeLabels[String(ms)] = formatSiteTime(ms, site.timeZone);
  const q = typeof sp.quantity === "string" && isPlanQuantity(sp.quantity) ? sp.quantity : "greenMax";
  const unit = typeof sp.unit === "string" && isStrainUnit(sp.unit) ? sp.unit : "ue";
  return (
    <main id="main" className="wide">
      <h1 className="visually-hidden">Plan of {site.name}</h1>
      {geometry.points.length === 0 ? (
        <div className="panel">
          <p>No points have been surveyed on this site yet.</p>
          <p>
            <Link href={`/sites/${site.slug}/setup/upload`}>Upload an epoch file</Link> to start.
          </p>
        </div>
      ) : (
        <SitePlan
          slug={site.slug}
          timeZone={site.timeZone}
          data={encodePlanData({
            points: geometry.points.map((p) => ({ code: p.code, east: r4(p.east - originE), north: r4(p.north - originN), isReference: p.isReference })),
            elements: geometry.elements.map((e) => ({ id: e.id, name: e.name, kind: e.kind, mode: e.mode, pointCodes: e.pointCodes })),
            epochIds: epochs.ids,
            epochTimesMs: epochs.timesMs,
            field,
          })}
          timeLabels={timeLabels}
          referenceEpochId={refId}
          initialQuantity={q}
          initialUnit={unit}
        />
      )}
      {field ? <TopElements slug={site.slug} elements={geometry.elements} field={field} /> : null}
    </main>
  );
}
