/**
 * GET /api/v1/sites/{slug}/report.pdf?from=&to= — the periodic report as PDF (A4), rendered on the
 * server by headless Chromium from the same HTML as /sites/{slug}/reports/view. 503 without Chromium.
 */
import { siteRoute } from "@/lib/server/http/route.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { buildReportData } from "@/lib/server/reports/data.ts";
import { renderReportHtml } from "@/lib/server/reports/html.ts";
import { renderPdf } from "@/lib/server/reports/pdf.ts";
import { latestEpochMs } from "@/lib/server/reports/period.ts";
import { MAX_REPORT_DAYS, parsePeriod } from "@/lib/server/schemas/reports.ts";

export const dynamic = "force-dynamic";

export const GET = siteRoute("read", async ({ req, site, actor }) => {
  const db = getDb();
  const period = parsePeriod(new URL(req.url).searchParams, { timeZone: site.timeZone, latestEpochMs: await latestEpochMs(site.id, db), nowMs: Date.now(), maxDays: MAX_REPORT_DAYS });
  const data = await buildReportData(site, period, { label: actor.kind === "user" ? `${actor.name} <${actor.email}>` : actor.label }, db);
  const html = renderReportHtml(data, { marginBoxes: false });
  const pdf = await renderPdf(html.document, html);
  const name = `${site.slug}-report-${new Date(period.fromMs).toISOString().slice(0, 10)}_${new Date(period.toMs).toISOString().slice(0, 10)}.pdf`;
  return new Response(pdf as BodyInit, { headers: { "Content-Type": "application/pdf", "Content-Disposition": `attachment; filename="${name}"`, "Cache-Control": "no-store" } });
});
