/**
 * The target editor's state as typed (strings, so a half-typed "-0." stays on screen), its check field by
 * field with the messages shown beside each field, and the request it becomes once everything is valid.
 */
import { MAX_TARGET_ATOMS, type TargetAtom, targetAtomSchema, targetNameSchema } from "@shared/schemas";
import { getElement, isElementSymbol } from "@shared/science/elements";

export interface DraftAtom {
  /** Stable identity of the row while atoms are added and removed. */
  key: string;
  symbol: string;
  /** Mass number chosen, or null for the element's most common isotope. */
  massNumber: number | null;
  x: string;
  y: string;
  z: string;
}

/** Whether two lists of rows hold the same atoms as typed (row identities aside). */
export function sameAtoms(a: readonly DraftAtom[], b: readonly DraftAtom[]): boolean {
  return (
    a.length === b.length &&
    a.every((atom, i) => {
      const other = b[i]!;
      return (
        atom.symbol === other.symbol &&
        atom.massNumber === other.massNumber &&
        atom.x === other.x &&
        atom.y === other.y &&
        atom.z === other.z
      );
    })
  );
}

export interface TargetDraft {
  name: string;
  charge: string;
  /** Empty: the lowest multiplicity the electron count allows. */
  multiplicity: string;
  atoms: DraftAtom[];
}

/** Messages by field: `name`, `charge`, `multiplicity`, `atoms`, `atoms.<i>.symbol|x|y|z`. */
export type DraftErrors = Record<string, string>;

export interface CheckedAtoms {
  atoms: TargetAtom[];
  errors: DraftErrors;
}

let nextKey = 0;
export const newAtomKey = () => `atom-${++nextKey}`;

export function draftAtom(symbol: string, massNumber: number | null, position: readonly number[]): DraftAtom {
  return {
    key: newAtomKey(),
    symbol,
    massNumber,
    x: formatCoordinate(position[0] ?? 0),
    y: formatCoordinate(position[1] ?? 0),
    z: formatCoordinate(position[2] ?? 0),
  };
}

/** Six decimals (1e-6 Å), as geometry files print them; no "-0.000000". */
export function formatCoordinate(valueAngstrom: number): string {
  const text = valueAngstrom.toFixed(6);
  return /^-0\.0+$/.test(text) ? text.slice(1) : text;
}

const NUMBER = /^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/;

function parseNumber(text: string): number | null {
  return NUMBER.test(text) ? Number(text) : null;
}

/**
 * Checks the atom rows: element known, isotope one of the element's, each coordinate a number within the
 * stored range. Rows with a problem are left out of `atoms`.
 */
export function checkAtoms(rows: readonly DraftAtom[]): CheckedAtoms {
  const errors: DraftErrors = {};
  const atoms: TargetAtom[] = [];
  if (rows.length === 0) errors.atoms = "Add at least one atom.";
  if (rows.length > MAX_TARGET_ATOMS) errors.atoms = `A target has at most ${MAX_TARGET_ATOMS} atoms.`;
  rows.forEach((row, i) => {
    let ok = true;
    const symbol = row.symbol.trim();
    if (!symbol) {
      errors[`atoms.${i}.symbol`] = "Enter an element symbol, e.g. C or Cl.";
      ok = false;
    } else if (!isElementSymbol(symbol)) {
      errors[`atoms.${i}.symbol`] = `“${symbol}” is not an element symbol.`;
      ok = false;
    } else if (
      row.massNumber !== null &&
      !getElement(symbol).isotopes.some((iso) => iso.massNumber === row.massNumber)
    ) {
      errors[`atoms.${i}.symbol`] =
        `${getElement(symbol).symbol} has no isotope of mass number ${row.massNumber}.`;
      ok = false;
    }
    const position: number[] = [];
    for (const axis of ["x", "y", "z"] as const) {
      const value = parseNumber(row[axis]);
      if (value === null) {
        errors[`atoms.${i}.${axis}`] = `${axis} must be a number in Å, e.g. -0.757.`;
        ok = false;
      } else if (Math.abs(value) > 1e4) {
        errors[`atoms.${i}.${axis}`] = `${axis} is more than 10 000 Å from the origin; coordinates are in Å.`;
        ok = false;
      } else {
        position.push(value);
      }
    }
    if (!ok) return;
    const parsed = targetAtomSchema.safeParse({
      symbol: getElement(symbol).symbol,
      massNumber: row.massNumber,
      xAngstrom: position[0],
      yAngstrom: position[1],
      zAngstrom: position[2],
    });
    if (parsed.success) atoms.push(parsed.data);
    else errors[`atoms.${i}.symbol`] = parsed.error.issues[0]?.message ?? "This atom cannot be used.";
  });
  return { atoms, errors };
}

export interface CheckedDraft {
  errors: DraftErrors;
  /** Present only when every field is valid. */
  request: { name: string; charge: number; multiplicity?: number; atoms: TargetAtom[] } | null;
  charge: number | null;
  multiplicity: number | undefined | null;
  atoms: TargetAtom[];
}

const WHOLE = /^\s*[-+]?\d+\s*$/;

/** Checks the whole draft; `request` is what may be sent, null while any field has a problem. */
export function checkDraft(draft: TargetDraft): CheckedDraft {
  const { atoms, errors } = checkAtoms(draft.atoms);
  const name = targetNameSchema.safeParse(draft.name);
  if (!name.success) errors.name = name.error.issues[0]?.message ?? "Give the target a name.";
  let charge: number | null = null;
  if (!WHOLE.test(draft.charge) || Math.abs(Number(draft.charge)) > 10) {
    errors.charge = "The charge is a whole number of e from −10 to 10.";
  } else {
    charge = Number(draft.charge);
  }
  let multiplicity: number | undefined | null;
  if (draft.multiplicity.trim() === "") multiplicity = undefined;
  else if (
    !WHOLE.test(draft.multiplicity) ||
    Number(draft.multiplicity) < 1 ||
    Number(draft.multiplicity) > 20
  ) {
    errors.multiplicity = "The multiplicity 2S+1 is a whole number from 1 to 20, or empty for the lowest.";
    multiplicity = null;
  } else {
    multiplicity = Number(draft.multiplicity);
  }
  const valid = Object.keys(errors).length === 0 && charge !== null && multiplicity !== null;
  return {
    errors,
    request: valid
      ? {
          name: name.data!,
          charge: charge!,
          ...(typeof multiplicity === "number" ? { multiplicity } : {}),
          atoms,
        }
      : null,
    charge,
    multiplicity,
    atoms,
  };
}

/** An isotope choice for the picker: mass number, mass (u), natural abundance (%) or null. */
export interface IsotopeChoice {
  massNumber: number;
  massU: number;
  abundancePercent: number | null;
}

/**
 * Isotopes offered for an element: the naturally occurring ones and their neighbours within two mass
 * numbers (tritium, ¹⁴C…), plus the one already chosen.
 */
export function isotopeChoices(symbol: string, chosen: number | null = null): IsotopeChoice[] {
  if (!isElementSymbol(symbol)) return [];
  const element = getElement(symbol);
  const natural = element.isotopes.filter((iso) => iso.abundance !== null).map((iso) => iso.massNumber);
  const low = natural.length ? Math.min(...natural) - 2 : -Infinity;
  const high = natural.length ? Math.max(...natural) + 2 : Infinity;
  return element.isotopes
    .filter((iso) => (iso.massNumber >= low && iso.massNumber <= high) || iso.massNumber === chosen)
    .map((iso) => ({
      massNumber: iso.massNumber,
      massU: iso.massU,
      abundancePercent: iso.abundance === null ? null : iso.abundance * 100,
    }));
}
