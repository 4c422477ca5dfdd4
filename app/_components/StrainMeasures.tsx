/** Green-Lagrange, Euler-Almansi and small strain side by side for one element and epoch, with what each means. */
import type { ElementJson } from "@/lib/strain/element.ts";
import { formatStrain } from "@/lib/plan/index.ts";

type Mat = number[][];

function Tensor({ m, strain = true }: { m: Mat; strain?: boolean }) {
  return (
    <table className="tensor" aria-label="tensor">
      <tbody>
        {m.map((row, i) => (
          <tr key={i}>
            {row.map((v, j) => (
              <td key={j}>{strain ? formatStrain(v, "ue", { withUnit: false, signed: true }) : v.toFixed(7)}</td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

const NOTES = {
  green:
    "Green-Lagrange E = ½(FᵀF − I): measured on the reference shape. Exact for any movement, rigid rotation gives zero. The quantity the trigger rules use.",
  almansi: "Euler-Almansi e = ½(I − (FFᵀ)⁻¹): the same deformation measured on the current, deformed shape. Slightly smaller than Green under extension.",
  small:
    "Small strain ε = ½(H + Hᵀ), H = F − I: the textbook linear measure. Agrees with the others for small strain and small rotation; it shows false strain when the element rotates.",
};

export function StrainMeasures({ strain }: { strain: ElementJson }) {
  if (strain.status !== "ok") return <p className="error">Not computed: {strain.message}</p>;
  if ("engineering" in strain && "lengthRefM" in strain) {
    return (
      <div className="grid-3">
        <div className="measure">
          <h3>Engineering (l − L)/L</h3>
          <p className="big">{formatStrain(strain.engineering, "ue", { signed: true })}</p>
          <p>Change of length over the reference length: {strain.lengthRefM.toFixed(4)} m → {strain.lengthCurM.toFixed(4)} m. σ = {formatStrain(strain.sigma.engineering, "ue")}.</p>
        </div>
        <div className="measure">
          <h3>Green (l² − L²)/(2L²)</h3>
          <p className="big">{formatStrain(strain.green, "ue", { signed: true })}</p>
          <p>{NOTES.green}</p>
        </div>
        <div className="measure">
          <h3>Almansi (l² − L²)/(2l²)</h3>
          <p className="big">{formatStrain(strain.almansi, "ue", { signed: true })}</p>
          <p>{NOTES.almansi} Logarithmic ln(l/L) = {formatStrain(strain.log, "ue", { signed: true })}.</p>
        </div>
      </div>
    );
  }
  if (!("green" in strain) || !Array.isArray(strain.green)) return null;
  const s = strain as ElementJson & { F: Mat; green: Mat; almansi: Mat; small: Mat; greenMax: number; greenMin: number; almansiMax: number; almansiMin: number; smallMax: number; smallMin: number; maxShear: number; rotationDeg: number; sigma: { greenMax: number; greenMin: number } };
  const az = "azimuthMaxDeg" in strain ? (strain.azimuthMaxDeg as number | null) : null;
  const areal = "arealStrain" in strain ? (strain.arealStrain as number) : null;
  return (
    <>
      <div className="grid-3">
        <div className="measure">
          <h3>Green-Lagrange E</h3>
          <Tensor m={s.green} />
          <p>
            Principal: <strong>{formatStrain(s.greenMax, "ue", { signed: true })}</strong> ± {formatStrain(s.sigma.greenMax, "ue", { withUnit: false })} /{" "}
            <strong>{formatStrain(s.greenMin, "ue", { signed: true })}</strong> ± {formatStrain(s.sigma.greenMin, "ue", { withUnit: false })}
          </p>
          <p className="muted">{NOTES.green}</p>
        </div>
        <div className="measure">
          <h3>Euler-Almansi e</h3>
          <Tensor m={s.almansi} />
          <p>
            Principal: <strong>{formatStrain(s.almansiMax, "ue", { signed: true })}</strong> / <strong>{formatStrain(s.almansiMin, "ue", { signed: true })}</strong>
          </p>
          <p className="muted">{NOTES.almansi}</p>
        </div>
        <div className="measure">
          <h3>Small strain ε</h3>
          <Tensor m={s.small} />
          <p>
            Principal: <strong>{formatStrain(s.smallMax, "ue", { signed: true })}</strong> / <strong>{formatStrain(s.smallMin, "ue", { signed: true })}</strong>
          </p>
          <p className="muted">{NOTES.small}</p>
        </div>
      </div>
      <div className="small">
        Deformation gradient F: <Tensor m={s.F} strain={false} /> Maximum shear {formatStrain(s.maxShear, "ue")}
        {areal !== null ? ` · areal strain ${formatStrain(areal, "ue", { signed: true })}` : ""} · rotation {s.rotationDeg.toFixed(4)}° (counter-clockwise +)
        {az !== null ? ` · major axis at ${az.toFixed(1)}° from grid north` : " · no preferred direction"}
      </div>
    </>
  );
}
