/** The site's elements with their latest values, sortable by the reader's eye (largest first). */
import type { Metadata } from "next";
import Link from "next/link";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { listElements } from "@/lib/server/elements.ts";
import { getSiteHeader } from "@/lib/server/dashboard/site.ts";
import { getStrainField } from "@/lib/server/dashboard/field.ts";
import { formatStrain, isSignificant } from "@/lib/plan/index.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Elements" };

export default async function ElementsPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site } = await requireSiteRole(slug, "read", `/sites/${slug}/elements`);
  const [elements, header] = await Promise.all([listElements(getDb(), site), getSiteHeader(site.id)]);
  const field = header?.latest ? await getStrainField(site.id, { epochId: header.latest.id }) : null;
  const byId = new Map((field?.elements ?? []).map((e) => [e.id, e]));
  const rows = elements
    .map((el) => {
      const fe = byId.get(el.id);
      const value = fe ? (el.kind === "baseline" ? fe.engineering : fe.greenMax) : null;
      const sigma = fe ? (el.kind === "baseline" ? fe.sigmaEngineering : fe.sigmaGreenMax) : null;
      return { el, fe, value, sigma };
    })
    .sort((a, b) => Math.abs(b.value ?? 0) - Math.abs(a.value ?? 0));
  return (
    <main id="main" className="wide">
      <h1>Elements ({elements.length})</h1>
      <p className="muted">At the latest epoch, against each element's reference; largest first. Triangles and groups: principal Green strains; baselines: axial strain.</p>
      <table>
        <thead>
          <tr>
            <th scope="col">Element</th>
            <th scope="col">Kind</th>
            <th scope="col">Points</th>
            <th scope="col" className="num">Major / axial</th>
            <th scope="col" className="num">Minor</th>
            <th scope="col" className="num">σ</th>
            <th scope="col">Significant</th>
            <th scope="col">Status</th>
          </tr>
        </thead>
        <tbody>
          {rows.map(({ el, fe, value, sigma }) => {
            const sig = isSignificant(value, sigma);
            return (
              <tr key={el.id}>
                <td>
                  <Link href={`/sites/${site.slug}/elements/${el.id}`}>{el.name}</Link>
                  {el.label ? <span className="muted"> {el.label}</span> : null}
                </td>
                <td>
                  {el.kind}, {el.mode}
                </td>
                <td className="small">{el.points.join(" ")}</td>
                <td className="num">{formatStrain(value, "ue", { signed: true })}</td>
                <td className="num">{el.kind === "baseline" ? "" : formatStrain(fe?.greenMin, "ue", { signed: true })}</td>
                <td className="num">{formatStrain(sigma, "ue")}</td>
                <td>{sig === null ? "–" : sig ? "yes" : "no"}</td>
                <td>{fe?.status ?? "no result"}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </main>
  );
}
