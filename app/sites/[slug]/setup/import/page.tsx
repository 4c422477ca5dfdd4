/**
 * Import other people's CSV files: upload, see the header, map each of our fields to a column
 * (units mm or m, optional time column and its format), preview the converted rows with errors at
 * their source lines, then post the converted epoch CSV to the ingest API. The mapping is saved per
 * site (PUT /api/v1/sites/{slug}/column-mapping) and offered again next time.
 */
import type { Metadata } from "next";
import Link from "next/link";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getColumnMapping } from "@/lib/server/reports/column-mapping.ts";
import { ImportClient } from "./ImportClient.tsx";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Import a CSV file" };

export default async function ImportPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site } = await requireSiteRole(slug, "ingest", `/sites/${slug}/setup/import`);
  const saved = await getColumnMapping(site.id);
  const s = encodeURIComponent(site.slug);
  return (
    <main id="main">
      <p className="muted">
        <Link href={`/sites/${s}`}>{site.name}</Link> › Import a CSV file
      </p>
      <h1>Import a CSV file with its own columns</h1>
      <p className="muted">
        For files from other instruments and tools. Files already in Epochal&apos;s epoch CSV (columns <code>point,east,north,height[,time][,sigma_*]</code> in metres) can be posted directly to the ingest API.
      </p>
      <ImportClient slug={site.slug} timeZone={site.timeZone} saved={saved} />
    </main>
  );
}
