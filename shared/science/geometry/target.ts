/**
 * A target molecule: atoms with resolved isotopes and Cartesian positions in ångström.
 */
import { getIsotope } from "../elements/isotopes";
import { ScienceInputError } from "../errors";
import { distance, type Vec3 } from "./linear-algebra";
import type { ParsedAtom } from "./parse-geometry";

export interface TargetAtom {
  /** 1-based position in the input, the index the `--isotope INDEX=A` option refers to. */
  index: number;
  symbol: string;
  atomicNumber: number;
  massNumber: number;
  /** Isotope mass in u (NIST). */
  massU: number;
  positionAngstrom: Vec3;
}

/** Atoms closer than this are treated as an input mistake (duplicated line), not as a molecule. */
export const MIN_ATOM_SEPARATION_ANGSTROM = 0.1;

/**
 * Largest accepted |x|, |y| or |z| in Å. No molecule is a tenth of a millimetre across, so a larger
 * coordinate is a units or formatting error; within it, doubles resolve positions to ~1e-10 Å (far below
 * the smallest symmetry tolerance, 1e-6 Å) and moments of inertia (≤ 2000 atoms × 300 u × (2e6 Å)²) and
 * every other product of coordinates stay far inside the double range. At 1e200 Å the moments overflow.
 */
export const MAX_COORDINATE_ANGSTROM = 1e6;

/**
 * Message for a coordinate beyond {@link MAX_COORDINATE_ANGSTROM}, or null when it is within.
 *
 * @param valueAngstrom - the coordinate in Å
 * @param where - what to name in the message, e.g. "Line 4: z coordinate"
 * @param written - the coordinate as the user wrote it (default: the number)
 */
export function coordinateRangeProblem(
  valueAngstrom: number,
  where: string,
  written = String(valueAngstrom),
): string | null {
  if (Math.abs(valueAngstrom) <= MAX_COORDINATE_ANGSTROM) return null;
  return (
    `${where} ${written} Å lies beyond ±${MAX_COORDINATE_ANGSTROM.toExponential().replace("e+", "e")} Å. ` +
    "Coordinates must be in ångström and describe one molecule (none is a tenth of a millimetre across): " +
    "check the units and the number format."
  );
}

export interface BuildTargetOptions {
  /** Isotope choices by 1-based atom index: {2: 2} makes atom 2 a deuterium if it is hydrogen. Wins over
   * the inline `H@2` marking. */
  isotopeOverrides?: Readonly<Record<number, number>>;
}

/** Minimal atom description accepted by {@link buildTarget}. */
export type AtomInput = Pick<ParsedAtom, "symbol" | "positionAngstrom"> & { massNumber?: number | null };

/**
 * Resolves isotopes and checks the atoms of a target.
 *
 * @param atoms - symbols (case-insensitive), optional mass numbers and positions in Å, in input order
 * @param options - isotope overrides by 1-based atom index
 * @returns atoms with atomic number, mass number and isotope mass (u); positions unchanged (Å)
 * @throws ScienceInputError for no atoms, unknown elements or isotopes, overrides naming an atom that does
 *   not exist, a coordinate beyond ±{@link MAX_COORDINATE_ANGSTROM}, or two atoms closer than
 *   {@link MIN_ATOM_SEPARATION_ANGSTROM}
 */
export function buildTarget(atoms: readonly AtomInput[], options: BuildTargetOptions = {}): TargetAtom[] {
  if (atoms.length === 0) {
    throw new ScienceInputError("The target has no atoms.");
  }
  const overrides = options.isotopeOverrides ?? {};
  for (const key of Object.keys(overrides)) {
    const index = Number(key);
    if (!Number.isInteger(index) || index < 1 || index > atoms.length) {
      throw new ScienceInputError(
        `Isotope override for atom ${key}: the target has atoms 1 to ${atoms.length} only.`,
        { index: key, atomCount: atoms.length },
      );
    }
  }
  const resolved = atoms.map((atom, i) => {
    const index = i + 1;
    atom.positionAngstrom.forEach((value, axis) => {
      const problem = coordinateRangeProblem(
        value,
        `Atom ${index} (${atom.symbol}): ${"xyz"[axis]} coordinate`,
      );
      if (problem) throw new ScienceInputError(problem, { atom: index, valueAngstrom: value });
    });
    const requested = overrides[index] ?? atom.massNumber ?? undefined;
    let isotope: ReturnType<typeof getIsotope>;
    try {
      isotope = getIsotope(atom.symbol, requested);
    } catch (error) {
      if (error instanceof ScienceInputError) {
        throw new ScienceInputError(`Atom ${index} (${atom.symbol}): ${error.message}`, error.details);
      }
      throw error;
    }
    return {
      index,
      symbol: isotope.symbol,
      atomicNumber: isotope.atomicNumber,
      massNumber: isotope.massNumber,
      massU: isotope.massU,
      positionAngstrom: [...atom.positionAngstrom] as Vec3,
    };
  });
  for (let i = 0; i < resolved.length; i++) {
    for (let j = i + 1; j < resolved.length; j++) {
      const d = distance(resolved[i]!.positionAngstrom, resolved[j]!.positionAngstrom);
      if (d < MIN_ATOM_SEPARATION_ANGSTROM) {
        throw new ScienceInputError(
          `Atoms ${i + 1} and ${j + 1} are only ${d.toFixed(4)} Å apart (minimum ${MIN_ATOM_SEPARATION_ANGSTROM} Å): ` +
            "is a line duplicated?",
          { atoms: [i + 1, j + 1], distanceAngstrom: d },
        );
      }
    }
  }
  return resolved;
}

/** Label of an atom kind for symmetry: atoms of different elements or isotopes are never equivalent. */
export function isotopeLabel(atom: Pick<TargetAtom, "symbol" | "massNumber">): string {
  return `${atom.symbol}@${atom.massNumber}`;
}

/** Copy of the atoms with new positions (same order). */
export function withPositions(
  atoms: readonly TargetAtom[],
  positionsAngstrom: readonly Vec3[],
): TargetAtom[] {
  return atoms.map((atom, i) => ({ ...atom, positionAngstrom: [...positionsAngstrom[i]!] as Vec3 }));
}
