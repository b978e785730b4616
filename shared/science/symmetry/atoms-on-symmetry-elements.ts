/**
 * Where the atoms of a centred target lie relative to symmetry elements: atoms on a rotation axis, atoms in
 * a mirror plane, and whether two axes are parallel. The Abelian-subgroup choice and the standard
 * orientation both rank axes and planes by these counts.
 */
import { dot, type Vec3 } from "../geometry/linear-algebra";

/** A target about its centre of mass, as the subgroup choice and the orientation rules see it. */
export interface GeometryContext {
  /** Positions relative to the centre of mass, Å. */
  positionsAngstrom: readonly Vec3[];
  /** Isotope masses, u. */
  massesU: readonly number[];
  /** Distance tolerance of the symmetry search, Å. */
  toleranceAngstrom: number;
  /** Principal axis of the full point group (highest-order axis), null when it has none. */
  principalAxis: Vec3 | null;
}

/** Number of atoms within the tolerance of the line through the centre of mass along a unit axis. */
export function atomsOnAxis(ctx: GeometryContext, axis: Vec3): number {
  const tol2 = ctx.toleranceAngstrom ** 2;
  let count = 0;
  for (const p of ctx.positionsAngstrom) {
    // |p × axis|² = |p|² − (p·axis)² for a unit axis.
    const along = p[0] * axis[0] + p[1] * axis[1] + p[2] * axis[2];
    if (p[0] * p[0] + p[1] * p[1] + p[2] * p[2] - along * along <= tol2) count++;
  }
  return count;
}

/** Number of atoms within the tolerance of the plane through the centre of mass with a unit normal. */
export function atomsInPlane(ctx: GeometryContext, normal: Vec3): number {
  let count = 0;
  for (const p of ctx.positionsAngstrom) {
    if (Math.abs(p[0] * normal[0] + p[1] * normal[1] + p[2] * normal[2]) <= ctx.toleranceAngstrom) count++;
  }
  return count;
}

/** Whether two unit vectors are parallel or antiparallel (to within about 2.6°). */
export function parallel(u: Vec3, v: Vec3): boolean {
  return Math.abs(dot(u, v)) > 0.999;
}
