/** Set-up: elements — run the triangulation, see it on the plan, save it; draw triangles and baselines by hand. */
import type { Metadata } from "next";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { listElements } from "@/lib/server/elements.ts";
import { getPlanGeometry, getSiteHeader } from "@/lib/server/dashboard/site.ts";
import { SetupTabs } from "@/app/_components/setup/SetupTabs.tsx";
import { ElementsSetup } from "@/app/_components/setup/ElementsSetup.tsx";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Set-up · elements" };

export default async function ElementsSetupPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site } = await requireSiteRole(slug, "manage-elements", `/sites/${slug}/setup/elements`);
  const header = await getSiteHeader(site.id);
  const [geometry, elements] = await Promise.all([getPlanGeometry(site.id, header?.reference?.id ?? null), listElements(getDb(), site)]);
  const groups = [...new Set(geometry.points.map((p) => p.group).filter((g): g is string => !!g))].sort();
  return (
    <main id="main" className="wide">
      <h1>Set-up · {site.name}</h1>
      <SetupTabs slug={site.slug} current="elements" />
      <ElementsSetup
        slug={site.slug}
        points={geometry.points.map((p) => ({ code: p.code, east: p.east, north: p.north, isReference: p.isReference }))}
        elements={elements.map((e) => ({ id: e.id, name: e.name, kind: e.kind, mode: e.mode, points: e.points }))}
        groups={groups}
      />
    </main>
  );
}
