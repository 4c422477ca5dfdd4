/** The elements with the largest major strain at the shown epoch, as a keyboard-reachable, printable table. */
import Link from "next/link";
import { formatStrain, isSignificant, type StrainField } from "@/lib/plan/index.ts";

export function TopElements({ slug, elements, field, limit = 12 }: { slug: string; elements: { id: number; name: string; kind: string }[]; field: StrainField; limit?: number }) {
  const byId = new Map(elements.map((e) => [e.id, e]));
  const rows = field.elements
    .map((fe) => {
      const el = byId.get(fe.id);
      const value = el?.kind === "baseline" ? fe.engineering : fe.greenMax;
      const sigma = el?.kind === "baseline" ? fe.sigmaEngineering : fe.sigmaGreenMax;
      return { fe, el, value, sigma };
    })
    .filter((r) => r.el && r.value !== null)
    .sort((a, b) => Math.abs(b.value as number) - Math.abs(a.value as number))
    .slice(0, limit);
  if (rows.length === 0) return null;
  return (
    <section className="panel top-elements">
      <h2>Largest strains at the latest epoch</h2>
      <table>
        <thead>
          <tr>
            <th scope="col">Element</th>
            <th scope="col">Kind</th>
            <th scope="col">Major strain (Green) or axial strain</th>
            <th scope="col">σ</th>
            <th scope="col">Significant</th>
          </tr>
        </thead>
        <tbody>
          {rows.map(({ fe, el, value, sigma }) => {
            const sig = isSignificant(value, sigma, field.k);
            return (
              <tr key={fe.id}>
                <td>
                  <Link prefetch={false} href={`/sites/${slug}/elements/${fe.id}`}>{el!.name}</Link>
                </td>
                <td>{el!.kind}</td>
                <td className="num">{formatStrain(value, "ue", { signed: true })}</td>
                <td className="num">{formatStrain(sigma, "ue")}</td>
                <td>{sig === null ? "–" : sig ? "yes" : "no"}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </section>
  );
}
