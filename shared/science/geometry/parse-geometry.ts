/**
 * Parsing of target geometries given as text.
 *
 * Two layouts are accepted, both with Cartesian coordinates in ångström:
 *  - XYZ: a line with the atom count, one comment line, then one "Symbol x y z" line per atom;
 *  - a plain list: one "Symbol x y z" line per atom (blank lines and lines starting with "#" are skipped).
 * The layout is recognised from the first non-blank line (a lone integer means XYZ).
 *
 * Sigmaflow's isotope marking: a symbol may carry a mass number after "@", e.g. `H@2` (deuterium) or `C@13`.
 * `D` and `T` are accepted as `H@2` and `H@3` (common practice). Atomic numbers ("6") are accepted in place
 * of symbols, as many programs write them.
 */

import { getElementByNumber, isElementSymbol } from "../elements/isotopes";
import { ScienceInputError } from "../errors";
import type { Vec3 } from "./linear-algebra";
import { coordinateRangeProblem } from "./target";

/** One atom as written in the input, before isotopes are resolved. */
export interface ParsedAtom {
  /** Element symbol with IUPAC capitalisation. */
  symbol: string;
  /** Mass number written with the symbol (`C@13`), or null for the default isotope. */
  massNumber: number | null;
  positionAngstrom: Vec3;
  /** 1-based line number in the input text, for error messages. */
  line: number;
}

export interface ParsedGeometry {
  atoms: ParsedAtom[];
  /** Comment line of an XYZ file (empty for a plain list). */
  comment: string;
  format: "xyz" | "list";
}

const SYMBOL_PATTERN = /^([A-Za-z]{1,3}|\d{1,3})(?:@(\d{1,3}))?$/;
const NUMBER_PATTERN = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eEdD][+-]?\d+)?$/;

function symbolForNumber(atomicNumber: number): string | null {
  return atomicNumber >= 1 && atomicNumber <= 118 ? getElementByNumber(atomicNumber).symbol : null;
}

function parseCoordinate(token: string, lineNumber: number, axis: string): number {
  if (!NUMBER_PATTERN.test(token)) {
    throw new ScienceInputError(`Line ${lineNumber}: ${axis} coordinate "${token}" is not a number.`, {
      line: lineNumber,
      token,
    });
  }
  // Fortran-style exponents (1.0D-3) appear in files written by older programs.
  const value = Number(token.replace(/[dD]/, "e"));
  if (!Number.isFinite(value)) {
    throw new ScienceInputError(`Line ${lineNumber}: ${axis} coordinate "${token}" is not finite.`, {
      line: lineNumber,
      token,
    });
  }
  const problem = coordinateRangeProblem(value, `Line ${lineNumber}: ${axis} coordinate`, token);
  if (problem) throw new ScienceInputError(problem, { line: lineNumber, token });
  return value;
}

function parseSymbol(token: string, lineNumber: number): { symbol: string; massNumber: number | null } {
  const match = SYMBOL_PATTERN.exec(token);
  if (!match) {
    throw new ScienceInputError(
      `Line ${lineNumber}: "${token}" is not an element symbol (write e.g. C, Cl, H@2 for deuterium).`,
      { line: lineNumber, token },
    );
  }
  const [, rawSymbol = "", rawMass] = match;
  let symbol: string;
  let massNumber = rawMass === undefined ? null : Number(rawMass);
  if (/^\d+$/.test(rawSymbol)) {
    const fromNumber = symbolForNumber(Number(rawSymbol));
    if (!fromNumber) {
      throw new ScienceInputError(`Line ${lineNumber}: no element has atomic number ${rawSymbol}.`, {
        line: lineNumber,
        token,
      });
    }
    symbol = fromNumber;
  } else {
    symbol = rawSymbol.charAt(0).toUpperCase() + rawSymbol.slice(1).toLowerCase();
    if (symbol === "D" || symbol === "T") {
      if (massNumber !== null) {
        throw new ScienceInputError(`Line ${lineNumber}: "${token}": D and T already name an isotope.`, {
          line: lineNumber,
          token,
        });
      }
      massNumber = symbol === "D" ? 2 : 3;
      symbol = "H";
    } else if (!isElementSymbol(symbol)) {
      throw new ScienceInputError(`Line ${lineNumber}: unknown element symbol "${rawSymbol}".`, {
        line: lineNumber,
        token,
      });
    }
  }
  if (massNumber !== null && massNumber < 1) {
    throw new ScienceInputError(`Line ${lineNumber}: mass number in "${token}" must be positive.`, {
      line: lineNumber,
      token,
    });
  }
  return { symbol, massNumber };
}

function parseAtomLine(text: string, lineNumber: number): ParsedAtom {
  const tokens = text.trim().split(/\s+/);
  if (tokens.length !== 4) {
    throw new ScienceInputError(
      `Line ${lineNumber}: expected "Symbol x y z" (4 fields), found ${tokens.length} field(s): "${text.trim()}".`,
      { line: lineNumber },
    );
  }
  const [symbolToken = "", xs = "", ys = "", zs = ""] = tokens;
  const { symbol, massNumber } = parseSymbol(symbolToken, lineNumber);
  return {
    symbol,
    massNumber,
    positionAngstrom: [
      parseCoordinate(xs, lineNumber, "x"),
      parseCoordinate(ys, lineNumber, "y"),
      parseCoordinate(zs, lineNumber, "z"),
    ],
    line: lineNumber,
  };
}

/**
 * Parses a geometry in XYZ layout or as a plain "Symbol x y z" list (coordinates in Å).
 *
 * @param text - file contents
 * @returns atoms in input order with their line numbers, the XYZ comment and the layout found
 * @throws ScienceInputError with the 1-based line number for malformed lines, unknown symbols, coordinates
 *   beyond ±1e6 Å (MAX_COORDINATE_ANGSTROM), a count that does not match the atom lines, or an input with
 *   no atoms
 */
export function parseGeometry(text: string): ParsedGeometry {
  const lines = text.replace(/\r\n?/g, "\n").split("\n");
  let first = 0;
  while (first < lines.length && lines[first]!.trim() === "") first++;
  if (first >= lines.length) {
    throw new ScienceInputError("The geometry is empty: no atoms found.");
  }
  const firstLine = lines[first]!.trim();
  if (/^\d+$/.test(firstLine)) {
    const count = Number(firstLine);
    if (count < 1) {
      throw new ScienceInputError(`Line ${first + 1}: the atom count must be at least 1.`, {
        line: first + 1,
      });
    }
    const comment = (lines[first + 1] ?? "").trim();
    const atoms: ParsedAtom[] = [];
    let index = first + 2;
    for (; index < lines.length && atoms.length < count; index++) {
      const raw = lines[index]!;
      if (raw.trim() === "") {
        // A blank line with nothing after it is a short file, reported below with the counts.
        if (lines.slice(index).every((rest) => rest.trim() === "")) break;
        throw new ScienceInputError(
          `Line ${index + 1}: blank line where atom ${atoms.length + 1} of ${count} was expected.`,
          { line: index + 1 },
        );
      }
      atoms.push(parseAtomLine(raw, index + 1));
    }
    if (atoms.length < count) {
      throw new ScienceInputError(
        `Line ${first + 1}: the XYZ header announces ${count} atoms but only ${atoms.length} atom line(s) follow.`,
        { line: first + 1, expected: count, found: atoms.length },
      );
    }
    for (; index < lines.length; index++) {
      if (lines[index]!.trim() !== "") {
        throw new ScienceInputError(
          `Line ${index + 1}: unexpected text after the ${count} atoms announced on line ${first + 1}.`,
          { line: index + 1 },
        );
      }
    }
    return { atoms, comment, format: "xyz" };
  }
  const atoms: ParsedAtom[] = [];
  for (let index = first; index < lines.length; index++) {
    const raw = lines[index]!.trim();
    if (raw === "" || raw.startsWith("#")) continue;
    atoms.push(parseAtomLine(raw, index + 1));
  }
  return { atoms, comment: "", format: "list" };
}
