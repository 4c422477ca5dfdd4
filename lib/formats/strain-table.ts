/**
 * Plain-text tables of strain results for a terminal: strains in microstrain (µε = 1e-6), units in the
 * headers, `*` after a value that is significant at the run's confidence.
 */
import type { ElementJson } from "../strain/element.ts";

const MICRO = 1e6;

function fmtMicro(x: number | undefined): string {
  return x === undefined ? "" : (x * MICRO).toFixed(1);
}
function fmtDeg(x: number | null | undefined): string {
  return x === null || x === undefined ? "-" : x.toFixed(2);
}

function renderTable(headers: string[], rows: string[][], rightAlign: boolean[]): string {
  const widths = headers.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const cell = (s: string, i: number): string => (rightAlign[i] ? s.padStart(widths[i]) : s.padEnd(widths[i]));
  const lines = [headers.map(cell).join("  "), widths.map((w) => "-".repeat(w)).join("  "), ...rows.map((r) => r.map(cell).join("  "))];
  return lines.map((l) => l.trimEnd()).join("\n");
}

/** The tables for a run: triangles and groups, baselines, and elements that did not compute. */
export function formatStrainTable(elements: readonly ElementJson[], run: { confidence: number; k: number }): string {
  const planar: string[][] = [];
  const baselines: string[][] = [];
  const failed: string[][] = [];
  for (const e of elements) {
    if (e.status !== "ok") {
      failed.push([e.id, e.kind, e.mode, e.points.join(" "), e.status, e.message]);
      continue;
    }
    if ("engineering" in e) {
      const sig = e.significant.engineering ? "*" : "";
      baselines.push([e.id, e.mode, e.points.join(" "), e.lengthRefM.toFixed(4), e.lengthCurM.toFixed(4), fmtMicro(e.engineering) + sig, fmtMicro(e.sigma.engineering), fmtMicro(e.green), fmtMicro(e.log)]);
      continue;
    }
    if ("volumetricStrain" in e) {
      const s = e.significant;
      planar.push([e.id, e.kind, e.mode, fmtMicro(e.greenMax) + (s.greenMax ? "*" : ""), fmtMicro(e.sigma.greenMax), fmtMicro(e.greenMin) + (s.greenMin ? "*" : ""), fmtMicro(e.sigma.greenMin), fmtMicro(e.maxShear) + (s.maxShear ? "*" : ""), fmtMicro(e.sigma.maxShear), fmtMicro(e.volumetricStrain) + (s.volumetricStrain ? "*" : "") + " vol", fmtMicro(e.sigma.volumetricStrain), fmtDeg(e.rotationDeg), "-"]);
      continue;
    }
    const s = e.significant;
    const axis = "dipMaxDeg" in e ? `dip ${fmtDeg(e.dipMaxDeg)}` : `az ${fmtDeg(e.azimuthMaxDeg)}`;
    planar.push([e.id, e.kind, e.mode, fmtMicro(e.greenMax) + (s.greenMax ? "*" : ""), fmtMicro(e.sigma.greenMax), fmtMicro(e.greenMin) + (s.greenMin ? "*" : ""), fmtMicro(e.sigma.greenMin), fmtMicro(e.maxShear) + (s.maxShear ? "*" : ""), fmtMicro(e.sigma.maxShear), fmtMicro(e.arealStrain) + (s.arealStrain ? "*" : ""), fmtMicro(e.sigma.arealStrain), fmtDeg(e.rotationDeg), axis]);
  }
  const out: string[] = [];
  if (planar.length) {
    out.push(
      renderTable(
        ["element", "kind", "mode", "greenMax (µε)", "σ (µε)", "greenMin (µε)", "σ (µε)", "maxShear (µε)", "σ (µε)", "areal (µε)", "σ (µε)", "rotation (°)", "major axis (°)"],
        planar,
        [false, false, false, true, true, true, true, true, true, true, true, true, true],
      ),
    );
  }
  if (baselines.length) {
    out.push(renderTable(["baseline", "mode", "points", "L ref (m)", "l cur (m)", "engineering (µε)", "σ (µε)", "green (µε)", "log (µε)"], baselines, [false, false, false, true, true, true, true, true, true]));
  }
  if (failed.length) out.push(renderTable(["element", "kind", "mode", "points", "status", "message"], failed, [false, false, false, false, false, false]));
  const notes = elements.flatMap((e) => (e.status === "ok" && "warnings" in e ? e.warnings.map((w) => `${e.id}: ${w}`) : []));
  if (notes.length) out.push(`warnings:\n${notes.map((n) => `  ${n}`).join("\n")}`);
  if (!out.length) out.push("no elements");
  out.push(`* significant at ${(run.confidence * 100).toPrecision(3)} % (|value| > k·σ, k = ${run.k.toFixed(3)}). Extension positive; major axis: grid azimuth from north (plan) or dip from horizontal (surface).`);
  return out.join("\n\n");
}
