/**
 * The words a parameter's field shows: its label (the schema's `title`, else its name in words, without
 * the unit its name ends in), its hint as sentences (description, bounds with the unit, default), and
 * the checker's terse messages ("must be <= 1000") as sentences naming the unit ("At most 1000 bohr³.").
 */

import type { FieldKind } from "./parameter-fields";

/** Words kept as written: acronyms upper-case, symbols as physicists write them. */
const KNOWN_WORDS: Record<string, string> = {
  scf: "SCF",
  hf: "HF",
  dft: "DFT",
  mp2: "MP2",
  ccsd: "CCSD",
  cc: "CC",
  ci: "CI",
  casscf: "CASSCF",
  rhf: "RHF",
  uhf: "UHF",
  rohf: "ROHF",
  ecp: "ECP",
  xyz: "XYZ",
  id: "ID",
  lmax: "lmax",
  mmax: "mmax",
};

/** Unit words a parameter name may end in ("energiesEv", "cutoffRadiusBohr", "polarizabilityBohr3"). */
const UNIT_SUFFIXES = [
  "Ev",
  "Mev",
  "Hartree",
  "Bohr3",
  "Bohr2",
  "Bohr",
  "Angstrom",
  "Kelvin",
  "Seconds",
  "Minutes",
];

const capitalize = (text: string) => (text ? text.charAt(0).toUpperCase() + text.slice(1) : text);

/** "polarizabilityBohr3" → "Polarizability"; "useStageDensity" → "Use stage density"; "scfConvergence" → "SCF convergence". */
export function wordsOfName(name: string): string {
  let base = name;
  for (const suffix of UNIT_SUFFIXES) {
    if (base.length > suffix.length && base.endsWith(suffix)) {
      base = base.slice(0, -suffix.length);
      break;
    }
  }
  const words = base
    .replace(/[_-]+/g, " ")
    .replace(/([a-z0-9])([A-Z])/g, "$1 $2")
    .replace(/([A-Z]+)([A-Z][a-z])/g, "$1 $2")
    .trim()
    .split(/\s+/)
    .filter(Boolean);
  if (words.length === 0) return name;
  const text = words
    .map((word, i) => {
      const known = KNOWN_WORDS[word.toLowerCase()];
      if (known) return known;
      // An all-capital word is an acronym already.
      if (word.length > 1 && word === word.toUpperCase() && /[A-Z]/.test(word)) return word;
      return i === 0 ? capitalize(word.toLowerCase()) : word.toLowerCase();
    })
    .join(" ");
  return text;
}

/** The label a field shows: "Polarizability (bohr³)". */
export function labelOfField(field: { label: string; unit: string | null }): string {
  return field.unit ? `${field.label} (${field.unit})` : field.label;
}

/** A number as the form shows it, with its unit when there is one: "1000 bohr³". */
const withUnit = (value: number | string, unit: string | null) => (unit ? `${value} ${unit}` : `${value}`);

/** Text as a sentence: first letter capital, ending in a full stop (or the mark it ends with). */
export function asSentence(text: string): string {
  const trimmed = text.trim();
  if (!trimmed) return "";
  const capital = capitalize(trimmed);
  return /[.!?]$/.test(capital) ? capital : `${capital}.`;
}

function boundsOf(kind: Extract<FieldKind, { type: "number" }>, unit: string | null): string | null {
  const { minimum, maximum, exclusiveMinimum, exclusiveMaximum, integer } = kind;
  const lower =
    exclusiveMinimum !== undefined
      ? { text: `more than ${exclusiveMinimum}`, value: exclusiveMinimum, inclusive: false }
      : minimum !== undefined
        ? { text: `at least ${minimum}`, value: minimum, inclusive: true }
        : null;
  const upper =
    exclusiveMaximum !== undefined
      ? { text: `less than ${withUnit(exclusiveMaximum, unit)}`, value: exclusiveMaximum, inclusive: false }
      : maximum !== undefined
        ? { text: `at most ${withUnit(maximum, unit)}`, value: maximum, inclusive: true }
        : null;
  let range: string | null;
  if (lower && upper) {
    range =
      lower.inclusive && upper.inclusive
        ? `from ${lower.value} to ${withUnit(upper.value, unit)}`
        : `${lower.text} and ${upper.text}`;
  } else if (lower) {
    range = `${lower.text}${unit ? ` ${unit}` : ""}`;
  } else {
    range = upper?.text ?? null;
  }
  if (integer) return asSentence(range ? `a whole number ${range}` : "a whole number");
  return range ? asSentence(range) : null;
}

function defaultText(defaultValue: unknown, kind: FieldKind, unit: string | null): string | null {
  if (defaultValue === undefined || kind.type === "energy-grid") return null;
  if (typeof defaultValue === "boolean") return `Default: ${defaultValue ? "on" : "off"}.`;
  if (typeof defaultValue === "number") return `Default: ${withUnit(defaultValue, unit)}.`;
  if (typeof defaultValue === "string") return `Default: ${defaultValue}.`;
  return `Default: ${JSON.stringify(defaultValue)}.`;
}

/** The hint under a field, as sentences: "Cut-off radius r_c of the polarization term, bohr. More than 0 and at most 20 bohr. Default: 2 bohr." */
export function hintOfField(field: {
  kind: FieldKind;
  unit: string | null;
  description: string | null;
  defaultValue: unknown;
  required: boolean;
}): string {
  const parts = [
    field.description ? asSentence(field.description) : null,
    field.kind.type === "number" ? boundsOf(field.kind, field.unit) : null,
    defaultText(field.defaultValue, field.kind, field.unit),
    field.required ? "Required." : null,
  ];
  return parts.filter(Boolean).join(" ");
}

const TYPE_WORDS: Record<string, string> = {
  number: "a number",
  integer: "a whole number",
  string: "text",
  boolean: "on or off",
  array: "a list",
  object: "an object",
  null: "empty",
};

/**
 * One of the checker's messages (the server's wording, "must be <= 1000", maybe after "2: " naming an
 * item inside the parameter) as a sentence for the field, with the field's unit: "At most 1000 bohr³.".
 */
export function errorSentence(message: string, unit: string | null): string {
  const inner = /^(\d+(?:\.\S+)?): (.*)$/s.exec(message);
  if (inner?.[1] !== undefined && inner[2] !== undefined) {
    const [first, ...rest] = inner[1].split(".");
    const where = `Value ${Number(first) + 1}${rest.length > 0 ? ` (${rest.join(".")})` : ""}`;
    const sentence = errorSentence(inner[2], unit);
    return `${where}: ${sentence.charAt(0).toLowerCase()}${sentence.slice(1)}`;
  }
  const bound = /^must be (<=|>=|<|>) (\S+)$/.exec(message);
  if (bound?.[1] && bound[2]) {
    const words = { "<=": "At most", ">=": "At least", "<": "Less than", ">": "More than" }[bound[1]];
    return `${words} ${withUnit(bound[2], unit)}.`;
  }
  const types = /^must be ([a-z,]+)$/.exec(message);
  if (types?.[1]) {
    const names = types[1].split(",").map((type) => TYPE_WORDS[type] ?? type);
    return `Must be ${names.join(" or ")}.`;
  }
  const multiple = /^must be multiple of (\S+)$/.exec(message);
  if (multiple?.[1]) return `Must be a multiple of ${withUnit(multiple[1], unit)}.`;
  const items = /^must NOT have (more|fewer) than (\d+) items$/.exec(message);
  if (items?.[1] && items[2]) return `${items[1] === "more" ? "At most" : "At least"} ${items[2]} values.`;
  const chars = /^must NOT have (more|fewer) than (\d+) characters$/.exec(message);
  if (chars?.[1] && chars[2])
    return `${chars[1] === "more" ? "At most" : "At least"} ${chars[2]} characters.`;
  if (message === "is required") return "Required: give a value.";
  return asSentence(message);
}
