/**
 * The largest subgroup of the molecular point group that is also a subgroup of D2h (the Abelian subgroup
 * used for calculations). Its standard frame is chosen in ./standard-orientation.ts.
 *
 * A subgroup of D2h is a group of commuting operations of order ≤ 2; conversely commuting orthogonal
 * involutions share an eigenbasis, so such a group is a D2h subgroup in that frame. The search is therefore
 * exact on permutations: the involutions of the point group, then commuting pairs and triples.
 * Among several subgroups of the same kind (three C2v in Td, two D2h in D4h) the one whose C2 axes and
 * mirror planes contain the most atoms is taken.
 */
import type { Mat3, Vec3 } from "../geometry/linear-algebra";
import { ABELIAN_PREFERENCE, type AbelianGroupSymbol } from "./abelian-tables";
import { atomsInPlane, atomsOnAxis, type GeometryContext, parallel } from "./atoms-on-symmetry-elements";
import type { OperationLabel } from "./classify";
import { operationKey, type SymmetryOperationRaw } from "./operations";
import { standardOrientationFrame } from "./standard-orientation";

export interface AbelianChoice {
  symbol: AbelianGroupSymbol;
  /** Indices (into the operation list) of the subgroup's operations. */
  members: number[];
  /** Rows: the standard x, y, z axes expressed in the centre-of-mass input frame. */
  frame: Mat3;
}

function subgroupSymbol(labels: OperationLabel[]): AbelianGroupSymbol {
  const rotations = labels.filter((l) => l.kind === "C").length;
  const mirrors = labels.filter((l) => l.kind === "sigma").length;
  const inversion = labels.some((l) => l.kind === "i");
  switch (labels.length) {
    case 8:
      return "D2h";
    case 4:
      if (rotations === 3) return "D2";
      return inversion ? "C2h" : "C2v";
    case 2:
      if (rotations === 1) return "C2";
      return mirrors === 1 ? "Cs" : "Ci";
    default:
      return "C1";
  }
}

/**
 * Chooses the largest D2h subgroup of a finite point group and its standard frame.
 *
 * @param operations - all operations of the point group (centre-of-mass frame)
 * @param labels - their descriptions ({@link describeOperation})
 * @param referenceAtoms - two atoms whose images identify an operation (from the operation search)
 * @param ctx - centre-of-mass positions (Å), masses (u), tolerance (Å) and the full group's principal axis
 * @param inertiaAxes - principal axes a, b, c of the molecule (for Ci and C1)
 * @returns the subgroup symbol, member indices and frame (rows x, y, z in the input frame)
 */
export function chooseAbelianSubgroup(
  operations: readonly SymmetryOperationRaw[],
  labels: readonly OperationLabel[],
  referenceAtoms: readonly [number, number],
  ctx: GeometryContext,
  inertiaAxes: [Vec3, Vec3, Vec3],
): AbelianChoice {
  const byKey = new Map<number, number>();
  operations.forEach((op, i) => {
    byKey.set(operationKey(op.permutation, op.proper, referenceAtoms), i);
  });
  const [ra, rb] = referenceAtoms;
  const n = operations[0]!.permutation.length;
  const identity = labels.findIndex((l) => l.kind === "E");
  const involutions = labels.flatMap((l, i) => (l.elementOrder === 2 ? [i] : []));
  // The product p∘q is identified by the images of the reference atoms alone (exact, O(1)).
  const product = (i: number, j: number): number => {
    const p = operations[i]!;
    const q = operations[j]!;
    const key =
      (p.permutation[q.permutation[ra]!]! * n + p.permutation[q.permutation[rb]!]!) * 2 +
      (p.proper === q.proper ? 1 : 0);
    return byKey.get(key) ?? -1;
  };
  const elementScore = labels.map((l) =>
    l.elementOrder !== 2
      ? 0
      : l.kind === "C"
        ? atomsOnAxis(ctx, l.axis!) + (ctx.principalAxis && parallel(l.axis!, ctx.principalAxis) ? 1e6 : 0)
        : l.kind === "sigma"
          ? atomsInPlane(ctx, l.axis!)
          : 0,
  );

  // Products and commutation among involutions, tabulated once (m² lookups instead of m³ map queries).
  const m = involutions.length;
  const slot = new Map<number, number>(involutions.map((op, p) => [op, p]));
  const productTable = new Int32Array(m * m);
  for (let p = 0; p < m; p++) {
    for (let q = 0; q < m; q++) productTable[p * m + q] = product(involutions[p]!, involutions[q]!);
  }
  const commuting = (p: number, q: number) => productTable[p * m + q] === productTable[q * m + p];

  const subgroups = new Map<string, number[]>();
  const addSubgroup = (members: number[]) => {
    const sorted = [...new Set(members)].sort((u, v) => u - v);
    subgroups.set(sorted.join(","), sorted);
  };
  addSubgroup([identity]);
  for (const i of involutions) addSubgroup([identity, i]);
  for (let p = 0; p < m; p++) {
    for (let q = p + 1; q < m; q++) {
      if (!commuting(p, q)) continue;
      const ij = productTable[p * m + q]!;
      const pq = slot.get(ij);
      if (pq === undefined) continue;
      addSubgroup([identity, involutions[p]!, involutions[q]!, ij]);
      for (let r = q + 1; r < m; r++) {
        if (r === pq || !commuting(p, r) || !commuting(q, r)) continue;
        addSubgroup([
          identity,
          involutions[p]!,
          involutions[q]!,
          ij,
          involutions[r]!,
          productTable[p * m + r]!,
          productTable[q * m + r]!,
          productTable[pq * m + r]!,
        ]);
      }
    }
  }
  let best: { symbol: AbelianGroupSymbol; members: number[]; score: number } | null = null;
  for (const members of subgroups.values()) {
    const symbol = subgroupSymbol(members.map((m) => labels[m]!));
    const score = members.reduce((acc, m) => acc + elementScore[m]!, 0);
    const rank = ABELIAN_PREFERENCE.indexOf(symbol);
    if (
      !best ||
      members.length > best.members.length ||
      (members.length === best.members.length && rank < ABELIAN_PREFERENCE.indexOf(best.symbol)) ||
      (members.length === best.members.length && symbol === best.symbol && score > best.score)
    ) {
      best = { symbol, members, score };
    }
  }
  const chosen = best!;
  const frame = standardOrientationFrame(
    chosen.symbol,
    chosen.members.map((m) => labels[m]!),
    ctx,
    inertiaAxes,
  );
  return { symbol: chosen.symbol, members: chosen.members, frame };
}
