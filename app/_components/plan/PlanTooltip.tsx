"use client";
/** Hover read-out of one element: the chosen quantity with σ and significance, principal values and azimuth. */
import { formatStrain, quantityValue, QUANTITY_INFO, type FieldElement, type PlanQuantity, type StrainUnit } from "@/lib/plan/index.ts";
import type { Shape } from "./planTypes.ts";

export function PlanTooltip(p: { x: number; y: number; w: number; shape: Shape; fe: FieldElement; quantity: PlanQuantity; unit: StrainUnit; k: number }) {
  const { fe, unit } = p;
  const qv = quantityValue(fe, p.shape.el.kind, p.quantity, p.k);
  const info = QUANTITY_INFO[p.quantity];
  const fmt = (v: number | null, s: number | null) => (v === null ? "–" : `${formatStrain(v, unit, { signed: true })}${s !== null ? ` ± ${formatStrain(s, unit, { withUnit: false })}` : ""}`);
  const left = p.x + 260 > p.w ? p.x - 250 : p.x + 14;
  return (
    <div className="plan-tooltip" style={{ left, top: p.y + 14 }} role="status">
      <strong>{p.shape.el.name}</strong> <span className="muted">{p.shape.el.kind}, {p.shape.el.mode}</span>
      {fe.status !== "ok" ? (
        <div className="error">Not computed: {fe.status}</div>
      ) : (
        <dl>
          <dt>{qv.axial ? "Axial strain (l − L)/L" : info.label}</dt>
          <dd>
            {info.kind === "angle" && !qv.axial ? (qv.value === null ? "–" : `${qv.value.toFixed(4)}°`) : fmt(qv.value, qv.sigma)}
            {qv.significant === null ? "" : qv.significant ? " · significant" : " · not significant"}
          </dd>
          {!qv.axial ? (
            <>
              <dt>Principal (Green)</dt>
              <dd>
                {fmt(fe.greenMax, fe.sigmaGreenMax)} / {fmt(fe.greenMin, fe.sigmaGreenMin)}
              </dd>
              <dt>Major axis azimuth</dt>
              <dd>{fe.azimuthMaxDeg === null ? "none (isotropic)" : `${fe.azimuthMaxDeg.toFixed(1)}° from grid north`}</dd>
            </>
          ) : null}
        </dl>
      )}
      <div className="muted small">Click to open the element</div>
    </div>
  );
}
