/**
 * Elements and isotopes for targets: atomic numbers, isotope masses and natural abundances.
 *
 * Data come from the `chemical-elements` package (2.3.3), whose isotope masses and abundances are the NIST
 * "Atomic Weights and Isotopic Compositions" table (Coursey et al., NIST Standard Reference Database 144).
 * The default isotope of an element is its most abundant naturally occurring isotope. Elements with no
 * natural isotopic composition in that table (Tc, Pm, Po...) have no default: the user must pick one.
 */
import { elementsAndIsotopes } from "chemical-elements";
import { ScienceInputError } from "../errors";

/** One isotope of one element. */
export interface IsotopeInfo {
  symbol: string;
  atomicNumber: number;
  /** Mass number A (protons + neutrons). */
  massNumber: number;
  /** Atomic (not nuclear) mass in unified atomic mass units u. */
  massU: number;
  /** Natural abundance as a mole fraction (0..1), or null when the isotope does not occur naturally. */
  abundance: number | null;
}

/** One element with all isotopes the table knows. */
export interface ElementInfo {
  symbol: string;
  name: string;
  atomicNumber: number;
  /** Standard atomic weight in u, or null when the element has no natural isotopic composition. */
  standardAtomicWeightU: number | null;
  /** Isotopes sorted by mass number. */
  isotopes: IsotopeInfo[];
  /** The most abundant isotope, or null for elements without a natural isotopic composition. */
  defaultIsotope: IsotopeInfo | null;
}

function buildTables(): { bySymbol: Map<string, ElementInfo>; byNumber: Map<number, ElementInfo> } {
  const bySymbol = new Map<string, ElementInfo>();
  const byNumber = new Map<number, ElementInfo>();
  for (const raw of elementsAndIsotopes) {
    const isotopes: IsotopeInfo[] = raw.isotopes
      .map((iso) => ({
        symbol: raw.symbol,
        atomicNumber: raw.number,
        massNumber: iso.nominal,
        massU: iso.mass,
        abundance: iso.abundance ?? null,
      }))
      .sort((a, b) => a.massNumber - b.massNumber);
    let defaultIsotope: IsotopeInfo | null = null;
    for (const iso of isotopes) {
      if (
        iso.abundance !== null &&
        (defaultIsotope === null || iso.abundance > (defaultIsotope.abundance ?? 0))
      ) {
        defaultIsotope = iso;
      }
    }
    const info: ElementInfo = {
      symbol: raw.symbol,
      name: raw.name,
      atomicNumber: raw.number,
      standardAtomicWeightU: raw.mass ?? null,
      isotopes,
      defaultIsotope,
    };
    bySymbol.set(raw.symbol, info);
    byNumber.set(raw.number, info);
  }
  return { bySymbol, byNumber };
}

const TABLES = buildTables();

/** Normalises "h", "HE", "he" to the IUPAC capitalisation "H", "He". */
function normaliseSymbol(symbol: string): string {
  const trimmed = symbol.trim();
  return trimmed.charAt(0).toUpperCase() + trimmed.slice(1).toLowerCase();
}

/**
 * Looks up an element by symbol (case-insensitive: "he", "HE" and "He" are helium).
 *
 * @param symbol - element symbol, e.g. "C", "Cl"
 * @returns the element with its isotopes
 * @throws ScienceInputError when the symbol is not one of the 118 elements
 */
export function getElement(symbol: string): ElementInfo {
  const info = TABLES.bySymbol.get(normaliseSymbol(symbol));
  if (!info) {
    throw new ScienceInputError(`Unknown element symbol "${symbol}".`, { symbol });
  }
  return info;
}

/**
 * Looks up an element by atomic number Z.
 *
 * @param atomicNumber - Z, 1..118
 * @throws ScienceInputError for any other value
 */
export function getElementByNumber(atomicNumber: number): ElementInfo {
  const info = TABLES.byNumber.get(atomicNumber);
  if (!info) {
    throw new ScienceInputError(`No element with atomic number ${atomicNumber} (known: 1 to 118).`, {
      atomicNumber,
    });
  }
  return info;
}

/** True when `symbol` names an element (case-insensitive). */
export function isElementSymbol(symbol: string): boolean {
  return TABLES.bySymbol.has(normaliseSymbol(symbol));
}

/**
 * Returns one isotope of an element: the one with the given mass number, or the most abundant natural
 * isotope when `massNumber` is omitted.
 *
 * @param symbol - element symbol (case-insensitive)
 * @param massNumber - mass number A; omitted -> most abundant isotope (NIST natural abundances)
 * @returns the isotope with its atomic mass in u
 * @throws ScienceInputError for an unknown symbol, an isotope the table does not list (the message lists
 *   the known mass numbers), or an element without natural isotopes when no mass number is given
 */
export function getIsotope(symbol: string, massNumber?: number): IsotopeInfo {
  const element = getElement(symbol);
  const known = element.isotopes.map((iso) => iso.massNumber);
  if (massNumber === undefined) {
    if (!element.defaultIsotope) {
      throw new ScienceInputError(
        `${element.symbol} has no naturally occurring isotope to use as default; choose one by mass number ` +
          `(e.g. ${element.symbol}@${known[Math.floor(known.length / 2)]}). Known mass numbers: ${known.join(", ")}.`,
        { symbol: element.symbol, knownMassNumbers: known },
      );
    }
    return element.defaultIsotope;
  }
  const isotope = element.isotopes.find((iso) => iso.massNumber === massNumber);
  if (!isotope) {
    throw new ScienceInputError(
      `${element.symbol}-${massNumber} is not a known isotope. Known mass numbers for ${element.symbol}: ` +
        `${known.join(", ")}.`,
      { symbol: element.symbol, massNumber, knownMassNumbers: known },
    );
  }
  return isotope;
}

/** All 118 elements ordered by atomic number. */
export function listElements(): ElementInfo[] {
  return [...TABLES.byNumber.values()].sort((a, b) => a.atomicNumber - b.atomicNumber);
}
