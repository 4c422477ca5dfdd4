/**
 * The one module that talks to ml-matrix (least squares, inverse, symmetric eigen-decomposition),
 * on plain row-major `number[][]` so the rest of the engine never sees a Matrix object.
 */
import { EigenvalueDecomposition, Matrix, QrDecomposition, inverse } from "ml-matrix";

/** Least-squares solution X of design·X ≈ rhs (Householder QR; ml-matrix `QrDecomposition.solve`). */
export function leastSquares(design: number[][], rhs: number[][]): number[][] {
  const qr = new QrDecomposition(new Matrix(design));
  if (!qr.isFullRank()) throw new RangeError("leastSquares: design matrix is rank deficient");
  return qr.solve(new Matrix(rhs)).to2DArray();
}

/** Inverse of a square, non-singular matrix (LU). */
export function inverseMatrix(m: number[][]): number[][] {
  return inverse(new Matrix(m)).to2DArray();
}

/** Eigenvalues (descending) and unit eigenvectors (`vectors[k]` belongs to `values[k]`) of a symmetric matrix. */
export function symmetricEigen(m: number[][]): { values: number[]; vectors: number[][] } {
  const sym = m.map((row, i) => row.map((x, j) => 0.5 * (x + m[j][i])));
  const evd = new EigenvalueDecomposition(new Matrix(sym), { assumeSymmetric: true });
  const vals = evd.realEigenvalues;
  const vecs = evd.eigenvectorMatrix;
  const order = vals.map((_, i) => i).sort((a, b) => vals[b] - vals[a]);
  return {
    values: order.map((i) => vals[i]),
    vectors: order.map((i) => {
      const v = vecs.getColumn(i);
      const len = Math.hypot(...v);
      return v.map((x) => x / len);
    }),
  };
}
