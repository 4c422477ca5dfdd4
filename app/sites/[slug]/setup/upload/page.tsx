/** Set-up: upload epoch files, previewed and checked in the browser first, posted in chunks with progress. */
import type { Metadata } from "next";
import Link from "next/link";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { SetupTabs } from "@/app/_components/setup/SetupTabs.tsx";
import { UploadEpochs } from "@/app/_components/setup/UploadEpochs.tsx";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Set-up · upload" };

export default async function UploadPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site } = await requireSiteRole(slug, "ingest", `/sites/${slug}/setup/upload`);
  return (
    <main id="main" className="wide">
      <h1>Set-up · {site.name}</h1>
      <SetupTabs slug={site.slug} current="upload" />
      <p className="muted">
        Epoch CSV: a header row with <code>point,east,north,height</code> and optionally <code>time</code> (ISO 8601 with an offset or Z), <code>sigma_east</code>, <code>sigma_north</code>,{" "}
        <code>sigma_height</code> (metres). Lines starting with # are comments. Several times in one file are several epochs. Coordinates in the site frame, metres; times are shown in {site.timeZone}.
      </p>
      <p className="muted">
        A file from another tool, with other column names or millimetres?{" "}
        <Link href={`/sites/${site.slug}/setup/import`}>Import it with a column mapping</Link>.
      </p>
      <UploadEpochs slug={site.slug} timeZone={site.timeZone} />
    </main>
  );
}
