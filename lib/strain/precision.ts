/**
 * First-order propagation of coordinate standard deviations to strain quantities (domain.md §4):
 * σ_f² = Σ_k (∂f/∂c_k)² σ_k² over every input coordinate of both epochs, coordinates independent
 * (the law of propagation of variances; e.g. Caspary 2000, *Concepts of Network and Deformation
 * Analysis*, ch. 2; Fujii, Sugita & Nakane 1986 for strain from geodetic networks).
 *
 * Affine fits (triangles and least-squares groups, d = 2 or 3). With weighted-centred coordinates
 * X̃_i, x̃_i, weights w_i, A = Σ w_i X̃_i X̃_iᵀ, F = (Σ w_i x̃_i X̃_iᵀ) A⁻¹, residuals r_i = x̃_i − F X̃_i and
 * g_i = w_i A⁻¹ X̃_i (the centring terms vanish because Σ w_i X̃_i = Σ w_i x̃_i = 0):
 *
 *   ∂F/∂(x_i)_m = e_m g_iᵀ                      (current coordinates)
 *   ∂F/∂(X_i)_m = w_i r_i (A⁻¹e_m)ᵀ − F e_m g_iᵀ (reference coordinates)
 *
 * so for a scalar f(F) with Γ = ∂f/∂F:
 *
 *   ∂f/∂(x_i)_m = (Γ g_i)_m,   ∂f/∂(X_i)_m = (A⁻¹ Γᵀ w_i r_i)_m − (Fᵀ Γ g_i)_m.
 *
 * For a triangle (exact fit, r = 0) g_b, g_c are the rows of D_X⁻¹ and g_a = −(g_b + g_c).
 * Eigenvalue gradients (distinct eigenvalues, unit eigenvector n of E): ∂λ_E/∂F = (F n) nᵀ, since
 * dE = ½(dFᵀF + FᵀdF) gives nᵀ dE n = (F n)·(dF n) (first-order perturbation of a symmetric
 * eigenproblem; e.g. Magnus & Neudecker 1999, *Matrix Differential Calculus*, Thm 8.9).
 * Determinant: ∂det F/∂F = cof F (Jacobi's formula).
 */

/** Inputs of `sigmaOfAffineFunction`, flat and row-major; n points, dimension d. */
export interface AffineSensitivity {
  d: 2 | 3;
  n: number;
  /** F, d×d. */
  F: Float64Array;
  /** A⁻¹, d×d (only used when residuals are non-zero). */
  aInv: Float64Array;
  /** g_i, n×d. */
  g: Float64Array;
  /** w_i·r_i, n×d (all zero for an exact fit). */
  wr: Float64Array;
  /** σ of reference coordinates, n×d, metres. */
  sigmaRef: Float64Array;
  /** σ of current coordinates, n×d, metres. */
  sigmaCur: Float64Array;
}

/** σ of a scalar f(F) whose gradient ∂f/∂F is `gamma` (d×d row-major). */
export function sigmaOfAffineFunction(s: AffineSensitivity, gamma: Float64Array): number {
  const { d, n, F, aInv, g, wr, sigmaRef, sigmaCur } = s;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    for (let m = 0; m < d; m++) {
      // (Γ g_i)_m
      let cur = 0;
      for (let j = 0; j < d; j++) cur += gamma[m * d + j] * g[i * d + j];
      // (Fᵀ Γ g_i)_m = Σ_a F_am (Γ g_i)_a
      let ftg = 0;
      for (let a = 0; a < d; a++) {
        let gg = 0;
        for (let j = 0; j < d; j++) gg += gamma[a * d + j] * g[i * d + j];
        ftg += F[a * d + m] * gg;
      }
      // (A⁻¹ Γᵀ w_i r_i)_m = Σ_b A⁻¹_mb Σ_a Γ_ab (w r)_ia
      let res = 0;
      for (let b = 0; b < d; b++) {
        let gr = 0;
        for (let a = 0; a < d; a++) gr += gamma[a * d + b] * wr[i * d + a];
        res += aInv[m * d + b] * gr;
      }
      const ref = res - ftg;
      const sc = sigmaCur[i * d + m];
      const sr = sigmaRef[i * d + m];
      sum += cur * cur * sc * sc + ref * ref * sr * sr;
    }
  }
  return Math.sqrt(sum);
}

/** Γ = (F n) nᵀ, the gradient of an eigenvalue of E = ½(FᵀF − I) with unit eigenvector n. */
export function eigenGradient(F: Float64Array, d: 2 | 3, n: ArrayLike<number>): Float64Array {
  const out = new Float64Array(d * d);
  for (let i = 0; i < d; i++) {
    let fn = 0;
    for (let k = 0; k < d; k++) fn += F[i * d + k] * n[k];
    for (let j = 0; j < d; j++) out[i * d + j] = fn * n[j];
  }
  return out;
}

/** Γ = cof F = ∂det F/∂F. */
export function determinantGradient(F: Float64Array, d: 2 | 3): Float64Array {
  if (d === 2) return Float64Array.of(F[3], -F[2], -F[1], F[0]);
  const [a, b, c, e, f, g, h, i, j] = F;
  return Float64Array.of(f * j - g * i, -(e * j - g * h), e * i - f * h, -(b * j - c * i), a * j - c * h, -(a * i - b * h), b * g - c * f, -(a * g - c * e), a * f - b * e);
}

/** Element-wise a − b of two gradients. */
export function subtractGradients(a: Float64Array, b: Float64Array): Float64Array {
  const out = new Float64Array(a.length);
  for (let k = 0; k < a.length; k++) out[k] = a[k] - b[k];
  return out;
}

/** σ from explicit per-coordinate gradients: √Σ (∂f/∂c_k)² σ_k². */
export function sigmaFromGradients(gradient: ArrayLike<number>, sigma: ArrayLike<number>): number {
  let sum = 0;
  for (let k = 0; k < gradient.length; k++) sum += gradient[k] * gradient[k] * sigma[k] * sigma[k];
  return Math.sqrt(sum);
}

/** The significance test of domain.md §4: |f| > k·σ_f. */
export function isSignificant(value: number, sigma: number, k: number): boolean {
  return Math.abs(value) > k * sigma;
}
