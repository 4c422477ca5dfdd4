/** Set-up: points — stable reference points, groups, kind, σ overrides and notes. */
import type { Metadata } from "next";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { listSitePoints } from "@/lib/server/points.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { SetupTabs } from "@/app/_components/setup/SetupTabs.tsx";
import { PointsEditor } from "@/app/_components/setup/PointsEditor.tsx";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Set-up · points" };

export default async function PointsSetupPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site } = await requireSiteRole(slug, "manage-points", `/sites/${slug}/setup/points`);
  const [points, s] = await Promise.all([listSitePoints(site.id), getDb().site.findUnique({ where: { id: site.id }, select: { sigmaHM: true, sigmaVM: true } })]);
  return (
    <main id="main" className="wide">
      <h1>Set-up · {site.name}</h1>
      <SetupTabs slug={site.slug} current="points" />
      <p className="muted">
        Mark the stable reference points (outside the zone of influence), group points by structure, and set σ where a point is surveyed better or worse than the site default
        (σ horizontal {((s?.sigmaHM ?? 0.001) * 1000).toFixed(1)} mm, vertical {((s?.sigmaVM ?? 0.0015) * 1000).toFixed(1)} mm). Every change is recorded in the audit log.
      </p>
      <PointsEditor slug={site.slug} points={points} />
    </main>
  );
}
