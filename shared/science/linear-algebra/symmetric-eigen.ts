/**
 * Eigenvalues (and optionally eigenvectors) of a small dense real symmetric matrix by the cyclic Jacobi
 * method.
 *
 * Jacobi is chosen over Householder tridiagonalisation + QL because it is short, unconditionally convergent
 * and gives eigenvalues to high relative accuracy; it is used for single matrices (eigenphases at one
 * energy), not in the energy loop, where the cost ~10·n³ per matrix would dominate.
 *
 * Reference: G. H. Golub and C. F. Van Loan, Matrix Computations, 4th ed. (2013), §8.5 (Jacobi methods);
 * rotation angle chosen as in Rutishauser's formulation (Numer. Math. 9, 1 (1966)).
 */
import { ScienceInputError } from "../errors";

/** Eigen-decomposition A = V·diag(values)·Vᵀ with `values` ascending. */
export interface SymmetricEigenResult {
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Row-major n×n matrix whose column j is the unit eigenvector of `values[j]`; present when requested. */
  vectors?: Float64Array;
  /** Number of full sweeps over the off-diagonal elements. */
  sweeps: number;
}

const MAX_SWEEPS = 100;

/**
 * Diagonalises a real symmetric matrix.
 *
 * Method: repeated sweeps over all pairs (p, q), p < q; each plane rotation annihilates a_pq using
 * t = sgn(θ)/(|θ| + √(θ² + 1)) with θ = (a_qq − a_pp)/(2 a_pq). Iterates until the off-diagonal Frobenius
 * norm falls below 1e-15 of the full norm (or a_pq is negligible against both diagonal entries).
 *
 * @param matrix - row-major n×n values (only the lower triangle is read; the upper is assumed equal)
 * @param n - matrix order
 * @param options.vectors - also accumulate the eigenvectors (default false)
 * @returns eigenvalues ascending (and eigenvectors as columns when asked)
 * @throws ScienceInputError when an entry is not finite or the iteration does not converge
 */
export function symmetricEigen(
  matrix: ArrayLike<number>,
  n: number,
  options: { vectors?: boolean } = {},
): SymmetricEigenResult {
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const value = matrix[i * n + j]!;
      if (!Number.isFinite(value)) {
        throw new ScienceInputError(`Matrix entry (${i}, ${j}) is not a finite number.`);
      }
      a[i * n + j] = value;
      a[j * n + i] = value;
    }
  }
  const wantVectors = options.vectors === true;
  const v = wantVectors ? new Float64Array(n * n) : undefined;
  if (v) for (let i = 0; i < n; i++) v[i * n + i] = 1;

  let total = 0;
  for (let i = 0; i < n * n; i++) total += a[i]! * a[i]!;
  const threshold = 1e-30 * total;

  let sweeps = 0;
  for (; sweeps < MAX_SWEEPS; sweeps++) {
    let off = 0;
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += 2 * a[p * n + q]! ** 2;
    if (off <= threshold) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p * n + q]!;
        if (apq === 0) continue;
        const app = a[p * n + p]!;
        const aqq = a[q * n + q]!;
        // Skip rotations whose effect is below rounding of both diagonal entries.
        if (sweeps > 3 && Math.abs(apq) * 1e17 < Math.min(Math.abs(app), Math.abs(aqq))) {
          a[p * n + q] = 0;
          a[q * n + p] = 0;
          continue;
        }
        const theta = (aqq - app) / (2 * apq);
        const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k * n + p]!;
          const akq = a[k * n + q]!;
          a[k * n + p] = c * akp - s * akq;
          a[k * n + q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p * n + k]!;
          const aqk = a[q * n + k]!;
          a[p * n + k] = c * apk - s * aqk;
          a[q * n + k] = s * apk + c * aqk;
        }
        if (v) {
          for (let k = 0; k < n; k++) {
            const vkp = v[k * n + p]!;
            const vkq = v[k * n + q]!;
            v[k * n + p] = c * vkp - s * vkq;
            v[k * n + q] = s * vkp + c * vkq;
          }
        }
      }
    }
  }
  if (sweeps === MAX_SWEEPS) {
    throw new ScienceInputError(`Jacobi eigenvalue iteration did not converge in ${MAX_SWEEPS} sweeps.`);
  }

  const order = Array.from({ length: n }, (_, i) => i).sort((i, j) => a[i * n + i]! - a[j * n + j]!);
  const values = new Float64Array(n);
  for (let j = 0; j < n; j++) values[j] = a[order[j]! * (n + 1)]!;
  if (!v) return { values, sweeps };
  const vectors = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const source = order[j]!;
    for (let i = 0; i < n; i++) vectors[i * n + j] = v[i * n + source]!;
  }
  return { values, vectors, sweeps };
}
