/**
 * Reads `orbitals.txt`, the orbital table the demo code hf-orbitals writes (format `sigmaflow-orbitals 1`,
 * described in deploy/demo/codes/psi4-orbitals.ts): header lines, then `orbitals <n>`, n orbital lines and
 * `end`. The file comes from a cluster host and is treated as hostile: its size and orbital count are
 * bounded, every field is checked (numbers finite and written as decimals, irreps those of the point
 * group, labels consistent with irrep and index, occupations 0–2) and the first problem is reported with
 * its line.
 */
import { ResultReadError } from "./errors";

export interface OrbitalTableOrbital {
  /** Index in the irrep and the irrep in lower case, e.g. "1b1"; ".alpha"/".beta" for unrestricted runs. */
  label: string;
  /** The irrep as in Cotton order tables, e.g. "B1", "A'". */
  irrep: string;
  /** 1-based position of the orbital among those of its irrep (and spin), by energy. */
  indexInIrrep: number;
  energyHartree: number;
  /** Electrons in the orbital, 0..2 (0..1 for a spin orbital). */
  occupation: number;
  /** ⟨φ|−½∇²|φ⟩ in hartree. */
  kineticHartree: number;
}

export interface OrbitalTable {
  /** Program and version, e.g. "psi4 1.3.2". */
  program: string;
  /** e.g. "rhf". */
  method: string;
  basis: string;
  /** The point group of the calculation as the program names it, lower case, e.g. "c2v". */
  pointGroup: string;
  totalEnergyHartree: number;
  nuclearRepulsionHartree: number;
  dipoleDebye: [number, number, number] | null;
  rotationalConstantsCm1: [number | null, number | null, number | null];
  orbitals: OrbitalTableOrbital[];
  harmonicFrequenciesCm1: number[] | null;
}

/** Largest file read (bytes of UTF-8). */
export const MAX_ORBITAL_TABLE_BYTES = 20 * 1024 * 1024;
/** Most orbitals in one table. */
export const MAX_ORBITALS = 100_000;
/** Most harmonic frequencies on the frequencies line (3N for the largest target Sigmaflow stores is far less). */
const MAX_FREQUENCIES = 30_000;

const FORMAT_LINE = "format sigmaflow-orbitals 1";

/** The Abelian point groups a calculation runs in, with their irreps in Cotton order (common practice). */
const IRREPS_BY_POINT_GROUP: Readonly<Record<string, readonly string[]>> = {
  c1: ["A"],
  ci: ["Ag", "Au"],
  c2: ["A", "B"],
  cs: ["A'", 'A"'],
  d2: ["A", "B1", "B2", "B3"],
  c2v: ["A1", "A2", "B1", "B2"],
  c2h: ["Ag", "Bg", "Au", "Bu"],
  d2h: ["Ag", "B1g", "B2g", "B3g", "Au", "B1u", "B2u", "B3u"],
};

const HEADER_KEYS = [
  "program",
  "method",
  "basis",
  "point_group",
  "energy_hartree",
  "nuclear_repulsion_hartree",
  "dipole_debye",
  "rotational_constants_cm1",
  "frequencies_cm1",
] as const;
type HeaderKey = (typeof HEADER_KEYS)[number];

/** A decimal number as programs print them; refuses NaN, Infinity, hexadecimal and empty fields. */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d{1,3})?$/;
const TOKEN = /^[A-Za-z0-9][A-Za-z0-9_.*+()-]{0,63}$/;
const SPIN_SUFFIXES = ["", ".alpha", ".beta"] as const;
// biome-ignore lint/suspicious/noControlCharactersInRegex: refusing control characters is the point.
const CONTROL = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/;

interface Line {
  number: number;
  fields: string[];
  text: string;
}

/**
 * Parses an orbital table.
 *
 * @param text - the file's content
 * @param fileName - named in errors (default "orbitals.txt")
 * @returns the table, orbitals in file order
 * @throws ResultReadError naming the line at fault (null when the file as a whole is refused)
 */
export function readOrbitalTable(text: string, fileName = "orbitals.txt"): OrbitalTable {
  const fail: Fail = (line, reason) => {
    throw new ResultReadError(fileName, line, reason);
  };
  if (text.length > MAX_ORBITAL_TABLE_BYTES || Buffer.byteLength(text, "utf8") > MAX_ORBITAL_TABLE_BYTES) {
    fail(null, `the file is larger than ${MAX_ORBITAL_TABLE_BYTES / (1024 * 1024)} MB`);
  }
  const { lines, lastLineNumber } = meaningfulLines(text, fail);
  let cursor = 0;
  const next = (): Line | undefined => lines[cursor++];

  const first = next();
  if (!first) return fail(null, "the file is empty");
  if (first.fields.join(" ") !== FORMAT_LINE) {
    fail(first.number, `expected "${FORMAT_LINE}" as the first line, found "${clip(first.text)}"`);
  }

  const header = new Map<HeaderKey, Line>();
  let orbitalsLine: Line | undefined;
  for (let line = next(); line; line = next()) {
    const key = line.fields[0]!;
    if (key === "orbitals") {
      orbitalsLine = line;
      break;
    }
    if (!(HEADER_KEYS as readonly string[]).includes(key)) {
      fail(
        line.number,
        `unknown header line "${clip(key)}" (expected one of ${HEADER_KEYS.join(", ")} or orbitals)`,
      );
    }
    const previous = header.get(key as HeaderKey);
    if (previous) fail(line.number, `${key} is given twice (first on line ${previous.number})`);
    if (line.fields.length < 2) fail(line.number, `${key} has no value`);
    header.set(key as HeaderKey, line);
  }
  const missing = HEADER_KEYS.filter((key) => !header.has(key));
  if (missing.length > 0) {
    fail(
      orbitalsLine?.number ?? lastLineNumber,
      `header line${missing.length > 1 ? "s" : ""} missing: ${missing.join(", ")}`,
    );
  }
  if (!orbitalsLine) return fail(lastLineNumber, 'the "orbitals <count>" line is missing');

  const get = (key: HeaderKey) => header.get(key)!;
  const program = get("program").text.trim().slice("program".length).trim();
  if (program.length > 200) fail(get("program").number, "program is longer than 200 characters");
  const method = singleToken(get("method"), fail);
  const basis = singleToken(get("basis"), fail);
  const pointGroupLine = get("point_group");
  const pointGroup = singleToken(pointGroupLine, fail);
  const irreps = IRREPS_BY_POINT_GROUP[pointGroup];
  if (!irreps) {
    fail(
      pointGroupLine.number,
      `point group "${clip(pointGroup)}" is not one of ${Object.keys(IRREPS_BY_POINT_GROUP).join(", ")}`,
    );
  }
  const totalEnergyHartree = numberField(get("energy_hartree"), 1, fail);
  const nuclearRepulsionHartree = numberField(get("nuclear_repulsion_hartree"), 1, fail);
  if (nuclearRepulsionHartree < 0)
    fail(get("nuclear_repulsion_hartree").number, "nuclear repulsion is negative");
  const dipoleDebye = noneOrNumbers(get("dipole_debye"), 3, 3, fail) as [number, number, number] | null;
  const rotationalConstantsCm1 = rotationalConstants(get("rotational_constants_cm1"), fail);
  const harmonicFrequenciesCm1 = noneOrNumbers(get("frequencies_cm1"), 1, MAX_FREQUENCIES, fail);

  if (orbitalsLine.fields.length !== 2 || !/^\d{1,7}$/.test(orbitalsLine.fields[1]!)) {
    fail(orbitalsLine.number, 'expected "orbitals <count>" with a whole number');
  }
  const count = Number(orbitalsLine.fields[1]);
  if (count < 1) fail(orbitalsLine.number, "the table lists no orbitals");
  if (count > MAX_ORBITALS) fail(orbitalsLine.number, `more than ${MAX_ORBITALS} orbitals (${count})`);

  const orbitals: OrbitalTableOrbital[] = [];
  const seen = new Map<string, number>();
  let spinOrbitals: boolean | null = null;
  for (let i = 0; i < count; i++) {
    const line = next();
    if (!line || line.fields[0] === "end") {
      fail(line?.number ?? lastLineNumber, `the table announces ${count} orbitals but lists ${i}`);
    }
    const orbital = orbitalLine(line!, irreps!, fail);
    const spin = orbital.label.endsWith(".alpha") || orbital.label.endsWith(".beta");
    if (spinOrbitals !== null && spin !== spinOrbitals) {
      fail(line!.number, "spin orbitals (.alpha/.beta) and spatial orbitals are mixed in one table");
    }
    spinOrbitals = spin;
    if (orbital.occupation > (spin ? 1 : 2)) {
      fail(
        line!.number,
        `occupation ${orbital.occupation} is more than a${spin ? " spin" : "n"} orbital holds`,
      );
    }
    const earlier = seen.get(orbital.label);
    if (earlier !== undefined)
      fail(line!.number, `orbital ${orbital.label} is listed twice (first on line ${earlier})`);
    seen.set(orbital.label, line!.number);
    orbitals.push(orbital);
  }
  const end = next();
  if (!end) return fail(lastLineNumber, 'the file ends without the "end" line (was it cut short?)');
  if (end.fields.join(" ") !== "end") {
    fail(end.number, `expected "end" after ${count} orbitals, found "${clip(end.text)}"`);
  }
  const extra = next();
  if (extra) fail(extra.number, `unexpected text after "end": "${clip(extra.text)}"`);

  return {
    program,
    method,
    basis,
    pointGroup,
    totalEnergyHartree,
    nuclearRepulsionHartree,
    dipoleDebye,
    rotationalConstantsCm1,
    orbitals,
    harmonicFrequenciesCm1,
  };
}

type Fail = (line: number | null, reason: string) => never;

const clip = (value: string) => (value.length > 60 ? `${value.slice(0, 57)}...` : value);

/** Lines that are not blank or comments, split into whitespace-separated fields, with 1-based numbers. */
function meaningfulLines(text: string, fail: Fail): { lines: Line[]; lastLineNumber: number } {
  const lines: Line[] = [];
  let number = 0;
  for (const raw of text.split("\n")) {
    number += 1;
    const line = raw.endsWith("\r") ? raw.slice(0, -1) : raw;
    const trimmed = line.trim();
    if (trimmed === "" || trimmed.startsWith("#")) continue;
    if (CONTROL.test(line)) fail(number, "the line contains a control character");
    // Only the header, the orbitals and "end" are meaningful; more such lines than that is not a table.
    if (lines.length > MAX_ORBITALS + HEADER_KEYS.length + 3) {
      fail(number, `more than ${MAX_ORBITALS} orbitals`);
    }
    lines.push({ number, fields: trimmed.split(/[ \t]+/), text: trimmed });
  }
  return { lines, lastLineNumber: number };
}

function singleToken(line: Line, fail: Fail): string {
  if (line.fields.length !== 2)
    fail(line.number, `${line.fields[0]} takes one value, found ${line.fields.length - 1}`);
  const value = line.fields[1]!;
  if (!TOKEN.test(value)) fail(line.number, `${line.fields[0]} "${clip(value)}" is not a name`);
  return value;
}

function parseNumber(field: string, line: number, what: string, fail: Fail): number {
  const value = DECIMAL.test(field) ? Number(field) : Number.NaN;
  if (!Number.isFinite(value)) fail(line, `${what} "${clip(field)}" is not a finite number`);
  return value;
}

function numberField(line: Line, count: number, fail: Fail): number {
  if (line.fields.length !== count + 1) {
    fail(
      line.number,
      `${line.fields[0]} takes ${count} value${count > 1 ? "s" : ""}, found ${line.fields.length - 1}`,
    );
  }
  return parseNumber(line.fields[1]!, line.number, line.fields[0]!, fail);
}

function noneOrNumbers(line: Line, min: number, max: number, fail: Fail): number[] | null {
  const key = line.fields[0]!;
  const values = line.fields.slice(1);
  if (values.length === 1 && values[0] === "none") return null;
  if (values.length < min || values.length > max) {
    const expected = min === max ? `${min}` : `${min} to ${max}`;
    fail(line.number, `${key} takes ${expected} numbers or "none", found ${values.length} values`);
  }
  return values.map((v) => parseNumber(v, line.number, key, fail));
}

function rotationalConstants(line: Line, fail: Fail): [number | null, number | null, number | null] {
  const values = line.fields.slice(1);
  if (values.length !== 3) {
    fail(line.number, `rotational_constants_cm1 takes 3 values (numbers or "none"), found ${values.length}`);
  }
  return values.map((v) => {
    if (v === "none") return null;
    const value = parseNumber(v, line.number, "rotational constant", fail);
    if (value <= 0) fail(line.number, `rotational constant ${v} is not positive`);
    return value;
  }) as [number | null, number | null, number | null];
}

function orbitalLine(line: Line, irreps: readonly string[], fail: Fail): OrbitalTableOrbital {
  if (line.fields.length !== 6) {
    fail(
      line.number,
      `an orbital line has 6 fields (label irrep index energy_hartree occupation kinetic_hartree), found ${line.fields.length}`,
    );
  }
  const [label, irrep, indexField, energyField, occupationField, kineticField] = line.fields as [
    string,
    string,
    string,
    string,
    string,
    string,
  ];
  if (!irreps.includes(irrep)) {
    fail(line.number, `irrep "${clip(irrep)}" is not one of the point group's (${irreps.join(", ")})`);
  }
  if (!/^[1-9]\d{0,5}$/.test(indexField) || Number(indexField) > MAX_ORBITALS) {
    fail(line.number, `index in irrep "${clip(indexField)}" is not a whole number from 1 to ${MAX_ORBITALS}`);
  }
  const indexInIrrep = Number(indexField);
  const stem = `${indexInIrrep}${irrep.toLowerCase()}`;
  if (!SPIN_SUFFIXES.some((suffix) => label === `${stem}${suffix}`)) {
    fail(
      line.number,
      `label "${clip(label)}" does not match irrep ${irrep} and index ${indexInIrrep} (expected ${stem})`,
    );
  }
  const energyHartree = parseNumber(energyField, line.number, "orbital energy", fail);
  const occupation = parseNumber(occupationField, line.number, "occupation", fail);
  if (occupation < 0 || occupation > 2)
    fail(line.number, `occupation ${occupationField} is not between 0 and 2`);
  const kineticHartree = parseNumber(kineticField, line.number, "kinetic energy", fail);
  // ⟨φ|−½∇²|φ⟩ = ½‖∇φ‖² cannot be negative.
  if (kineticHartree < 0) fail(line.number, `kinetic energy ${kineticField} is negative`);
  return { label, irrep, indexInIrrep, energyHartree, occupation, kineticHartree };
}
