/**
 * The printable report of a site and period (?from=&to=, see lib/server/schemas/reports.ts). The
 * HTML comes from lib/server/reports/html.ts, the same as the PDF's; its print stylesheet hides the
 * application's bars, breaks pages and numbers them (CSS @page margin boxes).
 */
import type { Metadata } from "next";
import Link from "next/link";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { isAppError } from "@/lib/server/errors.ts";
import { buildReportData } from "@/lib/server/reports/data.ts";
import { renderReportHtml } from "@/lib/server/reports/html.ts";
import { latestEpochMs } from "@/lib/server/reports/period.ts";
import { MAX_REPORT_DAYS, parsePeriod, type Period } from "@/lib/server/schemas/reports.ts";
import { PrintButton } from "./PrintButton.tsx";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Report" };

const one = (v: string | string[] | undefined): string | undefined => (Array.isArray(v) ? v[0] : v);

export default async function ReportViewPage({ params, searchParams }: { params: Promise<{ slug: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { slug } = await params;
  const sp = await searchParams;
  const q = { from: one(sp.from), to: one(sp.to) };
  const qs = new URLSearchParams(Object.entries(q).filter((e): e is [string, string] => !!e[1]));
  const { site, user } = await requireSiteRole(slug, "read", `/sites/${slug}/reports/view${qs.size ? `?${qs}` : ""}`);
  const s = encodeURIComponent(site.slug);
  const db = getDb();
  let period: Period;
  try {
    period = parsePeriod(q, { timeZone: site.timeZone, latestEpochMs: await latestEpochMs(site.id, db), nowMs: Date.now(), maxDays: MAX_REPORT_DAYS });
  } catch (err) {
    if (!isAppError(err)) throw err;
    return (
      <main id="main">
        <h1>Report · {site.name}</h1>
        <p className="error" role="alert">
          {err.message} {err.errors?.map((e) => `${e.field ?? ""}: ${e.message}`).join("; ")}
        </p>
        <Link href={`/sites/${s}/reports`}>Choose another period</Link>
      </main>
    );
  }
  const data = await buildReportData(site, period, { label: `${user.name} <${user.email}>` }, db);
  const html = renderReportHtml(data, { marginBoxes: true });
  const pdfQuery = new URLSearchParams({ from: new Date(period.fromMs).toISOString(), to: new Date(period.toMs).toISOString() });
  return (
    <main id="main">
      <style dangerouslySetInnerHTML={{ __html: html.css }} />
      <div className="rpt-toolbar no-print" style={{ display: "flex", gap: 10, alignItems: "center", margin: "0 0 10px" }}>
        <Link href={`/sites/${s}/reports`}>← Period and exports</Link>
        <PrintButton />
        <a className="button secondary" href={`/api/v1/sites/${s}/report.pdf?${pdfQuery}`}>
          Download PDF
        </a>
      </div>
      <div dangerouslySetInnerHTML={{ __html: html.body }} />
    </main>
  );
}
