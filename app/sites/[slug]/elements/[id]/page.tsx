/** One element: time chart with σ band, levels and trend; the three strain measures at the latest epoch; points; alerts. */
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { isAppError } from "@/lib/server/errors.ts";
import { getElementDetail } from "@/lib/server/dashboard/element.ts";
import { listAlertsAcross } from "@/lib/server/dashboard/alerts.ts";
import { elementSeries } from "@/lib/server/series.ts";
import { elementTrend } from "@/lib/server/trends.ts";
import { ElementSeriesQuerySchema, TrendQuerySchema } from "@/lib/server/schemas/elements.ts";
import { formatLength, formatSiteTime, formatStrain } from "@/lib/plan/index.ts";
import { roleAllows } from "@/lib/server/auth/permissions.ts";
import { ElementChart, type ChartTrend } from "@/app/_components/charts/ElementChart.tsx";
import { StrainMeasures } from "@/app/_components/StrainMeasures.tsx";
import { AlertTable } from "@/app/_components/alerts/AlertTable.tsx";

export const dynamic = "force-dynamic";

export async function generateMetadata({ params }: { params: Promise<{ slug: string; id: string }> }): Promise<Metadata> {
  const p = await params;
  return { title: `Element ${p.id} · ${p.slug}` };
}

export default async function ElementPage({ params }: { params: Promise<{ slug: string; id: string }> }) {
  const { slug, id: rawId } = await params;
  const { site, role } = await requireSiteRole(slug, "read", `/sites/${slug}/elements/${rawId}`);
  const id = Number(rawId);
  if (!Number.isInteger(id) || id <= 0) notFound();
  let detail;
  try {
    detail = await getElementDetail(site, id);
  } catch (e) {
    if (isAppError(e) && e.code === "not_found") notFound();
    throw e;
  }
  const el = detail.element;
  const quantities = el.kind === "baseline" ? ["engineering"] : ["greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg"];
  const q0 = quantities[0];
  const db = getDb();
  const [series, trend, alerts] = await Promise.all([
    elementSeries(db, site, id, ElementSeriesQuerySchema.parse({ quantity: q0, maxPoints: "1500" })),
    elementTrend(db, site, id, TrendQuerySchema.parse({ quantity: q0 })).catch(() => null),
    listAlertsAcross([site.id], { state: "all", elementId: id, limit: 50 }),
  ]);
  const initialTrend: ChartTrend | null = trend ? ({ ...trend.trend, crossings: trend.crossings, inverseVelocity: trend.inverseVelocity } as ChartTrend) : null;
  const tz = site.timeZone;
  return (
    <main id="main" className="wide">
      <p className="muted small no-print">
        <Link href={`/sites/${site.slug}`}>Plan</Link> › <Link href={`/sites/${site.slug}/elements`}>Elements</Link> › {el.name}
      </p>
      <h1>
        {el.name} {el.label ? <span className="muted">— {el.label}</span> : null}
      </h1>
      <p className="muted">
        {el.kind}, {el.mode} mode · points {el.points.join(", ")} · {el.source === "triangulation" ? "from the triangulation" : "made by hand"}
        {el.minAngleDeg !== null ? ` · smallest angle ${el.minAngleDeg.toFixed(1)}°` : ""} · reference epoch{" "}
        {detail.referenceEpoch ? formatSiteTime(detail.referenceEpoch.timeMs, tz) : "none"}
        {el.referenceEpochId !== null ? " (its own)" : " (the site's)"}
        {el.disabled ? " · disabled" : ""}
      </p>

      <section className="panel">
        <h2>History</h2>
        <ElementChart
          slug={site.slug}
          elementId={id}
          quantities={quantities}
          initialQuantity={q0}
          initialPoints={series.points.map((p) => ({ tMs: Date.parse(p.t), value: p.value, sigma: p.sigma }))}
          initialTrend={initialTrend}
          rules={detail.rules.filter((r) => r.enabled)}
          timeZone={tz}
          k={series.significanceK}
        />
        {series.downsampled ? <p className="muted small">{series.count} epochs shown with {series.points.length} points: {series.method}.</p> : null}
        {series.skipped > 0 ? <p className="muted small">{series.skipped} epoch(s) without a value (a point missing, or the element degenerate).</p> : null}
      </section>

      <section className="panel">
        <h2>Strain at the latest epoch {detail.latestEpoch ? `(${formatSiteTime(detail.latestEpoch.timeMs, tz)})` : ""}</h2>
        <p className="muted small">Recomputed from the coordinates of the reference and the latest epoch. Tensor components in the basis (East, North); extension positive.</p>
        {detail.strain ? <StrainMeasures strain={detail.strain} /> : <p className="muted">No epoch to compare yet.</p>}
      </section>

      <div className="grid-2">
        <section className="panel">
          <h2>Points and their displacement</h2>
          <table>
            <thead>
              <tr>
                <th scope="col">Point</th>
                <th scope="col" className="num">ΔE</th>
                <th scope="col" className="num">ΔN</th>
                <th scope="col" className="num">ΔH</th>
                <th scope="col" className="num">Plan</th>
                <th scope="col">Significant (χ², 95 %)</th>
              </tr>
            </thead>
            <tbody>
              {detail.points.map((p) => (
                <tr key={p.code}>
                  <td>
                    {p.code}
                    {p.isReference ? <span className="tag"> reference</span> : null}
                  </td>
                  <td className="num">{formatLength(p.displacement?.dE)}</td>
                  <td className="num">{formatLength(p.displacement?.dN)}</td>
                  <td className="num">{formatLength(p.displacement?.dH)}</td>
                  <td className="num">{formatLength(p.displacement?.d2D)}</td>
                  <td>{p.displacement ? (p.displacement.significant === null ? "–" : p.displacement.significant ? "yes" : "no") : p.cur ? "no reference" : "not in the latest epoch"}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="muted small">Latest epoch minus reference epoch, metres shown as mm below 1 m.</p>
        </section>
        <section className="panel">
          <h2>Trigger rules on this element</h2>
          {detail.rules.length === 0 ? (
            <p className="muted">No rule watches this element.</p>
          ) : (
            <table>
              <thead>
                <tr>
                  <th scope="col">Rule</th>
                  <th scope="col">Quantity</th>
                  <th scope="col" className="num">Review</th>
                  <th scope="col" className="num">Alert</th>
                  <th scope="col" className="num">Limit</th>
                </tr>
              </thead>
              <tbody>
                {detail.rules.map((r) => (
                  <tr key={r.id}>
                    <td>
                      {r.name}
                      {r.enabled ? "" : " (off)"}
                    </td>
                    <td>{r.quantity}</td>
                    <td className="num">{formatStrain(r.reviewLevel, "ue")}</td>
                    <td className="num">{formatStrain(r.alertLevel, "ue")}</td>
                    <td className="num">{formatStrain(r.limitLevel, "ue")}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
      </div>

      <section className="panel">
        <h2>Alerts of this element</h2>
        <AlertTable alerts={alerts} canAcknowledge={roleAllows(role, "acknowledge")} showSite={false} />
      </section>
    </main>
  );
}
