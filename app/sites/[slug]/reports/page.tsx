/**
 * Reports and exports of one site: pick a period (default: the 7 days up to the latest epoch), open
 * the printable report or download it as PDF, and download the period's data for other tools.
 */
import type { Metadata } from "next";
import Link from "next/link";
import { DateTime } from "luxon";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { roleAllows } from "@/lib/server/auth/permissions.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { latestEpochMs } from "@/lib/server/reports/period.ts";
import { chromiumPath } from "@/lib/server/reports/pdf.ts";
import { DEFAULT_PERIOD_DAYS } from "@/lib/server/schemas/reports.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Reports and exports" };

export default async function ReportsPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site, role, user } = await requireSiteRole(slug, "read", `/sites/${slug}/reports`);
  const latest = await latestEpochMs(site.id, getDb());
  const end = DateTime.fromMillis(latest ?? Date.now(), { zone: site.timeZone });
  const to = end.toISODate() ?? "";
  const from = end.minus({ days: DEFAULT_PERIOD_DAYS - 1 }).toISODate() ?? "";
  const s = encodeURIComponent(site.slug);
  const api = `/api/v1/sites/${s}`;
  const hasPdf = chromiumPath() !== null;
  return (
    <main id="main">
      <p className="muted">
        <Link href={`/sites/${s}`}>{site.name}</Link> › Reports
      </p>
      <h1>Reports and exports · {site.name}</h1>
      <form method="get" action={`/sites/${s}/reports/view`} className="panel" aria-labelledby="period-h">
        <h2 id="period-h">Period</h2>
        <p className="muted small">
          Whole days in the site&apos;s time zone ({site.timeZone}), both days included. Default: the {DEFAULT_PERIOD_DAYS} days up to the latest epoch
          {latest ? "" : " (the site has no epochs yet)"}.
        </p>
        <div style={{ display: "flex", gap: 16, flexWrap: "wrap", alignItems: "flex-end" }}>
          <div>
            <label htmlFor="from">From</label>
            <input id="from" name="from" type="date" defaultValue={from} required />
          </div>
          <div>
            <label htmlFor="to">To</label>
            <input id="to" name="to" type="date" defaultValue={to} required />
          </div>
          <button type="submit" data-testid="open-report">
            Open the report
          </button>
          <button type="submit" className="secondary" formAction={`${api}/report.pdf`} disabled={!hasPdf} title={hasPdf ? "A4 PDF rendered on the server" : "Chromium is not installed on the server"}>
            Download PDF
          </button>
        </div>
        {hasPdf ? null : <p className="muted small">PDF download needs Chromium on the server; open the report and print it from the browser instead.</p>}

        <h2>Exports of the period</h2>
        <p className="muted small">
          CSV: RFC 4180, UTF-8, units in the column names (<code>east_m</code>, <code>green_max_microstrain</code>, <code>sigma_green_max_microstrain</code>), times ISO 8601 in UTC. GeoJSON (RFC 7946): WGS84
          longitude, latitude and ellipsoidal height when the site has a geodetic origin; otherwise geometries are empty and the local coordinates are in the properties.
        </p>
        <div style={{ display: "flex", gap: 8, flexWrap: "wrap" }} data-testid="exports">
          <button type="submit" className="secondary" formAction={`${api}/export/observations.csv`}>
            Observations · CSV
          </button>
          <button type="submit" className="secondary" formAction={`${api}/export/observations.geojson`}>
            Observations · GeoJSON
          </button>
          <button type="submit" className="secondary" formAction={`${api}/export/results.csv`}>
            Computed strains · CSV
          </button>
          <button type="submit" className="secondary" formAction={`${api}/export/elements.geojson`}>
            Elements · GeoJSON
          </button>
        </div>
        <p className="small">
          {user.isAdmin ? (
            <a href={`/api/v1/audit.csv?site=${s}`}>Audit log of this site · CSV</a>
          ) : (
            <span className="muted">The audit log (CSV) is downloaded by a global administrator from the administration pages.</span>
          )}
        </p>
      </form>
      {roleAllows(role, "ingest") ? (
        <p>
          Data from another tool? <Link href={`/sites/${s}/setup/import`}>Import a CSV file with its own columns</Link>.
        </p>
      ) : null}
    </main>
  );
}
