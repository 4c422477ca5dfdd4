/**
 * Strain of a baseline between two points (domain.md §3, "the squared-length view"):
 * L = |X_b − X_a|, l = |x_b − x_a|; engineering (l − L)/L, Green (l² − L²)/(2L²),
 * Almansi (l² − L²)/(2l²), logarithmic ln(l/L).
 * σ of the engineering strain by first-order propagation: ∂ε/∂x_b = û/L, ∂ε/∂x_a = −û/L,
 * ∂ε/∂X_b = −(l/L²) Û, ∂ε/∂X_a = (l/L²) Û (û, Û unit vectors a → b).
 */
import type { BaselineMode, BaselineStrainResult, StrainOptions, SurveyPoint } from "./types.ts";
import { checkPoint } from "./geometry.ts";
import { isSignificant } from "./precision.ts";
import { kFromOptions } from "./triangle.ts";

/** Points closer than this fraction of their coordinate magnitude count as coincident. */
export const COINCIDENT_RELATIVE = 1e-12;

export function computeBaselineStrain(
  ref: readonly [SurveyPoint, SurveyPoint],
  cur: readonly [SurveyPoint, SurveyPoint],
  mode: BaselineMode = "slope",
  opts: StrainOptions = {},
): BaselineStrainResult {
  const k = kFromOptions(opts);
  const withHeight = mode === "slope";
  const labels = ["a", "b"];
  for (let i = 0; i < 2; i++) {
    const bad = checkPoint(ref[i], `reference point ${labels[i]}`, withHeight) ?? checkPoint(cur[i], `current point ${labels[i]}`, withHeight);
    if (bad) return { status: "degenerate", message: bad };
  }
  const [Xa, Xb] = ref;
  const [xa, xb] = cur;
  const D = [Xb.east - Xa.east, Xb.north - Xa.north, withHeight ? Xb.height - Xa.height : 0];
  // Current edge = reference edge + displacement difference (keeps tiny strains exact at large coordinates).
  const dd = [xb.east - Xb.east - (xa.east - Xa.east), xb.north - Xb.north - (xa.north - Xa.north), withHeight ? xb.height - Xb.height - (xa.height - Xa.height) : 0];
  const d = [D[0] + dd[0], D[1] + dd[1], D[2] + dd[2]];
  const L = Math.hypot(D[0], D[1], D[2]);
  const l = Math.hypot(d[0], d[1], d[2]);
  const magRef = Math.max(Math.abs(Xa.east), Math.abs(Xa.north), Math.abs(Xb.east), Math.abs(Xb.north), withHeight ? Math.max(Math.abs(Xa.height), Math.abs(Xb.height)) : 0);
  const magCur = Math.max(Math.abs(xa.east), Math.abs(xa.north), Math.abs(xb.east), Math.abs(xb.north), withHeight ? Math.max(Math.abs(xa.height), Math.abs(xb.height)) : 0);
  if (!(L > COINCIDENT_RELATIVE * magRef)) return { status: "degenerate", message: "the two points coincide in the reference epoch" };
  if (!(l > COINCIDENT_RELATIVE * magCur)) return { status: "degenerate", message: "the two points coincide in the current epoch" };
  // l² − L² = 2 D·dd + |dd|², free of cancellation.
  const dSq = 2 * (D[0] * dd[0] + D[1] * dd[1] + D[2] * dd[2]) + (dd[0] * dd[0] + dd[1] * dd[1] + dd[2] * dd[2]);
  const engineering = dSq / (L * (l + L));
  const green = dSq / (2 * L * L);
  const almansi = dSq / (2 * l * l);
  const log = Math.log1p(engineering);

  const dims = withHeight ? 3 : 2;
  const sigRefA = [Xa.sigmaEast, Xa.sigmaNorth, Xa.sigmaHeight];
  const sigRefB = [Xb.sigmaEast, Xb.sigmaNorth, Xb.sigmaHeight];
  const sigCurA = [xa.sigmaEast, xa.sigmaNorth, xa.sigmaHeight];
  const sigCurB = [xb.sigmaEast, xb.sigmaNorth, xb.sigmaHeight];
  let variance = 0;
  for (let m = 0; m < dims; m++) {
    const gCur = d[m] / l / L;
    const gRef = (l / (L * L)) * (D[m] / L);
    variance += gCur * gCur * (sigCurA[m] ** 2 + sigCurB[m] ** 2) + gRef * gRef * (sigRefA[m] ** 2 + sigRefB[m] ** 2);
  }
  const sigma = Math.sqrt(variance);
  return {
    status: "ok",
    lengthRefM: L,
    lengthCurM: l,
    engineering,
    green,
    almansi,
    log,
    sigma: { engineering: sigma },
    significant: { engineering: isSignificant(engineering, sigma, k) },
  };
}
