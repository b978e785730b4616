/**
 * Search for every symmetry operation of a non-linear molecule.
 *
 * Definitions: positions are relative to the centre of mass (a fixed point of every operation). An
 * orthogonal matrix R is a symmetry operation when it maps every atom within `toleranceAngstrom` of an atom
 * of the same kind (same element and isotope); it then defines a permutation π with R·xᵢ ≈ x_π(i).
 *
 * Method, without brute force over atom triples:
 *  1. Symmetry-equivalence classes: atoms of one kind at one distance from the centre (within tolerance).
 *     An operation can only map an atom into its own class.
 *  2. Reference atoms a and b with non-collinear position vectors: a from the smallest class (away from
 *     the centre), b with the fewest class partners at the distance |a − b| from a. An orthogonal R is fixed
 *     by the images a′ = R a and b′ = R b and by det R = ±1, so the candidates are the pairs (a′, b′) from
 *     the two classes with |a′ − b′| = |a − b|, times two handednesses: for C60 that is 60 × 1 × 2.
 *  3. Each candidate R₀ maps the orthonormal frame built from (a, b) onto the one built from (a′, b′); the
 *     atom matching it induces is refined by a least-squares orthogonal fit (Horn) and accepted when every
 *     atom lands within the tolerance.
 *  4. Accepted operations generate a group: the closure under composition is built on the permutations
 *     (exact), and candidates whose (a′, b′, det) is already in the group are skipped, so for a group of
 *     order h only a few generators are ever verified atom by atom. Composed operations are refitted and
 *     must map every atom within twice the tolerance, otherwise the generator is rejected.
 */
import {
  cross,
  distance,
  dot,
  type Mat3,
  matMul,
  matVec,
  norm,
  normalize,
  scale,
  sub,
  type Vec3,
} from "../geometry/linear-algebra";
import { gcd } from "./greatest-common-divisor";
import { fitOrthogonal } from "./superposition";

export interface SymmetryOperationRaw {
  /** Orthogonal matrix acting on centre-of-mass coordinates. */
  matrix: Mat3;
  /** permutation[i] = j when the operation moves atom i onto atom j (0-based). */
  permutation: number[];
  /** det = +1 (rotation) or −1 (reflection, inversion, improper rotation). */
  proper: boolean;
  /** Largest distance between a moved atom and the atom it lands on, in Å. */
  maxDeviationAngstrom: number;
}

export interface OperationSearchResult {
  /** The operations, identity first, closed under composition. */
  operations: SymmetryOperationRaw[];
  /** Two atoms (0-based) whose images, with the determinant, identify an operation uniquely. */
  referenceAtoms: [number, number];
}

/** Integer key of an operation from the images of the reference atoms and its handedness. */
export function operationKey(
  permutation: readonly number[],
  proper: boolean,
  referenceAtoms: readonly [number, number],
): number {
  return (
    (permutation[referenceAtoms[0]]! * permutation.length + permutation[referenceAtoms[1]]!) * 2 +
    (proper ? 1 : 0)
  );
}

export interface OperationSearchInput {
  /** Positions relative to the centre of mass, Å. */
  positionsAngstrom: readonly Vec3[];
  /** Kind of each atom (element and isotope); atoms of different kinds are never exchanged. */
  kinds: readonly string[];
  toleranceAngstrom: number;
}

/**
 * Symmetry-equivalence classes by kind and distance to the centre.
 *
 * @returns classOf[i] (class index of atom i) and the member lists
 */
export function radialClasses(
  positionsAngstrom: readonly Vec3[],
  kinds: readonly string[],
  toleranceAngstrom: number,
): { classOf: number[]; members: number[][] } {
  const radii = positionsAngstrom.map(norm);
  const order = positionsAngstrom
    .map((_, i) => i)
    .sort((i, j) => (kinds[i]! < kinds[j]! ? -1 : kinds[i]! > kinds[j]! ? 1 : radii[i]! - radii[j]!));
  const classOf = new Array<number>(positionsAngstrom.length).fill(-1);
  const members: number[][] = [];
  let previous = -1;
  for (const i of order) {
    const sameClass =
      previous >= 0 && kinds[previous] === kinds[i] && radii[i]! - radii[previous]! <= toleranceAngstrom;
    if (!sameClass) members.push([]);
    members[members.length - 1]!.push(i);
    classOf[i] = members.length - 1;
    previous = i;
  }
  return { classOf, members };
}

function squaredDistance(p: Vec3, q: Vec3): number {
  const dx = p[0] - q[0];
  const dy = p[1] - q[1];
  const dz = p[2] - q[2];
  return dx * dx + dy * dy + dz * dz;
}

function frame(u: Vec3, v: Vec3, handedness: 1 | -1): [Vec3, Vec3, Vec3] {
  const e1 = normalize(u);
  const e2 = normalize(sub(v, scale(e1, dot(v, e1))));
  return [e1, e2, scale(cross(e1, e2), handedness)];
}

function composePermutation(outer: number[], inner: number[]): number[] {
  const out = new Array<number>(inner.length);
  for (let i = 0; i < inner.length; i++) out[i] = outer[inner[i]!]!;
  return out;
}

/**
 * Finds all symmetry operations of a non-linear molecule (see the module comment for the method).
 *
 * @param input - centre-of-mass positions (Å), atom kinds and the distance tolerance (Å)
 * @returns the operations, identity first; they form a group under composition
 */
export function findSymmetryOperations(input: OperationSearchInput): OperationSearchResult {
  const { positionsAngstrom: x, kinds, toleranceAngstrom: tol } = input;
  const n = x.length;
  const { classOf, members } = radialClasses(x, kinds, tol);
  const radii = x.map(norm);
  const rMax = Math.max(...radii);

  // Reference atom a: smallest class among atoms well away from the centre.
  let a = -1;
  for (let i = 0; i < n; i++) {
    if (radii[i]! < 0.2 * rMax) continue;
    if (
      a < 0 ||
      members[classOf[i]!]!.length < members[classOf[a]!]!.length ||
      (members[classOf[i]!]!.length === members[classOf[a]!]!.length && radii[i]! > radii[a]! + tol)
    ) {
      a = i;
    }
  }
  const ua = normalize(x[a]!);
  const perp = x.map((p) => norm(cross(p, ua)));
  const maxPerp = Math.max(...perp);
  const fromA = x.map((p) => distance(p, x[a]!));
  // Reference atom b: well off the line through a, with the fewest partners at the same distance from a.
  let b = -1;
  let bestMultiplicity = Number.POSITIVE_INFINITY;
  for (let j = 0; j < n; j++) {
    if (perp[j]! < 0.2 * maxPerp) continue;
    let multiplicity = 0;
    for (const c of members[classOf[j]!]!) {
      if (Math.abs(fromA[c]! - fromA[j]!) <= 2 * tol) multiplicity++;
    }
    if (multiplicity < bestMultiplicity || (multiplicity === bestMultiplicity && perp[j]! > perp[b]! + tol)) {
      b = j;
      bestMultiplicity = multiplicity;
    }
  }
  const dab = distance(x[a]!, x[b]!);
  // Separation of same-kind atoms bounds how loosely a trial matrix may match atoms without ambiguity.
  let minSameKind = Number.POSITIVE_INFINITY;
  for (const cls of members) {
    for (let p = 0; p < cls.length; p++) {
      for (let q = p + 1; q < cls.length; q++) {
        minSameKind = Math.min(minSameKind, squaredDistance(x[cls[p]!]!, x[cls[q]!]!));
      }
    }
  }
  minSameKind = Math.sqrt(minSameKind);
  const looseTol = Math.min(tol * (1 + (2 * rMax) / radii[a]! + (2 * rMax) / perp[b]!), 0.45 * minSameKind);
  const sourceFrame = frame(x[a]!, x[b]!, 1);
  const keyOf = (permutation: number[], proper: boolean) => operationKey(permutation, proper, [a, b]);

  const matchAtoms = (r: Mat3, limit: number): number[] | null => {
    const permutation = new Array<number>(n);
    const used = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      const y = matVec(r, x[i]!);
      let found = -1;
      for (const j of members[classOf[i]!]!) {
        const p = x[j]!;
        const dx = y[0] - p[0];
        const dy = y[1] - p[1];
        const dz = y[2] - p[2];
        if (dx * dx + dy * dy + dz * dz <= limit * limit) {
          found = j;
          break;
        }
      }
      if (found < 0 || used[found]) return null;
      used[found] = 1;
      permutation[i] = found;
    }
    return permutation;
  };
  const deviationOf = (matrix: Mat3, permutation: number[]): number => {
    let worst = 0;
    for (let i = 0; i < n; i++) {
      const p = x[i]!;
      const q = x[permutation[i]!]!;
      const dx = matrix[0][0] * p[0] + matrix[0][1] * p[1] + matrix[0][2] * p[2] - q[0];
      const dy = matrix[1][0] * p[0] + matrix[1][1] * p[1] + matrix[1][2] * p[2] - q[1];
      const dz = matrix[2][0] * p[0] + matrix[2][1] * p[1] + matrix[2][2] * p[2] - q[2];
      worst = Math.max(worst, dx * dx + dy * dy + dz * dz);
    }
    return Math.sqrt(worst);
  };
  // The least-squares fit is only needed when a trial matrix is visibly off (noisy input geometry).
  const refit = (
    permutation: number[],
    proper: boolean,
    trial: Mat3,
  ): { matrix: Mat3; deviation: number } => {
    const trialDeviation = deviationOf(trial, permutation);
    if (trialDeviation <= 0.1 * tol) return { matrix: trial, deviation: trialDeviation };
    const matrix = fitOrthogonal(
      x,
      permutation.map((j) => x[j]!),
      proper,
    );
    return { matrix, deviation: deviationOf(matrix, permutation) };
  };

  const identity: SymmetryOperationRaw = {
    matrix: [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ],
    permutation: x.map((_, i) => i),
    proper: true,
    maxDeviationAngstrom: 0,
  };
  let group: SymmetryOperationRaw[] = [identity];
  let index = new Map<number, number>([[keyOf(identity.permutation, true), 0]]);
  const generators: SymmetryOperationRaw[] = [];

  const closeWith = (candidate: SymmetryOperationRaw): boolean => {
    const gens = [...generators, candidate];
    const nextGroup: SymmetryOperationRaw[] = [identity];
    const nextIndex = new Map<number, number>([[keyOf(identity.permutation, true), 0]]);
    for (let k = 0; k < nextGroup.length; k++) {
      const element = nextGroup[k]!;
      for (const g of gens) {
        const permutation = composePermutation(g.permutation, element.permutation);
        const proper = g.proper === element.proper;
        const key = keyOf(permutation, proper);
        if (nextIndex.has(key)) continue;
        const known = index.get(key);
        let op: SymmetryOperationRaw;
        if (known !== undefined) {
          op = group[known]!;
        } else {
          const { matrix, deviation } = refit(permutation, proper, matMul(g.matrix, element.matrix));
          if (deviation > 2 * tol) return false;
          op = { matrix, permutation, proper, maxDeviationAngstrom: deviation };
        }
        nextIndex.set(key, nextGroup.length);
        nextGroup.push(op);
      }
    }
    generators.push(candidate);
    group = nextGroup;
    index = nextIndex;
    return true;
  };

  for (const aImage of members[classOf[a]!]!) {
    for (const bImage of members[classOf[b]!]!) {
      if (bImage === aImage || Math.abs(Math.sqrt(squaredDistance(x[aImage]!, x[bImage]!)) - dab) > 2 * tol) {
        continue;
      }
      for (const handedness of [1, -1] as const) {
        const proper = handedness === 1;
        if (index.has((aImage * n + bImage) * 2 + (proper ? 1 : 0))) continue;
        const imageFrame = frame(x[aImage]!, x[bImage]!, handedness);
        // R₀ = Σ_k e′_k e_kᵀ maps the source frame onto the image frame.
        const r0: Mat3 = [
          [0, 0, 0],
          [0, 0, 0],
          [0, 0, 0],
        ];
        for (let k = 0; k < 3; k++) {
          for (let i = 0; i < 3; i++) {
            for (let j = 0; j < 3; j++) r0[i]![j]! += imageFrame[k]![i]! * sourceFrame[k]![j]!;
          }
        }
        const rough = matchAtoms(r0, looseTol);
        if (!rough) continue;
        const { matrix, deviation } = refit(rough, proper, r0);
        if (deviation > tol) continue;
        const exact = matchAtoms(matrix, tol);
        if (!exact) continue;
        closeWith({ matrix, permutation: exact, proper, maxDeviationAngstrom: deviation });
      }
    }
  }
  return { operations: group, referenceAtoms: [a, b] };
}

/** Product of two operations: first `inner`, then `outer`. */
export function composeOperations(
  outer: SymmetryOperationRaw,
  inner: SymmetryOperationRaw,
): SymmetryOperationRaw {
  return {
    matrix: matMul(outer.matrix, inner.matrix),
    permutation: composePermutation(outer.permutation, inner.permutation),
    proper: outer.proper === inner.proper,
    maxDeviationAngstrom: outer.maxDeviationAngstrom + inner.maxDeviationAngstrom,
  };
}

/**
 * Order of an operation (smallest k ≥ 1 with g^k = E) from its permutation and handedness: the least
 * common multiple of the cycle lengths, doubled for an improper operation of odd permutation order.
 * Exact because a non-linear molecule's operation is fixed by its permutation and its determinant.
 */
export function operationOrder(op: Pick<SymmetryOperationRaw, "permutation" | "proper">): number {
  const n = op.permutation.length;
  const seen = new Uint8Array(n);
  let order = 1;
  for (let start = 0; start < n; start++) {
    if (seen[start]) continue;
    let length = 0;
    for (let i = start; !seen[i]; i = op.permutation[i]!) {
      seen[i] = 1;
      length++;
    }
    order = (order * length) / gcd(order, length);
  }
  return !op.proper && order % 2 === 1 ? 2 * order : order;
}
