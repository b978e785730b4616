/**
 * LU factorisation with partial (row) pivoting and the matching triangular solves, for small dense real
 * square systems stored row-major.
 *
 * Reference: G. H. Golub and C. F. Van Loan, Matrix Computations, 4th ed. (Johns Hopkins, 2013),
 * §3.4 (Gaussian elimination with partial pivoting) and §3.1 (triangular systems).
 */
import { ScienceInputError } from "../errors";
import { squareMatrixFromRows } from "./dense-matrix";

/**
 * Factorises P·A = L·U in place.
 *
 * Method: for each column k, pick the row with the largest |a_ik| (i ≥ k) as pivot, swap it into row k,
 * store the multipliers l_ik = a_ik / a_kk below the diagonal and update the trailing block. L is unit lower
 * triangular (its unit diagonal is not stored), U occupies the upper triangle.
 *
 * @param a - row-major n×n matrix, overwritten by L (strictly lower part) and U (upper part)
 * @param n - matrix order
 * @param pivots - length ≥ n; on return `pivots[k]` is the row swapped with row k at step k
 * @throws ScienceInputError when a pivot is exactly zero or not finite (the matrix is singular to working
 *   precision)
 */
export function luFactorInPlace(a: Float64Array, n: number, pivots: Int32Array): void {
  for (let k = 0; k < n; k++) {
    let pivotRow = k;
    let pivotSize = Math.abs(a[k * n + k]!);
    for (let i = k + 1; i < n; i++) {
      const size = Math.abs(a[i * n + k]!);
      if (size > pivotSize) {
        pivotSize = size;
        pivotRow = i;
      }
    }
    pivots[k] = pivotRow;
    if (pivotSize === 0 || !Number.isFinite(pivotSize)) {
      throw new ScienceInputError(`Matrix is singular to working precision (zero pivot in column ${k}).`, {
        column: k,
      });
    }
    if (pivotRow !== k) {
      const rowK = k * n;
      const rowP = pivotRow * n;
      for (let j = 0; j < n; j++) {
        const swap = a[rowK + j]!;
        a[rowK + j] = a[rowP + j]!;
        a[rowP + j] = swap;
      }
    }
    const rowK = k * n;
    const inversePivot = 1 / a[rowK + k]!;
    for (let i = k + 1; i < n; i++) {
      const rowI = i * n;
      const multiplier = a[rowI + k]! * inversePivot;
      a[rowI + k] = multiplier;
      if (multiplier === 0) continue;
      for (let j = k + 1; j < n; j++) a[rowI + j]! -= multiplier * a[rowK + j]!;
    }
  }
}

/**
 * Solves A·x = b in place from the factors of {@link luFactorInPlace}.
 *
 * Method: apply the recorded row swaps to b, then forward substitution with the unit lower factor and back
 * substitution with the upper factor.
 *
 * @param lu - the factored matrix (output of `luFactorInPlace`)
 * @param n - matrix order
 * @param pivots - the pivot record of `luFactorInPlace`
 * @param b - right-hand side (length ≥ n), overwritten by the solution x
 */
export function luSolveInPlace(lu: Float64Array, n: number, pivots: Int32Array, b: Float64Array): void {
  for (let k = 0; k < n; k++) {
    const p = pivots[k]!;
    if (p !== k) {
      const swap = b[k]!;
      b[k] = b[p]!;
      b[p] = swap;
    }
  }
  for (let i = 1; i < n; i++) {
    let sum = b[i]!;
    const rowI = i * n;
    for (let j = 0; j < i; j++) sum -= lu[rowI + j]! * b[j]!;
    b[i] = sum;
  }
  for (let i = n - 1; i >= 0; i--) {
    let sum = b[i]!;
    const rowI = i * n;
    for (let j = i + 1; j < n; j++) sum -= lu[rowI + j]! * b[j]!;
    b[i] = sum / lu[rowI + i]!;
  }
}

/**
 * Solves the square real system A·x = b (convenience wrapper that allocates).
 *
 * @param matrix - A as nested rows (n×n, finite)
 * @param rightHandSide - b (length n)
 * @returns x (length n)
 * @throws ScienceInputError for a non-square or singular matrix or a length mismatch
 */
export function solveLinearSystem(
  matrix: readonly (readonly number[])[],
  rightHandSide: readonly number[],
): Float64Array {
  const n = matrix.length;
  if (rightHandSide.length !== n) {
    throw new ScienceInputError(
      `Right-hand side has ${rightHandSide.length} entries; the matrix has ${n} rows.`,
    );
  }
  const lu = squareMatrixFromRows(matrix);
  const pivots = new Int32Array(n);
  luFactorInPlace(lu, n, pivots);
  const x = Float64Array.from(rightHandSide);
  luSolveInPlace(lu, n, pivots, x);
  return x;
}

/**
 * Inverse of a square real matrix from its LU factors: solves A·X = I column by column.
 *
 * @param matrix - A as nested rows (n×n)
 * @returns A⁻¹, row-major n×n
 * @throws ScienceInputError when A is singular to working precision
 */
export function invertMatrix(matrix: readonly (readonly number[])[]): Float64Array {
  const n = matrix.length;
  const lu = squareMatrixFromRows(matrix);
  const pivots = new Int32Array(n);
  luFactorInPlace(lu, n, pivots);
  const inverse = new Float64Array(n * n);
  const column = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    column.fill(0);
    column[j] = 1;
    luSolveInPlace(lu, n, pivots, column);
    for (let i = 0; i < n; i++) inverse[i * n + j] = column[i]!;
  }
  return inverse;
}
