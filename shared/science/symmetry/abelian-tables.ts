/**
 * Character tables of D2h and its subgroups — the Abelian point groups in which quantum-chemistry and
 * scattering calculations label their orbitals and channels — in the standard orientation.
 *
 * Every operation of these groups is diagonal in the standard frame: diag(sx, sy, sz) with signs ±1.
 * Irreducible representations are listed in Cotton order (F. A. Cotton, "Chemical Applications of Group
 * Theory", 3rd ed., Appendix IIA), with a Cartesian basis function for each (the character of an operation
 * is the product of the signs of the coordinates the function contains).
 */

export type AbelianGroupSymbol = "D2h" | "C2v" | "C2h" | "D2" | "Cs" | "Ci" | "C2" | "C1";

export interface AbelianOperationSpec {
  /** Label in the standard frame, e.g. "C2(z)", "σ(xz)". */
  label: string;
  /** Diagonal of the operation's matrix in the standard frame. */
  signs: [number, number, number];
}

export interface AbelianTable {
  symbol: AbelianGroupSymbol;
  operations: AbelianOperationSpec[];
  /** Irreps in Cotton order with characters (same order as `operations`) and a basis function. */
  irreps: { name: string; characters: number[]; basisFunction: string }[];
}

const E: AbelianOperationSpec = { label: "E", signs: [1, 1, 1] };
const C2Z: AbelianOperationSpec = { label: "C2(z)", signs: [-1, -1, 1] };
const C2Y: AbelianOperationSpec = { label: "C2(y)", signs: [-1, 1, -1] };
const C2X: AbelianOperationSpec = { label: "C2(x)", signs: [1, -1, -1] };
const INV: AbelianOperationSpec = { label: "i", signs: [-1, -1, -1] };
const SXY: AbelianOperationSpec = { label: "σ(xy)", signs: [1, 1, -1] };
const SXZ: AbelianOperationSpec = { label: "σ(xz)", signs: [1, -1, 1] };
const SYZ: AbelianOperationSpec = { label: "σ(yz)", signs: [-1, 1, 1] };

export const ABELIAN_TABLES: Record<AbelianGroupSymbol, AbelianTable> = {
  D2h: {
    symbol: "D2h",
    operations: [E, C2Z, C2Y, C2X, INV, SXY, SXZ, SYZ],
    irreps: [
      { name: "Ag", characters: [1, 1, 1, 1, 1, 1, 1, 1], basisFunction: "1" },
      { name: "B1g", characters: [1, 1, -1, -1, 1, 1, -1, -1], basisFunction: "xy" },
      { name: "B2g", characters: [1, -1, 1, -1, 1, -1, 1, -1], basisFunction: "xz" },
      { name: "B3g", characters: [1, -1, -1, 1, 1, -1, -1, 1], basisFunction: "yz" },
      { name: "Au", characters: [1, 1, 1, 1, -1, -1, -1, -1], basisFunction: "xyz" },
      { name: "B1u", characters: [1, 1, -1, -1, -1, -1, 1, 1], basisFunction: "z" },
      { name: "B2u", characters: [1, -1, 1, -1, -1, 1, -1, 1], basisFunction: "y" },
      { name: "B3u", characters: [1, -1, -1, 1, -1, 1, 1, -1], basisFunction: "x" },
    ],
  },
  C2v: {
    symbol: "C2v",
    operations: [E, C2Z, SXZ, SYZ],
    irreps: [
      { name: "A1", characters: [1, 1, 1, 1], basisFunction: "z" },
      { name: "A2", characters: [1, 1, -1, -1], basisFunction: "xy" },
      { name: "B1", characters: [1, -1, 1, -1], basisFunction: "x" },
      { name: "B2", characters: [1, -1, -1, 1], basisFunction: "y" },
    ],
  },
  C2h: {
    symbol: "C2h",
    operations: [E, C2Z, INV, SXY],
    irreps: [
      { name: "Ag", characters: [1, 1, 1, 1], basisFunction: "1" },
      { name: "Bg", characters: [1, -1, 1, -1], basisFunction: "xz" },
      { name: "Au", characters: [1, 1, -1, -1], basisFunction: "z" },
      { name: "Bu", characters: [1, -1, -1, 1], basisFunction: "x" },
    ],
  },
  D2: {
    symbol: "D2",
    operations: [E, C2Z, C2Y, C2X],
    irreps: [
      { name: "A", characters: [1, 1, 1, 1], basisFunction: "1" },
      { name: "B1", characters: [1, 1, -1, -1], basisFunction: "z" },
      { name: "B2", characters: [1, -1, 1, -1], basisFunction: "y" },
      { name: "B3", characters: [1, -1, -1, 1], basisFunction: "x" },
    ],
  },
  Cs: {
    symbol: "Cs",
    operations: [E, SXY],
    irreps: [
      { name: "A'", characters: [1, 1], basisFunction: "x" },
      { name: 'A"', characters: [1, -1], basisFunction: "z" },
    ],
  },
  Ci: {
    symbol: "Ci",
    operations: [E, INV],
    irreps: [
      { name: "Ag", characters: [1, 1], basisFunction: "1" },
      { name: "Au", characters: [1, -1], basisFunction: "x" },
    ],
  },
  C2: {
    symbol: "C2",
    operations: [E, C2Z],
    irreps: [
      { name: "A", characters: [1, 1], basisFunction: "z" },
      { name: "B", characters: [1, -1], basisFunction: "x" },
    ],
  },
  C1: {
    symbol: "C1",
    operations: [E],
    irreps: [{ name: "A", characters: [1], basisFunction: "1" }],
  },
};

/** Rank used to pick among equally large subgroups: C2v before D2 follows common practice (methane and
 * allene are run in C2v). */
export const ABELIAN_PREFERENCE: AbelianGroupSymbol[] = ["D2h", "C2v", "D2", "C2h", "C2", "Cs", "Ci", "C1"];
