/**
 * Naming a finite point group (Schoenflies symbol) from its operations, and labelling each operation.
 *
 * The classification uses only exact group data — the order h, the order of each element (from the atom
 * permutations), the number of reflections and the presence of the inversion — so it does not depend on
 * angular tolerances:
 *  - proper subgroup G⁺ of order h⁺: I if h⁺ = 60 with 20 elements of order 3; O if h⁺ = 24 with 8 of
 *    order 3 and 6 of order 4; T if h⁺ = 12 with 8 of order 3; Cₙ if cyclic (an element of order h⁺);
 *    otherwise Dₙ with n = h⁺/2;
 *  - improper part (h = 2h⁺), with m reflections: Cₙ → S₂ₙ (m = 0; Ci when n = 1), Cₙₕ (m = 1; Cs when
 *    n = 1), Cₙᵥ (m = n); Dₙ → Dₙₕ (m = n + 1) or Dₙd (m = n); T → Th (inversion) or Td; O → Oh; I → Ih.
 * Reference: F. A. Cotton, "Chemical Applications of Group Theory", 3rd ed. (1990), ch. 3–4 (point groups
 * and their elements).
 */
import { type Mat3, normalize, trace, type Vec3 } from "../geometry/linear-algebra";
import { gcd } from "./greatest-common-divisor";
import { operationOrder, type SymmetryOperationRaw } from "./operations";

export interface PointGroupName {
  /** Schoenflies symbol, e.g. "C2v", "D6h", "Td", "Ih", "S4", "Cs". */
  symbol: string;
  order: number;
  /** n of the principal axis: 5 for Ih, 6 for D6h, 2 for D2h, 1 for C1, Cs and Ci. */
  principalOrder: number;
  /** Direction of the unique principal axis (centre-of-mass frame); null when no axis is unique (C1, Cs,
   * Ci, D2, D2h, cubic and icosahedral groups). For Dnd and S2n it is the S2n axis. */
  principalAxis: Vec3 | null;
}

export type OperationKind = "E" | "C" | "i" | "sigma" | "S";

export interface OperationLabel {
  kind: OperationKind;
  /** n of Cₙᵏ or Sₙᵏ (1 for E and σ, 2 for i). */
  n: number;
  /** k of Cₙᵏ or Sₙᵏ. */
  k: number;
  /** Rotation axis or mirror normal (unit, sign fixed so that the rotation is by +2πk/n); null for E and i. */
  axis: Vec3 | null;
  /** Readable label: "E", "C3", "C5^2", "i", "σ", "S6^5". */
  label: string;
  /** Element order (smallest k with gᵏ = E). */
  elementOrder: number;
}

/** Axis and angle of a proper rotation matrix (angle in [0, π]). */
export function rotationAxisAngle(m: Mat3): { axis: Vec3 | null; angleRad: number } {
  const cosAngle = Math.max(-1, Math.min(1, (trace(m) - 1) / 2));
  const angleRad = Math.acos(cosAngle);
  if (angleRad < 1e-9) return { axis: null, angleRad: 0 };
  if (cosAngle > -0.9) {
    const v: Vec3 = [m[2][1] - m[1][2], m[0][2] - m[2][0], m[1][0] - m[0][1]];
    return { axis: normalize(v), angleRad };
  }
  // Near π the antisymmetric part vanishes: (M + I)/(1 − cos θ) ≈ u uᵀ, take its largest column.
  const s: Mat3 = [
    [m[0][0] + 1, m[0][1], m[0][2]],
    [m[1][0], m[1][1] + 1, m[1][2]],
    [m[2][0], m[2][1], m[2][2] + 1],
  ];
  let best = 0;
  for (let j = 1; j < 3; j++) if (s[j]![j]! > s[best]![best]!) best = j;
  let axis = normalize([s[0]![best]!, s[1]![best]!, s[2]![best]!]);
  const antisym: Vec3 = [m[2][1] - m[1][2], m[0][2] - m[2][0], m[1][0] - m[0][1]];
  const sinPart = antisym[0] * axis[0] + antisym[1] * axis[1] + antisym[2] * axis[2];
  if (sinPart < 0) axis = [-axis[0], -axis[1], -axis[2]];
  return { axis, angleRad };
}

function canonicalSign(axis: Vec3): Vec3 {
  for (const c of axis) {
    if (Math.abs(c) > 1e-8) return c > 0 ? axis : [-axis[0], -axis[1], -axis[2]];
  }
  return axis;
}

function power(label: string, n: number, k: number): string {
  return k === 1 ? `${label}${n}` : `${label}${n}^${k}`;
}

/**
 * Describes one operation: kind (E, Cₙᵏ, i, σ, Sₙᵏ), axis and a readable label.
 *
 * @param op - operation with matrix, permutation and handedness
 */
export function describeOperation(op: SymmetryOperationRaw): OperationLabel {
  const elementOrder = operationOrder(op);
  if (op.proper) {
    if (elementOrder === 1) return { kind: "E", n: 1, k: 0, axis: null, label: "E", elementOrder };
    const { axis, angleRad } = rotationAxisAngle(op.matrix);
    // θ = 2πk/n with n the element order and gcd(k, n) = 1, so k follows from the angle without a tolerance.
    const n = elementOrder;
    const k = Math.max(1, Math.round((angleRad * n) / (2 * Math.PI)));
    const oriented = n === 2 ? canonicalSign(axis ?? [0, 0, 1]) : (axis ?? [0, 0, 1]);
    return { kind: "C", n, k, axis: oriented, label: power("C", n, k), elementOrder };
  }
  const negated = op.matrix.map((row) => row.map((value) => -value)) as Mat3;
  if (elementOrder === 2) {
    // Improper involutions: the inversion (trace −3) or a reflection (trace +1).
    if (trace(op.matrix) < -1) return { kind: "i", n: 2, k: 1, axis: null, label: "i", elementOrder };
    const { axis } = rotationAxisAngle(negated);
    return { kind: "sigma", n: 1, k: 1, axis: canonicalSign(axis ?? [0, 0, 1]), label: "σ", elementOrder };
  }
  // R = σ_u·C_u(φ) gives −R = C_u(φ + π). With −R = C_v(θ), θ ∈ [0, π], the axis −v carries
  // R = σ·C(π − θ), so φ = π − θ ∈ [0, π] about −v.
  const { axis, angleRad } = rotationAxisAngle(negated);
  const phi = Math.PI - angleRad;
  const improperAxis: Vec3 = axis ? [-axis[0], -axis[1], -axis[2]] : [0, 0, 1];
  // Sₙᵏ has order n for even n and 2n for odd n (then k is odd).
  let n = elementOrder;
  let k = Math.round((phi * n) / (2 * Math.PI));
  if (gcd(k, n) !== 1 && n % 2 === 0 && (n / 2) % 2 === 1) {
    n /= 2;
    k = Math.round((phi * n) / (2 * Math.PI));
  }
  return { kind: "S", n, k, axis: improperAxis, label: power("S", n, k), elementOrder };
}

/**
 * Schoenflies symbol of a finite point group given all its operations (see module comment).
 *
 * @param operations - every operation of the group (closed under composition)
 * @param labels - their descriptions, when already computed
 * @returns symbol, order, principal-axis order and unique principal axis (if any)
 */
export function classifyPointGroup(
  operations: readonly SymmetryOperationRaw[],
  labels: readonly OperationLabel[] = operations.map(describeOperation),
): PointGroupName {
  const h = operations.length;
  const proper = labels.filter((_, i) => operations[i]!.proper);
  const hPlus = proper.length;
  const countOrder = (list: OperationLabel[], order: number) =>
    list.filter((l) => l.elementOrder === order).length;
  const mirrors = labels.filter((l) => l.kind === "sigma").length;
  const hasInversion = labels.some((l) => l.kind === "i");
  const hasImproper = h > hPlus;
  const maxProperOrder = Math.max(...proper.map((l) => l.elementOrder));
  const axisOfOrder = (list: OperationLabel[], order: number) =>
    list.find((l) => l.elementOrder === order && l.axis)?.axis ?? null;

  if (hPlus === 60 && countOrder(proper, 3) === 20) {
    return { symbol: hasImproper ? "Ih" : "I", order: h, principalOrder: 5, principalAxis: null };
  }
  if (hPlus === 24 && countOrder(proper, 3) === 8 && countOrder(proper, 4) === 6) {
    return { symbol: hasImproper ? "Oh" : "O", order: h, principalOrder: 4, principalAxis: null };
  }
  if (hPlus === 12 && countOrder(proper, 3) === 8) {
    const symbol = !hasImproper ? "T" : hasInversion ? "Th" : "Td";
    return { symbol, order: h, principalOrder: 3, principalAxis: null };
  }
  if (maxProperOrder === hPlus) {
    const n = hPlus;
    if (!hasImproper) {
      return {
        symbol: `C${n}`,
        order: h,
        principalOrder: n,
        principalAxis: n > 1 ? axisOfOrder(proper, n) : null,
      };
    }
    if (n === 1) {
      return { symbol: mirrors === 1 ? "Cs" : "Ci", order: h, principalOrder: 1, principalAxis: null };
    }
    const axis = axisOfOrder(proper, n);
    if (mirrors === 0) return { symbol: `S${2 * n}`, order: h, principalOrder: n, principalAxis: axis };
    if (mirrors === 1) return { symbol: `C${n}h`, order: h, principalOrder: n, principalAxis: axis };
    return { symbol: `C${n}v`, order: h, principalOrder: n, principalAxis: axis };
  }
  const n = hPlus / 2;
  let axis = n > 2 ? axisOfOrder(proper, n) : null;
  if (!hasImproper) return { symbol: `D${n}`, order: h, principalOrder: n, principalAxis: axis };
  if (mirrors === n + 1) return { symbol: `D${n}h`, order: h, principalOrder: n, principalAxis: axis };
  if (n === 2) {
    axis = labels.find((l) => l.kind === "S" && l.elementOrder === 4)?.axis ?? null;
  }
  return { symbol: `D${n}d`, order: h, principalOrder: n, principalAxis: axis };
}
