/**
 * Point displacement components between a reference and a current epoch (domain.md §1, §4):
 * u = x − X, metres. Components dE, dN, dH; lengths d2D = √(dE² + dN²), d3D = √(dE² + dN² + dH²).
 *
 * σ, first order, independent coordinates: σ²(dE) = σ²_E,ref + σ²_E,cur (same for N, H). For a length
 * d = √(Σ d_k²): σ²(d) = Σ (d_k / d)² σ²(d_k). At d = 0 the derivative is undefined; there we give the
 * root mean square of the component σ (the σ of the length in any one direction).
 *
 * Significance of the length: dᵀΣ_d⁻¹d against the χ²(p) quantile (diagonal Σ_d), p = 2 or 3
 * (95 %: 5.991, 7.815; domain.md §4); of one component: |d| > k·σ.
 */

export const DISPLACEMENT_COMPONENTS = ["dE", "dN", "dH", "d2D", "d3D"] as const;
export type DisplacementComponent = (typeof DISPLACEMENT_COMPONENTS)[number];

/** 95 % χ² quantiles for 1, 2, 3 degrees of freedom (standard tables). */
export const CHI2_95 = { 1: 3.841, 2: 5.991, 3: 7.815 } as const;

export interface CoordinateRow {
  east: number;
  north: number;
  height: number;
  sigmaEast: number;
  sigmaNorth: number;
  sigmaHeight: number;
}

export interface DisplacementValue {
  value: number;
  sigma: number;
  significant: boolean;
}

/**
 * One component of the displacement of `cur` from `ref`. `k` is the two-sided normal factor for
 * single components; lengths use the 95 % χ² test (`chi2` overrides the quantile).
 */
export function displacementComponent(ref: CoordinateRow, cur: CoordinateRow, component: DisplacementComponent, k = 1.96, chi2?: number): DisplacementValue {
  const dE = cur.east - ref.east;
  const dN = cur.north - ref.north;
  const dH = cur.height - ref.height;
  const vE = ref.sigmaEast ** 2 + cur.sigmaEast ** 2;
  const vN = ref.sigmaNorth ** 2 + cur.sigmaNorth ** 2;
  const vH = ref.sigmaHeight ** 2 + cur.sigmaHeight ** 2;
  const single = (d: number, v: number): DisplacementValue => {
    const sigma = Math.sqrt(v);
    return { value: d, sigma, significant: Math.abs(d) > k * sigma };
  };
  if (component === "dE") return single(dE, vE);
  if (component === "dN") return single(dN, vN);
  if (component === "dH") return single(dH, vH);
  const threeD = component === "d3D";
  const d2 = dE * dE + dN * dN + (threeD ? dH * dH : 0);
  const d = Math.sqrt(d2);
  const sigma = d > 0 ? Math.sqrt((dE * dE * vE + dN * dN * vN + (threeD ? dH * dH * vH : 0)) / d2) : Math.sqrt((vE + vN + (threeD ? vH : 0)) / (threeD ? 3 : 2));
  const q = (vE > 0 ? (dE * dE) / vE : 0) + (vN > 0 ? (dN * dN) / vN : 0) + (threeD && vH > 0 ? (dH * dH) / vH : 0);
  const limit = chi2 ?? (threeD ? CHI2_95[3] : CHI2_95[2]);
  return { value: d, sigma, significant: q > limit };
}
