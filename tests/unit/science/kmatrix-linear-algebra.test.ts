/**
 * Dense linear algebra used by the K-matrix code: LU solve, products, Jacobi eigenvalues, Householder
 * least squares and the complex symmetric LDLᵀ inverse.
 */
import { ScienceInputError } from "@shared/science/errors";
import { ComplexSymmetricWorkspace } from "@shared/science/linear-algebra/complex-symmetric-inverse";
import { multiplyMatrices, squareMatrixFromRows } from "@shared/science/linear-algebra/dense-matrix";
import { solveLeastSquares } from "@shared/science/linear-algebra/least-squares";
import { invertMatrix, solveLinearSystem } from "@shared/science/linear-algebra/lu";
import { symmetricEigen } from "@shared/science/linear-algebra/symmetric-eigen";
import { describe, expect, it } from "vitest";
import { randomSymmetricMatrix, seededUniform } from "./support/random-matrices";

describe("LU solve with partial pivoting", () => {
  it("solves a system whose first pivot is zero (needs a row swap)", () => {
    // [[0, 2, 1], [1, 1, 0], [3, 0, 1]] · (1, −2, 3) = (−1, −1, 6), multiplied out by hand.
    const x = solveLinearSystem(
      [
        [0, 2, 1],
        [1, 1, 0],
        [3, 0, 1],
      ],
      [-1, -1, 6],
    );
    expect(Array.from(x)).toEqual([expect.closeTo(1, 14), expect.closeTo(-2, 14), expect.closeTo(3, 14)]);
  });

  it("inverts the 4×4 Hilbert matrix to its known integer inverse", () => {
    // Source: M.-D. Choi, Amer. Math. Monthly 90, 301 (1983), closed form of the inverse Hilbert matrix;
    // tolerance 1e-8 relative (condition number ≈ 1.6e4).
    const hilbert = Array.from({ length: 4 }, (_, i) => Array.from({ length: 4 }, (_, j) => 1 / (i + j + 1)));
    const expected = [
      [16, -120, 240, -140],
      [-120, 1200, -2700, 1680],
      [240, -2700, 6480, -4200],
      [-140, 1680, -4200, 2800],
    ];
    const inverse = invertMatrix(hilbert);
    expected.flat().forEach((value, index) => {
      expect(Math.abs(inverse[index]! - value)).toBeLessThan(1e-8 * Math.abs(value));
    });
  });

  it("rejects a singular matrix", () => {
    expect(() =>
      solveLinearSystem(
        [
          [1, 2],
          [2, 4],
        ],
        [1, 2],
      ),
    ).toThrow(ScienceInputError);
  });
});

describe("matrix product", () => {
  it("multiplies a 2×3 by a 3×2 matrix (worked by hand)", () => {
    // [[1,2,3],[4,5,6]] · [[7,8],[9,10],[11,12]] = [[58,64],[139,154]].
    const c = multiplyMatrices([1, 2, 3, 4, 5, 6], [7, 8, 9, 10, 11, 12], 2, 3, 2);
    expect(Array.from(c)).toEqual([58, 64, 139, 154]);
  });
});

describe("Jacobi symmetric eigenvalues", () => {
  it("reproduces the spectrum 2 − 2cos(kπ/(n+1)) of the tridiagonal (−1, 2, −1) matrix", () => {
    // Source: closed form for tridiagonal Toeplitz matrices (eigenvectors sin(ijπ/(n+1)), common practice);
    // tolerance 1e-13 absolute.
    const n = 10;
    const rows = Array.from({ length: n }, (_, i) =>
      Array.from({ length: n }, (_, j) => (i === j ? 2 : Math.abs(i - j) === 1 ? -1 : 0)),
    );
    const { values, vectors } = symmetricEigen(squareMatrixFromRows(rows), n, { vectors: true });
    for (let k = 1; k <= n; k++) {
      expect(Math.abs(values[k - 1]! - (2 - 2 * Math.cos((k * Math.PI) / (n + 1))))).toBeLessThan(1e-13);
    }
    // A·v = λ·v for every column.
    for (let k = 0; k < n; k++) {
      for (let i = 0; i < n; i++) {
        let av = 0;
        for (let j = 0; j < n; j++) av += rows[i]![j]! * vectors![j * n + k]!;
        expect(Math.abs(av - values[k]! * vectors![i * n + k]!)).toBeLessThan(1e-13);
      }
    }
  });

  it("preserves the trace and the Frobenius norm of a random 30×30 matrix (seed 11)", () => {
    // Invariants: Σλ = tr A and Σλ² = ‖A‖_F² for symmetric A; tolerance 1e-12 relative.
    const n = 30;
    const rows = randomSymmetricMatrix(n, 11);
    const { values } = symmetricEigen(squareMatrixFromRows(rows), n);
    const trace = rows.reduce((sum, row, i) => sum + row[i]!, 0);
    const frobenius2 = rows.flat().reduce((sum, value) => sum + value * value, 0);
    expect(Math.abs(values.reduce((s, v) => s + v, 0) - trace)).toBeLessThan(1e-12 * n);
    expect(Math.abs(values.reduce((s, v) => s + v * v, 0) - frobenius2) / frobenius2).toBeLessThan(1e-12);
    for (let k = 1; k < n; k++) expect(values[k]!).toBeGreaterThanOrEqual(values[k - 1]!);
  });
});

describe("Householder least squares", () => {
  it("matches the closed-form simple linear regression slope and intercept", () => {
    // Source: ordinary least squares for y = a + b·x: b = Σ(x−x̄)(y−ȳ)/Σ(x−x̄)², a = ȳ − b·x̄.
    const x = [0, 1, 2, 3, 4, 5];
    const y = [1.1, 2.9, 5.2, 7.1, 8.8, 11.2];
    const xBar = x.reduce((s, v) => s + v, 0) / x.length;
    const yBar = y.reduce((s, v) => s + v, 0) / y.length;
    let sxy = 0;
    let sxx = 0;
    x.forEach((xi, i) => {
      sxy += (xi - xBar) * (y[i]! - yBar);
      sxx += (xi - xBar) ** 2;
    });
    const slope = sxy / sxx;
    const design = x.flatMap((xi) => [1, xi]);
    const { solution } = solveLeastSquares(design, x.length, 2, y);
    expect(solution[1]!).toBeCloseTo(slope, 12);
    expect(solution[0]!).toBeCloseTo(yBar - slope * xBar, 12);
  });

  it("reports linearly dependent columns", () => {
    expect(() => solveLeastSquares([1, 2, 2, 4, 3, 6], 3, 2, [1, 2, 3])).toThrow(/rank deficient/);
  });
});

describe("complex symmetric LDLᵀ inverse of 1 − iK", () => {
  it("gives X with X·(1 − iK) = 1 and arg det = −Σ arctan λ(K) for a random 40×40 K (seed 5)", () => {
    // Checks: the defining identity of the inverse (tolerance 1e-12), and det(1 − iK) = Π(1 − iλ_k) with the
    // eigenvalues λ_k from the independent Jacobi solver (tolerance 1e-11 rad).
    const n = 40;
    const k = squareMatrixFromRows(randomSymmetricMatrix(n, 5, 3));
    // Shift the spectrum upwards so that Σ arctan λ is many times π (tests that no 2π reduction happens).
    for (let i = 0; i < n; i++) k[i * n + i]! += 4;
    const workspace = new ComplexSymmetricWorkspace(n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j <= i; j++) {
        workspace.inputReal[i * n + j] = i === j ? 1 : 0;
        workspace.inputImag[i * n + j] = -k[i * n + j]!;
      }
    }
    const argDeterminant = workspace.invert(n);
    const x = (i: number, j: number) => (i >= j ? i * n + j : j * n + i);
    let worst = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        // (X(1 − iK))_ij = X_ij + Σ_m (−i)·X_im K_mj → real Xr_ij + Σ Xi_im K_mj, imag Xi_ij − Σ Xr_im K_mj.
        let re = workspace.inverseReal[x(i, j)]!;
        let im = workspace.inverseImag[x(i, j)]!;
        for (let m = 0; m < n; m++) {
          re += workspace.inverseImag[x(i, m)]! * k[m * n + j]!;
          im -= workspace.inverseReal[x(i, m)]! * k[m * n + j]!;
        }
        worst = Math.max(worst, Math.abs(re - (i === j ? 1 : 0)), Math.abs(im));
      }
    }
    expect(worst).toBeLessThan(1e-12);
    const { values } = symmetricEigen(k, n);
    const eigenphaseSum = values.reduce((sum, lambda) => sum + Math.atan(lambda), 0);
    expect(Math.abs(-argDeterminant - eigenphaseSum)).toBeLessThan(1e-11);
    expect(eigenphaseSum).toBeGreaterThan(4 * Math.PI);
  });

  it("reuses one workspace for matrices of different orders", () => {
    const random = seededUniform(3);
    const workspace = new ComplexSymmetricWorkspace(6);
    for (const n of [6, 2, 5]) {
      const values = Array.from({ length: n }, () => 2 * random() - 1);
      // Diagonal K: X = diag(1/(1 − iλ)) exactly.
      for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) {
          workspace.inputReal[i * n + j] = i === j ? 1 : 0;
          workspace.inputImag[i * n + j] = i === j ? -values[i]! : 0;
        }
      }
      workspace.invert(n);
      values.forEach((lambda, i) => {
        expect(workspace.inverseReal[i * n + i]!).toBeCloseTo(1 / (1 + lambda * lambda), 14);
        expect(workspace.inverseImag[i * n + i]!).toBeCloseTo(lambda / (1 + lambda * lambda), 14);
      });
    }
  });
});
