/**
 * The standard orientation of a target: the frame in which the operations of its Abelian subgroup are the
 * diagonal sign matrices of {@link ABELIAN_TABLES}, with the remaining freedom fixed by the rules below.
 *
 * Orientation convention (documented in cli/docs/target.md):
 *  - C2v, C2h, C2: z along the C2 axis. D2h, D2: z along the C2 axis that coincides with the principal axis
 *    of the full group; otherwise the C2 axis through the most atoms, then the one with the smallest moment
 *    of inertia (the long axis).
 *  - C2v: the yz plane is the mirror plane containing the most atoms — for a planar molecule the molecular
 *    plane, with x perpendicular to it (Mulliken, J. Chem. Phys. 23, 1997 (1955)); so H2O lies in yz and
 *    its out-of-plane orbital is b1.
 *  - D2h, D2: for a planar molecule x is perpendicular to the molecular plane (Mulliken) unless that
 *    normal is z (benzene); otherwise x is the remaining C2 axis through more atoms, then the one with the
 *    smaller moment of inertia.
 *  - Cs: the mirror is the xy plane (z along its normal). C2h, C2, Cs: x is the in-plane direction of
 *    largest mass spread (smallest moment of inertia).
 *  - Ci, C1: x, y, z along the principal axes a, b, c (ascending moments of inertia).
 *  - Remaining freedom (axis signs, axes or mirrors equivalent under the rules above, the in-plane x of a
 *    group with an axis of order ≥ 3): the frame in which the atoms, sorted by (mass, z, x, y) descending,
 *    give the lexicographically largest coordinate list (heavy atoms at positive z first). This depends
 *    neither on the atom order nor on which of several symmetry-equivalent choices is met first; y
 *    completes a right-handed frame.
 */
import {
  cross,
  dot,
  jacobiEigenSymmetric,
  type Mat3,
  norm,
  normalize,
  scale,
  sub,
  type Vec3,
} from "../geometry/linear-algebra";
import { ABELIAN_TABLES, type AbelianGroupSymbol } from "./abelian-tables";
import { atomsInPlane, atomsOnAxis, type GeometryContext, parallel } from "./atoms-on-symmetry-elements";
import type { OperationLabel } from "./classify";
import { radialClasses } from "./operations";

/** Moment of inertia about an axis through the centre of mass (u·Å²). */
function momentAbout(ctx: GeometryContext, axis: Vec3): number {
  return ctx.positionsAngstrom.reduce((acc, p, i) => acc + ctx.massesU[i]! * norm(cross(p, axis)) ** 2, 0);
}

/** Second moment of the mass along a direction (u·Å²): small when the atoms lie near the plane ⟂ n. */
function spreadAlong(ctx: GeometryContext, n: Vec3): number {
  return ctx.positionsAngstrom.reduce((acc, p, i) => acc + ctx.massesU[i]! * dot(p, n) ** 2, 0);
}

/** Normal of the molecular plane when all atoms lie in one plane through the centre, else null. */
export function molecularPlaneNormal(
  positionsAngstrom: readonly Vec3[],
  massesU: readonly number[],
  toleranceAngstrom: number,
): Vec3 | null {
  const t = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  positionsAngstrom.forEach((p, i) => {
    for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) t[j]![k]! += massesU[i]! * p[j]! * p[k]!;
  });
  const { vectors } = jacobiEigenSymmetric(t);
  const normal = vectors[0]! as Vec3;
  return positionsAngstrom.every((p) => Math.abs(dot(p, normal)) <= toleranceAngstrom) ? normal : null;
}

/** Tolerance for comparing moments of inertia: the change a displacement of `tol` can make (u·Å²). */
function momentTolerance(ctx: GeometryContext): number {
  return (
    2 *
    ctx.toleranceAngstrom *
    ctx.positionsAngstrom.reduce((acc, p, i) => acc + ctx.massesU[i]! * norm(p), 0)
  );
}

/**
 * Candidate x directions in the plane ⟂ z: the direction of largest mass spread when it is unique, else
 * (an axis of order ≥ 3 makes the in-plane spread isotropic) the directions of the atoms of the smallest
 * off-axis class, which are equivalent candidates for the canonical choice below.
 */
function inPlaneXCandidates(ctx: GeometryContext, z: Vec3): Vec3[] {
  const t = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  const projected = ctx.positionsAngstrom.map((p) => sub(p, scale(z, dot(p, z))));
  projected.forEach((q, i) => {
    for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) t[j]![k]! += ctx.massesU[i]! * q[j]! * q[k]!;
  });
  const { values, vectors } = jacobiEigenSymmetric(t);
  if (values[2]! - values[1]! > momentTolerance(ctx)) return [vectors[2]! as Vec3];
  const offAxis = projected.flatMap((q, i) => (norm(q) > ctx.toleranceAngstrom ? [i] : []));
  if (offAxis.length === 0) return [normalize(cross(z, Math.abs(z[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0]))];
  const { members } = radialClasses(
    offAxis.map((i) => projected[i]!),
    offAxis.map((i) => String(ctx.massesU[i])),
    ctx.toleranceAngstrom,
  );
  const smallest = members.reduce((best, m) => (m.length < best.length ? m : best), members[0]!);
  return smallest.map((k) => normalize(projected[offAxis[k]!]!));
}

/**
 * Frames are ordered by the atoms' coordinates in each, sorted by (mass, z, x, y) descending and compared
 * lexicographically with the distance tolerance; the larger list wins. Invariant under atom order and
 * under the molecule's own symmetry, so equivalent choices give the same coordinates.
 */
function frameKeys(ctx: GeometryContext, frame: Mat3): number[][] {
  const tol = ctx.toleranceAngstrom;
  return ctx.positionsAngstrom
    .map((p, i) => [ctx.massesU[i]!, dot(frame[2], p), dot(frame[0], p), dot(frame[1], p)])
    .sort((u, v) => {
      for (let k = 0; k < 4; k++) if (Math.abs(u[k]! - v[k]!) > (k === 0 ? 1e-9 : tol)) return v[k]! - u[k]!;
      return 0;
    });
}

function compareKeys(tol: number, kf: number[][], kg: number[][]): number {
  for (let i = 0; i < kf.length; i++) {
    for (let k = 1; k < 4; k++) {
      const d = kf[i]![k]! - kg[i]![k]!;
      if (Math.abs(d) > tol) return d;
    }
  }
  return 0;
}

/**
 * Right-handed orthonormal frame (rows x, y, z) chosen canonically among candidate (z, x) directions and
 * their signs: the one whose sorted coordinate list ranks first.
 *
 * @param symmetricSigns - diagonal sign patterns of the Abelian subgroup; sign flips equal to one of them
 *   leave the coordinates unchanged and are not tried
 */
export function canonicalFrame(
  ctx: GeometryContext,
  candidates: readonly [Vec3, Vec3][],
  symmetricSigns: readonly (readonly [number, number, number])[] = [],
): Mat3 {
  let best: Mat3 | null = null;
  let bestKeys: number[][] = [];
  for (const [zIn, xIn] of candidates) {
    const z0 = normalize(zIn);
    const x0 = normalize(sub(xIn, scale(z0, dot(xIn, z0))));
    for (const sz of [1, -1]) {
      for (const sx of [1, -1]) {
        // Flipping axes by a sign pattern that is itself an operation of the molecule changes nothing.
        const redundant =
          (sz !== 1 || sx !== 1) &&
          symmetricSigns.some((g) => g[0] === sx && g[1] === sx * sz && g[2] === sz);
        if (redundant) continue;
        const z = scale(z0, sz);
        const x = scale(x0, sx);
        const frame: Mat3 = [x, cross(z, x), z];
        const keys = frameKeys(ctx, frame);
        if (!best || compareKeys(ctx.toleranceAngstrom, keys, bestKeys) > 0) {
          best = frame;
          bestKeys = keys;
        }
      }
    }
  }
  return best!;
}

/**
 * Standard frame of a target for its Abelian subgroup (rules in the module comment).
 *
 * @param symbol - the Abelian subgroup
 * @param labels - descriptions of the subgroup's operations (axes and mirror normals in the input frame)
 * @param ctx - centre-of-mass positions (Å), masses (u), tolerance (Å) and the full group's principal axis
 * @param inertiaAxes - principal axes a, b, c of the molecule (for Ci and C1)
 * @returns rows x, y, z of the standard frame in the centre-of-mass input frame (right-handed, orthonormal)
 */
export function standardOrientationFrame(
  symbol: AbelianGroupSymbol,
  labels: OperationLabel[],
  ctx: GeometryContext,
  inertiaAxes: [Vec3, Vec3, Vec3],
): Mat3 {
  const c2 = labels.filter((l) => l.kind === "C").map((l) => l.axis!);
  const mirrors = labels.filter((l) => l.kind === "sigma").map((l) => l.axis!);
  const planeNormal = molecularPlaneNormal(ctx.positionsAngstrom, ctx.massesU, ctx.toleranceAngstrom);
  const momentTol = momentTolerance(ctx);
  const signs = ABELIAN_TABLES[symbol].operations.map((op) => op.signs);
  // Axis ranking: principal axis of the full group, then atoms on the axis, then the smaller moment (the
  // long axis). Axes that tie on all three are left to the canonical choice.
  const axisKey = (w: Vec3): [number, number, number] => [
    ctx.principalAxis && parallel(w, ctx.principalAxis) ? 1 : 0,
    atomsOnAxis(ctx, w),
    -momentAbout(ctx, w),
  ];
  const best = (axes: Vec3[]): Vec3[] => {
    const keys = axes.map(axisKey);
    const better = (u: [number, number, number], v: [number, number, number]) =>
      u[0] - v[0] || u[1] - v[1] || (Math.abs(u[2] - v[2]) > momentTol ? u[2] - v[2] : 0);
    const top = keys.reduce((acc, key) => (better(key, acc) > 0 ? key : acc), keys[0]!);
    return axes.filter((_, i) => better(keys[i]!, top) === 0);
  };
  switch (symbol) {
    case "D2h":
    case "D2": {
      const pairs: [Vec3, Vec3][] = [];
      for (const z of best(c2)) {
        const rest = c2.filter((w) => !parallel(w, z));
        const xs = planeNormal && !parallel(planeNormal, z) ? [planeNormal] : best(rest);
        for (const x of xs) pairs.push([z, x]);
      }
      return canonicalFrame(ctx, pairs, signs);
    }
    case "C2v": {
      const z = c2[0]!;
      // yz is the mirror containing the most atoms, then the one the atoms lie closest to.
      const mirrorKey = (n: Vec3): [number, number, number] => [
        0,
        atomsInPlane(ctx, n),
        -spreadAlong(ctx, n),
      ];
      const keys = mirrors.map(mirrorKey);
      const better = (u: [number, number, number], v: [number, number, number]) =>
        u[1] - v[1] || (Math.abs(u[2] - v[2]) > momentTol ? u[2] - v[2] : 0);
      const top = keys.reduce((acc, key) => (better(key, acc) > 0 ? key : acc), keys[0]!);
      const xs = mirrors.filter((_, i) => better(keys[i]!, top) === 0);
      return canonicalFrame(
        ctx,
        xs.map((x) => [z, x]),
        signs,
      );
    }
    case "C2h":
    case "C2": {
      const z = c2[0]!;
      return canonicalFrame(
        ctx,
        inPlaneXCandidates(ctx, z).map((x) => [z, x]),
        signs,
      );
    }
    case "Cs": {
      const z = mirrors[0]!;
      return canonicalFrame(
        ctx,
        inPlaneXCandidates(ctx, z).map((x) => [z, x]),
        signs,
      );
    }
    default:
      return canonicalFrame(ctx, [[inertiaAxes[2], inertiaAxes[0]]], signs);
  }
}
