/**
 * A target version's atoms from what a member sends (atoms as JSON, or the text of an XYZ file) and the
 * science core's inspection of them. XYZ text is hostile: every problem is a 422 naming the line at fault
 * (binary content, atom count, element, isotope, coordinates, atoms on top of each other).
 */

import { MAX_TARGET_ATOMS, MAX_XYZ_BYTES, type TargetAtom } from "../../shared/schemas/targets";
import { getIsotope } from "../../shared/science/elements";
import { ScienceInputError } from "../../shared/science/errors";
import {
  inspectTarget,
  MIN_ATOM_SEPARATION_ANGSTROM,
  type ParsedAtom,
  parseGeometry,
  type TargetInspection,
} from "../../shared/science/geometry";
import { AppError } from "../http/errors";

/** Largest |x|, |y|, |z| a stored atom may have (targetAtomSchema), Å. */
const MAX_STORED_COORDINATE_ANGSTROM = 1e4;

const invalidXyz = (message: string, line: number | null) =>
  new AppError(422, "invalid_xyz", `The XYZ text cannot be used: ${message}`, { path: "xyz", line });

const lineOf = (text: string, index: number) => text.slice(0, index).split("\n").length;

// biome-ignore lint/suspicious/noControlCharactersInRegex: finding control characters is the point.
const BINARY = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/;
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** Refuses text that is not a text file: too large, NUL or other control bytes, broken Unicode. */
function checkText(text: string): void {
  const bytes = Buffer.byteLength(text, "utf8");
  if (bytes > MAX_XYZ_BYTES) {
    throw invalidXyz(`it is ${bytes} bytes long; at most ${MAX_XYZ_BYTES} bytes are accepted.`, null);
  }
  const binary = BINARY.exec(text);
  if (binary) {
    const code = binary[0].charCodeAt(0).toString(16).padStart(4, "0").toUpperCase();
    const what = code === "0000" ? "a NUL byte" : `the control character U+${code}`;
    throw invalidXyz(
      `Line ${lineOf(text, binary.index)}: contains ${what}; is this a binary file? Send the XYZ file as text.`,
      lineOf(text, binary.index),
    );
  }
  const surrogate = LONE_SURROGATE.exec(text);
  if (surrogate) {
    throw invalidXyz(
      `Line ${lineOf(text, surrogate.index)}: contains a broken Unicode character (a lone surrogate); send the file as UTF-8 text.`,
      lineOf(text, surrogate.index),
    );
  }
}

/** Checks what the science parser leaves to later steps, per line: the stored range, the isotope, spacing. */
function checkParsedAtoms(atoms: ParsedAtom[]): void {
  if (atoms.length > MAX_TARGET_ATOMS) {
    throw invalidXyz(`it lists ${atoms.length} atoms; a target has at most ${MAX_TARGET_ATOMS}.`, null);
  }
  for (const atom of atoms) {
    atom.positionAngstrom.forEach((value, axis) => {
      if (Math.abs(value) > MAX_STORED_COORDINATE_ANGSTROM) {
        throw invalidXyz(
          `Line ${atom.line}: the ${"xyz"[axis]} coordinate ${value} Å is more than ${MAX_STORED_COORDINATE_ANGSTROM} Å from the origin; coordinates are in Å.`,
          atom.line,
        );
      }
    });
    try {
      getIsotope(atom.symbol, atom.massNumber ?? undefined);
    } catch (error) {
      if (!(error instanceof ScienceInputError)) throw error;
      throw invalidXyz(`Line ${atom.line}: ${error.message}`, atom.line);
    }
  }
  for (let j = 1; j < atoms.length; j++) {
    for (let i = 0; i < j; i++) {
      const [a, b] = [atoms[i]!.positionAngstrom, atoms[j]!.positionAngstrom];
      const distance = Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
      if (distance < MIN_ATOM_SEPARATION_ANGSTROM) {
        throw invalidXyz(
          `Line ${atoms[j]!.line}: this atom is only ${distance.toFixed(4)} Å from the atom on line ${atoms[i]!.line} ` +
            `(minimum ${MIN_ATOM_SEPARATION_ANGSTROM} Å); is a line duplicated?`,
          atoms[j]!.line,
        );
      }
    }
  }
}

/** Atoms from the text of an XYZ file (or a plain "Symbol x y z" list), or a 422 naming the line at fault. */
export function atomsFromXyz(text: string): TargetAtom[] {
  checkText(text);
  let atoms: ParsedAtom[];
  try {
    atoms = parseGeometry(text).atoms;
  } catch (error) {
    if (!(error instanceof ScienceInputError)) throw error;
    const line = (error.details as { line?: unknown } | undefined)?.line;
    throw invalidXyz(error.message, typeof line === "number" ? line : null);
  }
  checkParsedAtoms(atoms);
  return atoms.map((atom) => ({
    symbol: atom.symbol,
    massNumber: atom.massNumber,
    xAngstrom: atom.positionAngstrom[0],
    yAngstrom: atom.positionAngstrom[1],
    zAngstrom: atom.positionAngstrom[2],
    partialChargeE: null,
  }));
}

/**
 * The science core's inspection of a version: isotopes resolved (a null mass number is the element's most
 * common isotope), multiplicity checked or (left out) the lowest the electron count allows, and with
 * partial charges on every atom the dipole about the centre of mass. Problems are 422s.
 */
export function inspectVersion(
  atoms: readonly TargetAtom[],
  charge: number,
  multiplicity: number | undefined,
): TargetInspection {
  const charged = atoms.filter((atom) => atom.partialChargeE !== null).length;
  if (charged > 0 && charged < atoms.length) {
    const missing = atoms.flatMap((atom, i) => (atom.partialChargeE === null ? [i + 1] : []));
    throw new AppError(
      422,
      "invalid_target",
      `Give a partial charge for every atom or for none; atom ${missing.slice(0, 10).join(", ")}${missing.length > 10 ? "…" : ""} has none.`,
      { path: "atoms" },
    );
  }
  try {
    return inspectTarget({
      atoms: atoms.map((atom) => ({
        symbol: atom.symbol,
        massNumber: atom.massNumber,
        positionAngstrom: [atom.xAngstrom, atom.yAngstrom, atom.zAngstrom],
      })),
      chargeE: charge,
      multiplicity,
      partialChargesE: charged > 0 ? atoms.map((atom) => atom.partialChargeE!) : undefined,
    });
  } catch (error) {
    if (!(error instanceof ScienceInputError)) throw error;
    throw new AppError(422, "invalid_target", `The target cannot be used: ${error.message}`, error.details);
  }
}

/** The atoms as stored: element symbols as the science core writes them ("cl" → "Cl"), the rest as entered. */
export function storedAtoms(atoms: readonly TargetAtom[], inspection: TargetInspection): TargetAtom[] {
  return atoms.map((atom, i) => ({ ...atom, symbol: inspection.atoms[i]!.symbol }));
}
