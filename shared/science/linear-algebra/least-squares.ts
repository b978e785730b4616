/**
 * Linear least squares min ‖A·x − b‖₂ for a small dense m×n matrix (m ≥ n) by Householder QR.
 *
 * QR is used rather than the normal equations AᵀA·x = Aᵀb because it does not square the condition
 * number, which matters for nearly collinear basis functions such as ln T and 1/T over a narrow range.
 * Reference: G. H. Golub and C. F. Van Loan, Matrix Computations, 4th ed. (2013), §5.2 and §5.3.
 */
import { ScienceInputError } from "../errors";

/**
 * Solves the full-rank linear least-squares problem.
 *
 * Method: columns are first scaled to unit 2-norm; Householder reflections reduce A to upper triangular
 * R while being applied to b; back substitution on R gives the scaled solution, which is unscaled at the
 * end. The problem is declared rank deficient when |r_kk| < 1e-12 · max|r_ii|.
 *
 * @param matrix - row-major m×n design matrix (not modified)
 * @param m - number of observations (rows)
 * @param n - number of unknowns (columns), n ≤ m
 * @param rightHandSide - b, length m
 * @returns x (length n) and the residual 2-norm ‖A·x − b‖
 * @throws ScienceInputError when m < n or the columns are linearly dependent to working precision
 */
export function solveLeastSquares(
  matrix: ArrayLike<number>,
  m: number,
  n: number,
  rightHandSide: ArrayLike<number>,
): { solution: Float64Array; residualNorm: number } {
  if (m < n) throw new ScienceInputError(`Least squares needs at least ${n} observations; got ${m}.`);
  const a = Float64Array.from({ length: m * n }, (_, i) => matrix[i]!);
  const b = Float64Array.from({ length: m }, (_, i) => rightHandSide[i]!);
  const columnScale = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let norm = 0;
    for (let i = 0; i < m; i++) norm += a[i * n + j]! ** 2;
    norm = Math.sqrt(norm);
    if (norm === 0) throw new ScienceInputError(`Least-squares column ${j} is identically zero.`);
    columnScale[j] = norm;
    for (let i = 0; i < m; i++) a[i * n + j]! /= norm;
  }
  const v = new Float64Array(m);
  for (let k = 0; k < n; k++) {
    let norm = 0;
    for (let i = k; i < m; i++) norm += a[i * n + k]! ** 2;
    norm = Math.sqrt(norm);
    const alpha = a[k * n + k]! > 0 ? -norm : norm;
    for (let i = k; i < m; i++) v[i] = a[i * n + k]!;
    v[k]! -= alpha;
    let vNorm2 = 0;
    for (let i = k; i < m; i++) vNorm2 += v[i]! ** 2;
    if (vNorm2 === 0) continue;
    for (let j = k; j < n; j++) {
      let dot = 0;
      for (let i = k; i < m; i++) dot += v[i]! * a[i * n + j]!;
      const factor = (2 * dot) / vNorm2;
      for (let i = k; i < m; i++) a[i * n + j]! -= factor * v[i]!;
    }
    let dot = 0;
    for (let i = k; i < m; i++) dot += v[i]! * b[i]!;
    const factor = (2 * dot) / vNorm2;
    for (let i = k; i < m; i++) b[i]! -= factor * v[i]!;
  }
  let maxDiagonal = 0;
  for (let k = 0; k < n; k++) maxDiagonal = Math.max(maxDiagonal, Math.abs(a[k * n + k]!));
  const solution = new Float64Array(n);
  for (let k = n - 1; k >= 0; k--) {
    const diagonal = a[k * n + k]!;
    if (Math.abs(diagonal) < 1e-12 * maxDiagonal) {
      throw new ScienceInputError(
        "The least-squares problem is rank deficient: its basis functions are linearly dependent on these points.",
      );
    }
    let sum = b[k]!;
    for (let j = k + 1; j < n; j++) sum -= a[k * n + j]! * solution[j]!;
    solution[k] = sum / diagonal;
  }
  let residual2 = 0;
  for (let i = n; i < m; i++) residual2 += b[i]! ** 2;
  for (let j = 0; j < n; j++) solution[j]! /= columnScale[j]!;
  return { solution, residualNorm: Math.sqrt(residual2) };
}
