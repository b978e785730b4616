/**
 * Small dense real matrices stored row-major in a `Float64Array` (element (i, j) of an m×n matrix at
 * `data[i * n + j]`). The science core keeps its own routines because the matrices are small (at most a few
 * hundred rows), the code must run unchanged in the browser, the worker and the CLI, and the hot loops must
 * not allocate.
 */
import { ScienceInputError } from "../errors";

/**
 * Copies a square matrix given as nested arrays into a row-major `Float64Array`.
 *
 * @param rows - the matrix as `rows[i][j]`; every row must have `rows.length` finite entries
 * @param out - optional destination of length ≥ n² (reused to avoid allocation)
 * @returns the row-major copy (`out` when given)
 * @throws ScienceInputError when the matrix is not square or holds a non-finite entry
 */
export function squareMatrixFromRows(rows: readonly (readonly number[])[], out?: Float64Array): Float64Array {
  const n = rows.length;
  const data = out ?? new Float64Array(n * n);
  if (data.length < n * n) {
    throw new ScienceInputError(`Destination buffer holds ${data.length} values; ${n * n} are needed.`);
  }
  for (let i = 0; i < n; i++) {
    const row = rows[i]!;
    if (row.length !== n) {
      throw new ScienceInputError(
        `Matrix is not square: row ${i} has ${row.length} entries, expected ${n}.`,
        {
          row: i,
        },
      );
    }
    for (let j = 0; j < n; j++) {
      const value = row[j]!;
      if (!Number.isFinite(value)) {
        throw new ScienceInputError(`Matrix entry (${i}, ${j}) is not a finite number.`, {
          row: i,
          column: j,
        });
      }
      data[i * n + j] = value;
    }
  }
  return data;
}

/**
 * Converts an n×n row-major matrix back to nested arrays (for JSON output and tests).
 *
 * @param data - row-major values, length ≥ n²
 * @param n - matrix order
 * @returns `rows[i][j]`
 */
export function rowsFromSquareMatrix(data: ArrayLike<number>, n: number): number[][] {
  const rows: number[][] = [];
  for (let i = 0; i < n; i++) {
    const row: number[] = new Array(n);
    for (let j = 0; j < n; j++) row[j] = data[i * n + j]!;
    rows.push(row);
  }
  return rows;
}

/**
 * Matrix product C = A·B of an m×p matrix A and a p×q matrix B (all row-major).
 *
 * Method: i–k–j loop order so that the innermost loop runs over contiguous rows of B and C.
 *
 * @param a - A, length m·p
 * @param b - B, length p·q
 * @param m - rows of A
 * @param p - columns of A = rows of B
 * @param q - columns of B
 * @param out - optional destination of length ≥ m·q; must not alias `a` or `b`
 * @returns C, length m·q
 */
export function multiplyMatrices(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  m: number,
  p: number,
  q: number,
  out?: Float64Array,
): Float64Array {
  const c = out ?? new Float64Array(m * q);
  c.fill(0, 0, m * q);
  for (let i = 0; i < m; i++) {
    const rowC = i * q;
    for (let k = 0; k < p; k++) {
      const aik = a[i * p + k]!;
      if (aik === 0) continue;
      const rowB = k * q;
      for (let j = 0; j < q; j++) c[rowC + j]! += aik * b[rowB + j]!;
    }
  }
  return c;
}

/**
 * Largest absolute difference |A_ij − A_ji| of a square matrix, and the largest |A_ij|, used to decide
 * whether a matrix is symmetric within a relative tolerance.
 *
 * @param data - row-major n×n values
 * @param n - matrix order
 * @returns `{ asymmetry, maxAbs }`
 */
export function symmetryDefect(data: ArrayLike<number>, n: number): { asymmetry: number; maxAbs: number } {
  let asymmetry = 0;
  let maxAbs = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const lower = data[i * n + j]!;
      const upper = data[j * n + i]!;
      const difference = Math.abs(lower - upper);
      if (difference > asymmetry) asymmetry = difference;
      const size = Math.max(Math.abs(lower), Math.abs(upper));
      if (size > maxAbs) maxAbs = size;
    }
  }
  return { asymmetry, maxAbs };
}
