/**
 * Least-squares orthogonal fit between two point sets with known correspondence: the rotation (or
 * rotation-reflection) R minimising Σ |R xᵢ − yᵢ|². Used to turn an atom permutation found within a
 * tolerance into the best symmetry matrix for it.
 */
import { jacobiEigenSymmetric, type Mat3, quaternionToMatrix, type Vec3 } from "../geometry/linear-algebra";

/**
 * Best orthogonal matrix mapping `source[i]` onto `target[i]` (both about the same centre).
 *
 * @param source - points xᵢ (Å)
 * @param target - points yᵢ (Å), same length
 * @param proper - true: det R = +1 (rotation); false: det R = −1 (reflection, inversion, improper rotation)
 * @returns the 3×3 matrix R
 *
 * Method (Horn's closed form with unit quaternions): build S = Σ xᵢ yᵢᵀ and the symmetric 4×4 matrix N(S);
 * the eigenvector of its largest eigenvalue is the optimal rotation quaternion. It works for planar and
 * linear point sets, where SVD-based recipes need special care. An improper R is −P with P the best
 * rotation from xᵢ to −yᵢ.
 * Reference: B. K. P. Horn, J. Opt. Soc. Am. A 4, 629 (1987), doi:10.1364/JOSAA.4.000629.
 */
export function fitOrthogonal(source: readonly Vec3[], target: readonly Vec3[], proper: boolean): Mat3 {
  const sign = proper ? 1 : -1;
  let sxx = 0;
  let sxy = 0;
  let sxz = 0;
  let syx = 0;
  let syy = 0;
  let syz = 0;
  let szx = 0;
  let szy = 0;
  let szz = 0;
  for (let i = 0; i < source.length; i++) {
    const x = source[i]!;
    const y = target[i]!;
    const y0 = sign * y[0];
    const y1 = sign * y[1];
    const y2 = sign * y[2];
    sxx += x[0] * y0;
    sxy += x[0] * y1;
    sxz += x[0] * y2;
    syx += x[1] * y0;
    syy += x[1] * y1;
    syz += x[1] * y2;
    szx += x[2] * y0;
    szy += x[2] * y1;
    szz += x[2] * y2;
  }
  const n = [
    [sxx + syy + szz, syz - szy, szx - sxz, sxy - syx],
    [syz - szy, sxx - syy - szz, sxy + syx, szx + sxz],
    [szx - sxz, sxy + syx, -sxx + syy - szz, syz + szy],
    [sxy - syx, szx + sxz, syz + szy, -sxx - syy + szz],
  ];
  const { vectors } = jacobiEigenSymmetric(n);
  const q = vectors[3]!;
  const qn = Math.hypot(q[0]!, q[1]!, q[2]!, q[3]!);
  const rotation = quaternionToMatrix(q[0]! / qn, q[1]! / qn, q[2]! / qn, q[3]! / qn);
  if (proper) return rotation;
  return rotation.map((row) => row.map((value) => -value)) as Mat3;
}
