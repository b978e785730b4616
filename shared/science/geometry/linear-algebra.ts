/**
 * Small dense linear algebra for molecular geometry: 3-vectors, 3×3 matrices and a cyclic Jacobi
 * eigensolver for small real symmetric matrices (3×3 inertia tensors, 4×4 quaternion matrices).
 * Kept here rather than pulled from a numerics library because the matrices are tiny and the routines must
 * run unchanged in the browser, the worker and the CLI.
 */

export type Vec3 = [number, number, number];
/** Row-major 3×3 matrix: m[row][column]. */
export type Mat3 = [Vec3, Vec3, Vec3];

export function vec(x: number, y: number, z: number): Vec3 {
  return [x, y, z];
}

export function add(a: Vec3, b: Vec3): Vec3 {
  return [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
}

export function sub(a: Vec3, b: Vec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}

export function scale(a: Vec3, s: number): Vec3 {
  return [a[0] * s, a[1] * s, a[2] * s];
}

export function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

export function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

export function norm(a: Vec3): number {
  return Math.hypot(a[0], a[1], a[2]);
}

export function distance(a: Vec3, b: Vec3): number {
  return Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
}

/** Unit vector along `a`; the zero vector is returned unchanged (callers check the norm first). */
export function normalize(a: Vec3): Vec3 {
  const n = norm(a);
  return n === 0 ? [0, 0, 0] : [a[0] / n, a[1] / n, a[2] / n];
}

export function identity3(): Mat3 {
  return [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
}

export function matVec(m: Mat3, v: Vec3): Vec3 {
  return [
    m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
    m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
    m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
  ];
}

export function matMul(a: Mat3, b: Mat3): Mat3 {
  const out = identity3();
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      const row = a[i]!;
      out[i]![j] = row[0] * b[0][j]! + row[1] * b[1][j]! + row[2] * b[2][j]!;
    }
  }
  return out;
}

export function transpose(m: Mat3): Mat3 {
  return [
    [m[0][0], m[1][0], m[2][0]],
    [m[0][1], m[1][1], m[2][1]],
    [m[0][2], m[1][2], m[2][2]],
  ];
}

export function determinant(m: Mat3): number {
  return dot(m[0], cross(m[1], m[2]));
}

export function trace(m: Mat3): number {
  return m[0][0] + m[1][1] + m[2][2];
}

/** Largest absolute entry of a − b: a cheap matrix distance for comparing symmetry operations. */
export function maxAbsDifference(a: Mat3, b: Mat3): number {
  let worst = 0;
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      worst = Math.max(worst, Math.abs(a[i]![j]! - b[i]![j]!));
    }
  }
  return worst;
}

/** Matrix whose rows are the given vectors. */
export function fromRows(r0: Vec3, r1: Vec3, r2: Vec3): Mat3 {
  return [
    [r0[0], r0[1], r0[2]],
    [r1[0], r1[1], r1[2]],
    [r2[0], r2[1], r2[2]],
  ];
}

export interface SymmetricEigen {
  /** Eigenvalues in ascending order. */
  values: number[];
  /** vectors[k] is the unit eigenvector for values[k]. */
  vectors: number[][];
}

/**
 * Eigenvalues and eigenvectors of a small real symmetric matrix by the cyclic Jacobi method.
 *
 * @param matrix - n×n symmetric matrix (only the upper triangle is trusted; n ≤ ~10 is the intended use)
 * @returns eigenvalues ascending, each with a unit eigenvector (orthonormal set)
 *
 * Method: repeated sweeps over the off-diagonal entries; each plane rotation (Jacobi rotation) zeroes one
 * entry p,q with the numerically stable choice of tan θ = sgn(τ)/(|τ| + √(1+τ²)), τ = (a_qq − a_pp)/(2a_pq).
 * Sweeps stop when the off-diagonal norm falls below 1e-15 of the matrix norm (quadratic convergence: a 3×3
 * tensor needs 4–6 sweeps). Eigenvectors accumulate the rotations.
 * Reference: Golub & Van Loan, "Matrix Computations", 4th ed., §8.5 (Jacobi methods); Press et al.,
 * "Numerical Recipes", 3rd ed., §11.1.
 */
export function jacobiEigenSymmetric(matrix: readonly (readonly number[])[]): SymmetricEigen {
  const n = matrix.length;
  const a = matrix.map((row, i) => row.map((_, j) => (j >= i ? matrix[i]![j]! : matrix[j]![i]!)));
  const v: number[][] = Array.from({ length: n }, (_, i) =>
    Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)),
  );
  let scaleNorm = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) scaleNorm += a[i]![j]! ** 2;
  scaleNorm = Math.sqrt(scaleNorm);
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += a[p]![q]! ** 2;
    if (Math.sqrt(off) <= 1e-15 * scaleNorm || off === 0) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p]![q]!;
        if (apq === 0) continue;
        const tau = (a[q]![q]! - a[p]![p]!) / (2 * apq);
        const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k]![p]!;
          const akq = a[k]![q]!;
          a[k]![p] = c * akp - s * akq;
          a[k]![q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p]![k]!;
          const aqk = a[q]![k]!;
          a[p]![k] = c * apk - s * aqk;
          a[q]![k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k]![p]!;
          const vkq = v[k]![q]!;
          v[k]![p] = c * vkp - s * vkq;
          v[k]![q] = s * vkp + c * vkq;
        }
      }
    }
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((i, j) => a[i]![i]! - a[j]![j]!);
  return {
    values: order.map((i) => a[i]![i]!),
    vectors: order.map((i) => v.map((row) => row[i]!)),
  };
}

/** Rotation matrix for a unit quaternion (w, x, y, z). */
export function quaternionToMatrix(w: number, x: number, y: number, z: number): Mat3 {
  return [
    [w * w + x * x - y * y - z * z, 2 * (x * y - w * z), 2 * (x * z + w * y)],
    [2 * (x * y + w * z), w * w - x * x + y * y - z * z, 2 * (y * z - w * x)],
    [2 * (x * z - w * y), 2 * (y * z + w * x), w * w - x * x - y * y + z * z],
  ];
}

/**
 * Rotation matrix about a unit axis by an angle (right-hand rule), Rodrigues' formula.
 *
 * @param axis - unit vector
 * @param angleRad - rotation angle in radians
 */
export function rotationAboutAxis(axis: Vec3, angleRad: number): Mat3 {
  const half = angleRad / 2;
  const s = Math.sin(half);
  return quaternionToMatrix(Math.cos(half), axis[0] * s, axis[1] * s, axis[2] * s);
}

/** Reflection through the plane with unit normal `n`: I − 2 n nᵀ. */
export function reflectionThroughPlane(n: Vec3): Mat3 {
  return [
    [1 - 2 * n[0] * n[0], -2 * n[0] * n[1], -2 * n[0] * n[2]],
    [-2 * n[1] * n[0], 1 - 2 * n[1] * n[1], -2 * n[1] * n[2]],
    [-2 * n[2] * n[0], -2 * n[2] * n[1], 1 - 2 * n[2] * n[2]],
  ];
}
