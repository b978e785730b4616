/**
 * T-matrix, S-matrix and eigenphases from a real symmetric K-matrix at one energy.
 *
 * Conventions (stated once, used everywhere in Sigmaflow):
 *   S = (1 + iK)(1 − iK)⁻¹,   T = S − 1 = 2iK(1 − iK)⁻¹.
 * K is the real symmetric reactance matrix over the open channels, S is unitary and symmetric, and
 * |T_ij|² enters the integral cross sections. Because 1 + iK = 2 − (1 − iK), both follow from one inverse:
 *   X = (1 − iK)⁻¹,   S = 2X − 1,   T = 2X − 2.
 * Equivalently, in real arithmetic with A = (1 + K²)⁻¹: Re T = −2K²A = 2(A − 1) and Im T = 2KA.
 * Eigenphases δ_k = arctan(λ_k) for the eigenvalues λ_k of K, so that the eigenvalues of S are e^{2iδ_k}.
 *
 * Reference: the K/S/T relations are standard multichannel scattering theory, e.g. N. F. Mott and
 * H. S. W. Massey, The Theory of Atomic Collisions, 3rd ed. (Oxford, 1965); A. M. Lane and
 * R. G. Thomas, Rev. Mod. Phys. 30, 257 (1958).
 */
import { ScienceInputError } from "../errors";
import { ComplexSymmetricWorkspace } from "../linear-algebra/complex-symmetric-inverse";
import { squareMatrixFromRows, symmetryDefect } from "../linear-algebra/dense-matrix";
import { symmetricEigen } from "../linear-algebra/symmetric-eigen";

/**
 * Default relative tolerance for K-matrix symmetry: max|K_ij − K_ji| ≤ tol · max|K_ij|. Loose enough for
 * values printed with 7 significant digits; the symmetric part (K + Kᵀ)/2 is used afterwards.
 */
export const KMATRIX_SYMMETRY_TOLERANCE = 1e-6;

/**
 * Largest accepted |K_ij|. An eigenvalue λ of K is tan δ, and beyond ~1e16 tan δ is already infinite to
 * double precision (δ = π/2 to the last bit), so larger entries only arise on a pole of K or from a units
 * or formatting error. Up to 1e100 every product of two entries, summed over the ≤ 2000 channels of the
 * LDLᵀ inversion, stays far inside the double range; at 1e308 the pivots' squared moduli overflow and the
 * results come out as NaN.
 */
export const MAX_KMATRIX_ENTRY = 1e100;

/** A dense complex matrix as nested rows of real and imaginary parts. */
export interface ComplexMatrixRows {
  real: number[][];
  imag: number[][];
}

/**
 * Checks that a row-major K-matrix is finite, within ±{@link MAX_KMATRIX_ENTRY} and symmetric within a
 * relative tolerance.
 *
 * @param kMatrix - row-major n×n values
 * @param n - matrix order
 * @param context - prefix for error messages (where the matrix comes from)
 * @param relativeTolerance - allowed max|K_ij − K_ji| / max|K_ij|
 * @throws ScienceInputError when an entry is not finite or too large, or the matrix is not symmetric
 */
export function assertSymmetricKMatrix(
  kMatrix: ArrayLike<number>,
  n: number,
  context: string,
  relativeTolerance = KMATRIX_SYMMETRY_TOLERANCE,
): void {
  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(kMatrix[i]!)) {
      throw new ScienceInputError(
        `${context}: K-matrix entry (${Math.floor(i / n)}, ${i % n}) is not a finite number.`,
      );
    }
    if (Math.abs(kMatrix[i]!) > MAX_KMATRIX_ENTRY) {
      const limit = MAX_KMATRIX_ENTRY.toExponential().replace("e+", "e");
      throw new ScienceInputError(
        `${context}: K-matrix entry (${Math.floor(i / n)}, ${i % n}) is ${kMatrix[i]}, beyond ±${limit}. ` +
          "An entry this large means the energy sits on a pole of K (tan δ infinite to double precision) " +
          "or the file has a units or formatting error: move the energy point slightly off the pole or " +
          "check the file.",
        { row: Math.floor(i / n), column: i % n, value: kMatrix[i] },
      );
    }
  }
  const { asymmetry, maxAbs } = symmetryDefect(kMatrix, n);
  if (asymmetry > relativeTolerance * maxAbs) {
    throw new ScienceInputError(
      `${context}: K-matrix is not symmetric (max |K_ij − K_ji| = ${asymmetry.toExponential(3)}, ` +
        `allowed ${(relativeTolerance * maxAbs).toExponential(3)}).`,
      { asymmetry, maxAbs },
    );
  }
}

/**
 * Loads K into a workspace as A = 1 − iK (symmetrised lower triangle) and inverts it.
 *
 * @param kMatrix - row-major n×n K-matrix (assumed validated)
 * @param n - number of open channels
 * @param workspace - buffers of capacity ≥ n; on return holds X = (1 − iK)⁻¹ (lower triangle)
 * @returns arg det(1 − iK) = −Σ_k arctan λ_k (exact, no branch ambiguity)
 */
export function invertOneMinusIK(
  kMatrix: ArrayLike<number>,
  n: number,
  workspace: ComplexSymmetricWorkspace,
): number {
  const ar = workspace.inputReal;
  const ai = workspace.inputImag;
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = 0; j < i; j++) {
      ar[row + j] = 0;
      ai[row + j] = -0.5 * (kMatrix[row + j]! + kMatrix[j * n + i]!);
    }
    ar[row + i] = 1;
    ai[row + i] = -kMatrix[row + i]!;
  }
  return workspace.invert(n);
}

function prepare(kMatrix: readonly (readonly number[])[]): { data: Float64Array; n: number } {
  const n = kMatrix.length;
  if (n === 0) throw new ScienceInputError("K-matrix is empty (no open channels).");
  const data = squareMatrixFromRows(kMatrix);
  assertSymmetricKMatrix(data, n, "K-matrix");
  return { data, n };
}

function fullRows(
  lowerReal: Float64Array,
  lowerImag: Float64Array,
  n: number,
  map: (re: number, im: number, diagonal: boolean) => [number, number],
): ComplexMatrixRows {
  const real: number[][] = [];
  const imag: number[][] = [];
  for (let i = 0; i < n; i++) {
    const rowR: number[] = new Array(n);
    const rowI: number[] = new Array(n);
    for (let j = 0; j < n; j++) {
      const index = i >= j ? i * n + j : j * n + i;
      const [re, im] = map(lowerReal[index]!, lowerImag[index]!, i === j);
      rowR[j] = re;
      rowI[j] = im;
    }
    real.push(rowR);
    imag.push(rowI);
  }
  return { real, imag };
}

/**
 * T-matrix T = 2iK(1 − iK)⁻¹ = S − 1 from a real symmetric K-matrix.
 *
 * @param kMatrix - K over the open channels (n×n, symmetric within {@link KMATRIX_SYMMETRY_TOLERANCE})
 * @returns real and imaginary parts of T (n×n, symmetric)
 * @throws ScienceInputError for an empty, non-square, non-finite or non-symmetric K
 */
export function tMatrixFromKMatrix(kMatrix: readonly (readonly number[])[]): ComplexMatrixRows {
  const { data, n } = prepare(kMatrix);
  const workspace = new ComplexSymmetricWorkspace(n);
  invertOneMinusIK(data, n, workspace);
  return fullRows(workspace.inverseReal, workspace.inverseImag, n, (re, im, diagonal) => [
    2 * re - (diagonal ? 2 : 0),
    2 * im,
  ]);
}

/**
 * S-matrix S = (1 + iK)(1 − iK)⁻¹ from a real symmetric K-matrix (unitary and symmetric).
 *
 * @param kMatrix - K over the open channels (n×n)
 * @returns real and imaginary parts of S (n×n)
 * @throws ScienceInputError for an invalid K (see {@link tMatrixFromKMatrix})
 */
export function sMatrixFromKMatrix(kMatrix: readonly (readonly number[])[]): ComplexMatrixRows {
  const { data, n } = prepare(kMatrix);
  const workspace = new ComplexSymmetricWorkspace(n);
  invertOneMinusIK(data, n, workspace);
  return fullRows(workspace.inverseReal, workspace.inverseImag, n, (re, im, diagonal) => [
    2 * re - (diagonal ? 1 : 0),
    2 * im,
  ]);
}

/**
 * Eigenphases δ_k = arctan(λ_k) of a K-matrix, λ_k its eigenvalues.
 *
 * Method: cyclic Jacobi diagonalisation of K ({@link symmetricEigen}); each δ_k lies in (−π/2, π/2).
 *
 * @param kMatrix - K over the open channels (n×n)
 * @returns eigenphases in radians, ascending
 * @throws ScienceInputError for an invalid K
 */
export function eigenphasesFromKMatrix(kMatrix: readonly (readonly number[])[]): Float64Array {
  const { data, n } = prepare(kMatrix);
  const { values } = symmetricEigen(data, n);
  return values.map((lambda) => Math.atan(lambda));
}

/**
 * Eigenphase sum Σ_k arctan(λ_k) without computing eigenvalues.
 *
 * Method: Σ_k arctan λ_k = −arg det(1 − iK), and arg det is accumulated from the LDLᵀ pivots of 1 − iK,
 * each of which has positive real part, so the sum is exact (no 2π ambiguity) and in (−nπ/2, nπ/2).
 *
 * @param kMatrix - K over the open channels (n×n)
 * @returns the eigenphase sum in radians
 * @throws ScienceInputError for an invalid K
 */
export function eigenphaseSumFromKMatrix(kMatrix: readonly (readonly number[])[]): number {
  const { data, n } = prepare(kMatrix);
  return -invertOneMinusIK(data, n, new ComplexSymmetricWorkspace(n));
}
