/**
 * Inverse of a complex symmetric matrix A = Aᵀ (not Hermitian) whose Hermitian part (A + Aᴴ)/2 is positive
 * definite, by an LDLᵀ factorisation without pivoting. The K-matrix formulas need exactly this for
 * A = 1 − iK with K real symmetric (Hermitian part = identity).
 *
 * Why no pivoting is safe: Gaussian elimination on a matrix with positive definite Hermitian part never meets
 * a zero pivot and its growth factor is bounded (Golub & Van Loan, Matrix Computations, 4th ed., §4.2,
 * nonsymmetric positive definite systems; the argument carries over to the complex case). Every pivot d_k of
 * such a matrix has Re d_k > 0, which also makes Σ arg d_k an unambiguous, branch-free value of arg det A.
 *
 * Storage: separate real and imaginary row-major `Float64Array`s; only lower triangles are read or written.
 * A workspace object owns every buffer so that repeated inversions (one per energy) allocate nothing.
 */

/** Reusable buffers for inverting complex symmetric matrices of order ≤ `capacity`. */
export class ComplexSymmetricWorkspace {
  readonly capacity: number;
  /** Real part of the input matrix A: row-major with stride n (the order passed to `invert`), lower triangle. */
  readonly inputReal: Float64Array;
  /** Imaginary part of the input matrix A (lower triangle used). */
  readonly inputImag: Float64Array;
  /** Real part of A⁻¹ (lower triangle filled; A⁻¹ is symmetric). */
  readonly inverseReal: Float64Array;
  /** Imaginary part of A⁻¹ (lower triangle filled). */
  readonly inverseImag: Float64Array;
  /** Pivots d_k of A = L·D·Lᵀ, real and imaginary parts. */
  readonly pivotReal: Float64Array;
  readonly pivotImag: Float64Array;
  private readonly factorReal: Float64Array;
  private readonly factorImag: Float64Array;
  private readonly unitInverseReal: Float64Array;
  private readonly unitInverseImag: Float64Array;
  private readonly scaledReal: Float64Array;
  private readonly scaledImag: Float64Array;
  private readonly rowReal: Float64Array;
  private readonly rowImag: Float64Array;
  private dotReal = 0;
  private dotImag = 0;

  /** @param capacity - largest matrix order this workspace will be asked to invert */
  constructor(capacity: number) {
    this.capacity = capacity;
    const size = capacity * capacity;
    this.inputReal = new Float64Array(size);
    this.inputImag = new Float64Array(size);
    this.inverseReal = new Float64Array(size);
    this.inverseImag = new Float64Array(size);
    this.factorReal = new Float64Array(size);
    this.factorImag = new Float64Array(size);
    this.unitInverseReal = new Float64Array(size);
    this.unitInverseImag = new Float64Array(size);
    this.scaledReal = new Float64Array(size);
    this.scaledImag = new Float64Array(size);
    this.pivotReal = new Float64Array(capacity);
    this.pivotImag = new Float64Array(capacity);
    this.rowReal = new Float64Array(capacity);
    this.rowImag = new Float64Array(capacity);
  }

  /**
   * Complex dot product Σ_{k<length} x_k·y_k (no conjugation), left in `dotReal`/`dotImag`
   * (returning a pair would allocate in the innermost loop).
   * Two interleaved accumulators break the floating-point add dependency chain.
   */
  private dot(
    xr: Float64Array,
    xi: Float64Array,
    xOffset: number,
    yr: Float64Array,
    yi: Float64Array,
    yOffset: number,
    length: number,
  ): void {
    let r0 = 0;
    let i0 = 0;
    let r1 = 0;
    let i1 = 0;
    let k = 0;
    for (; k + 1 < length; k += 2) {
      const a0 = xr[xOffset + k]!;
      const a0i = xi[xOffset + k]!;
      const b0 = yr[yOffset + k]!;
      const b0i = yi[yOffset + k]!;
      const a1 = xr[xOffset + k + 1]!;
      const a1i = xi[xOffset + k + 1]!;
      const b1 = yr[yOffset + k + 1]!;
      const b1i = yi[yOffset + k + 1]!;
      r0 += a0 * b0 - a0i * b0i;
      i0 += a0 * b0i + a0i * b0;
      r1 += a1 * b1 - a1i * b1i;
      i1 += a1 * b1i + a1i * b1;
    }
    if (k < length) {
      const a0 = xr[xOffset + k]!;
      const a0i = xi[xOffset + k]!;
      const b0 = yr[yOffset + k]!;
      const b0i = yi[yOffset + k]!;
      r0 += a0 * b0 - a0i * b0i;
      i0 += a0 * b0i + a0i * b0;
    }
    this.dotReal = r0 + r1;
    this.dotImag = i0 + i1;
  }

  /**
   * Inverts the n×n complex symmetric matrix held in `inputReal`/`inputImag` (row-major, stride n, lower
   * triangle) into `inverseReal`/`inverseImag` (row-major, stride n, lower triangle).
   *
   * Method (≈ n³/2 complex multiply–adds):
   *  1. A = L·D·Lᵀ with L unit lower triangular: d_j = a_jj − Σ_k l_jk² d_k,
   *     l_ij = (a_ij − Σ_k l_ik l_jk d_k) / d_j (k < j), computed row-wise with v_k = l_jk d_k.
   *  2. W = L⁻¹ by forward substitution, stored transposed so that the inner products are contiguous.
   *  3. A⁻¹ = Wᵀ·D⁻¹·W, i.e. (A⁻¹)_ij = Σ_{k ≥ i} W_ki W_kj / d_k for i ≥ j.
   *
   * @param n - matrix order (≤ capacity)
   * @returns arg det A = Σ_k arg d_k in radians, each term in (−π/2, π/2) when the Hermitian part of A is
   *   positive definite
   */
  invert(n: number): number {
    if (n > this.capacity)
      throw new RangeError(`Matrix order ${n} exceeds workspace capacity ${this.capacity}.`);
    const ar = this.inputReal;
    const ai = this.inputImag;
    const lr = this.factorReal;
    const li = this.factorImag;
    const dr = this.pivotReal;
    const di = this.pivotImag;
    const vr = this.rowReal;
    const vi = this.rowImag;
    let argDeterminant = 0;

    // 1. LDLᵀ factorisation.
    for (let j = 0; j < n; j++) {
      const rowJ = j * n;
      for (let k = 0; k < j; k++) {
        const xr = lr[rowJ + k]!;
        const xi = li[rowJ + k]!;
        vr[k] = xr * dr[k]! - xi * di[k]!;
        vi[k] = xr * di[k]! + xi * dr[k]!;
      }
      this.dot(lr, li, rowJ, vr, vi, 0, j);
      const pr = ar[rowJ + j]! - this.dotReal;
      const pi = ai[rowJ + j]! - this.dotImag;
      dr[j] = pr;
      di[j] = pi;
      argDeterminant += Math.atan2(pi, pr);
      const modulus2 = pr * pr + pi * pi;
      const inverseR = pr / modulus2;
      const inverseI = -pi / modulus2;
      lr[rowJ + j] = 1;
      li[rowJ + j] = 0;
      for (let i = j + 1; i < n; i++) {
        const rowI = i * n;
        this.dot(lr, li, rowI, vr, vi, 0, j);
        const xr = ar[rowI + j]! - this.dotReal;
        const xi = ai[rowI + j]! - this.dotImag;
        lr[rowI + j] = xr * inverseR - xi * inverseI;
        li[rowI + j] = xr * inverseI + xi * inverseR;
      }
    }

    // 2. Transposed unit inverse: wt[j][i] = (L⁻¹)_ij for i ≥ j.
    const wr = this.unitInverseReal;
    const wi = this.unitInverseImag;
    for (let j = 0; j < n; j++) {
      const rowJ = j * n;
      wr[rowJ + j] = 1;
      wi[rowJ + j] = 0;
      for (let i = j + 1; i < n; i++) {
        const rowI = i * n;
        this.dot(lr, li, rowI + j + 1, wr, wi, rowJ + j + 1, i - j - 1);
        wr[rowJ + i] = -lr[rowI + j]! - this.dotReal;
        wi[rowJ + i] = -li[rowI + j]! - this.dotImag;
      }
    }

    // 3. Scale by D⁻¹, then form the lower triangle of Wᵀ·D⁻¹·W.
    const ur = this.scaledReal;
    const ui = this.scaledImag;
    for (let k = 0; k < n; k++) {
      const modulus2 = dr[k]! * dr[k]! + di[k]! * di[k]!;
      const inverseR = dr[k]! / modulus2;
      const inverseI = -di[k]! / modulus2;
      for (let j = 0; j <= k; j++) {
        const xr = wr[j * n + k]!;
        const xi = wi[j * n + k]!;
        ur[j * n + k] = xr * inverseR - xi * inverseI;
        ui[j * n + k] = xr * inverseI + xi * inverseR;
      }
    }
    const xr = this.inverseReal;
    const xi = this.inverseImag;
    for (let i = 0; i < n; i++) {
      const rowI = i * n;
      for (let j = 0; j <= i; j++) {
        this.dot(wr, wi, rowI + i, ur, ui, j * n + i, n - i);
        xr[rowI + j] = this.dotReal;
        xi[rowI + j] = this.dotImag;
      }
    }
    return argDeterminant;
  }
}
