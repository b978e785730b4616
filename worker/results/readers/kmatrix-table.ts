/**
 * Reader of `kmatrices.txt`, the text file of K-matrices per irreducible representation (irrep) and
 * collision energy that Sigmaflow's demo scattering solver writes. Line format (whitespace-separated;
 * a line starting with '#' is a comment; blank lines are ignored):
 *
 *   format sigmaflow-kmatrix 1
 *   model <free text to end of line>
 *   target_spin_multiplicity <int>
 *   irrep <label> total_spin_multiplicity <int> channels <n>
 *   channel <i> <l> <m>                          n lines, i = 1..n, |m| ≤ l (real spherical harmonics)
 *   energy <E in eV> <K_11> <K_12> ... <K_nn>    one line per energy, row-major, symmetric
 *   end irrep
 *
 * Irrep blocks repeat, one per irrep of the target's Abelian subgroup (an irrep without channels is written
 * with `channels 0` and no energy lines). The reader is strict: every count, index and number is checked,
 * K must be symmetric within {@link KMATRIX_SYMMETRY_TOLERANCE} (relative), energies increase within an
 * irrep and every irrep with channels uses the same energies. Anything else is a {@link ResultReadError}
 * naming the line. Sizes are bounded (file ≤ 50 MB, ≤ 2 000 channels per irrep, ≤ 500 irreps).
 */
import type { KMatrixInputDocument } from "../../../shared/schemas/science-scattering";
import { KMATRIX_SYMMETRY_TOLERANCE, MAX_KMATRIX_ENTRY } from "../../../shared/science/kmatrix";
import { ResultReadError } from "./errors";

export const KMATRIX_FILE_NAME = "kmatrices.txt";
export const KMATRIX_MAX_BYTES = 50 * 1024 * 1024;
export const KMATRIX_MAX_CHANNELS = 2000;
const MAX_IRREPS = 500;
const MAX_MODEL_CHARS = 300;
/** The science core's limit on l (shared/schemas/science-scattering.ts). */
const MAX_L = 500;
/** Two irreps' energies closer than this (eV) are the same grid point (as in the science core). */
const ENERGY_MATCH_TOLERANCE_EV = 1e-9;

export interface KMatrixChannel {
  /** Orbital angular momentum of the scattered electron. */
  l: number;
  /** Index of the real spherical harmonic, −l..l. */
  m: number;
}

export interface KMatrixPointRow {
  /** Collision energy (electron kinetic energy above the target's ground state), eV. */
  energyEv: number;
  /** n×n K over the irrep's channels, row-major, symmetrised ((K + Kᵀ)/2). */
  kMatrix: Float64Array;
}

export interface KMatrixIrrep {
  irrep: string;
  totalSpinMultiplicity: number;
  channels: KMatrixChannel[];
  points: KMatrixPointRow[];
  /** Line of the `irrep` header, for messages. */
  line: number;
}

export interface KMatrixTable {
  /** The solver's description of its model (the `model` line). */
  model: string;
  targetSpinMultiplicity: number;
  /** In file order (Cotton order of the target's Abelian subgroup). */
  irreps: KMatrixIrrep[];
  /** The common energy grid of the irreps with channels, eV, increasing. */
  energiesEv: number[];
}

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const INTEGER = /^[+-]?\d{1,9}$/;
const IRREP_LABEL = /^[A-Za-z][A-Za-z0-9'"_+-]{0,31}$/;

/**
 * Reads a K-matrix table.
 *
 * @param text - the file's content (UTF-8 decoded)
 * @param fileName - the name used in error messages
 * @returns model, target spin multiplicity, irreps with channels and K-matrices, and the common energies
 * @throws ResultReadError naming the line at fault (or the file, for size and missing parts)
 */
export function readKMatrixTable(text: string, fileName = KMATRIX_FILE_NAME): KMatrixTable {
  const bytes = Buffer.byteLength(text, "utf8");
  if (bytes > KMATRIX_MAX_BYTES) {
    throw new ResultReadError(
      fileName,
      null,
      `the file has ${bytes} bytes; Sigmaflow reads K-matrix tables of at most ${KMATRIX_MAX_BYTES} bytes (50 MB)`,
    );
  }
  const fail = (line: number, reason: string): never => {
    throw new ResultReadError(fileName, line, reason);
  };
  const number = (token: string | undefined, line: number, what: string): number => {
    if (token === undefined) return fail(line, `${what} is missing`);
    if (!NUMBER.test(token)) return fail(line, `${what} "${clip(token)}" is not a number`);
    const value = Number(token);
    if (!Number.isFinite(value)) return fail(line, `${what} ${clip(token)} is not finite`);
    return value;
  };
  const integer = (token: string | undefined, line: number, what: string): number => {
    if (token === undefined) return fail(line, `${what} is missing`);
    if (!INTEGER.test(token)) return fail(line, `${what} "${clip(token)}" is not a whole number`);
    return Number(token);
  };
  const keyword = (tokens: string[], expected: string, line: number) => {
    if (tokens[0] !== expected) fail(line, `expected "${expected} …", found "${clip(tokens.join(" "))}"`);
  };

  let model: string | null = null;
  let targetSpinMultiplicity: number | null = null;
  let formatSeen = false;
  const irreps: KMatrixIrrep[] = [];
  const seenSymmetries = new Set<string>();
  /** Energies of the first irrep with channels: every other irrep must use them. */
  let grid: number[] | null = null;
  let current: (KMatrixIrrep & { expectedChannels: number }) | null = null;

  const lines = text.split(/\r?\n/);
  /** The last line with content: where a file cut short is reported. */
  let lastLine = 0;
  for (let index = 0; index < lines.length; index++) {
    const lineNumber = index + 1;
    const raw = lines[index]!;
    const trimmed = raw.trim();
    if (trimmed === "" || trimmed.startsWith("#")) continue;
    lastLine = lineNumber;
    const tokens = trimmed.split(/\s+/);
    const head = tokens[0]!;

    if (!formatSeen) {
      if (
        head !== "format" ||
        tokens[1] !== "sigmaflow-kmatrix" ||
        tokens[2] !== "1" ||
        tokens.length !== 3
      ) {
        fail(lineNumber, 'the first line must be "format sigmaflow-kmatrix 1"');
      }
      formatSeen = true;
      continue;
    }
    if (model === null) {
      keyword(tokens, "model", lineNumber);
      const description = trimmed.slice("model".length).trim();
      if (description === "") fail(lineNumber, "the model line describes no model");
      if (description.length > MAX_MODEL_CHARS) {
        fail(lineNumber, `the model line is longer than ${MAX_MODEL_CHARS} characters`);
      }
      model = description;
      continue;
    }
    if (targetSpinMultiplicity === null) {
      keyword(tokens, "target_spin_multiplicity", lineNumber);
      if (tokens.length !== 2) fail(lineNumber, 'expected "target_spin_multiplicity <int>"');
      const value = integer(tokens[1], lineNumber, "the target spin multiplicity");
      if (value < 1 || value > 99) fail(lineNumber, `the target spin multiplicity ${value} is not in 1..99`);
      targetSpinMultiplicity = value;
      continue;
    }

    if (current === null) {
      keyword(tokens, "irrep", lineNumber);
      if (tokens.length !== 6 || tokens[2] !== "total_spin_multiplicity" || tokens[4] !== "channels") {
        fail(lineNumber, 'expected "irrep <label> total_spin_multiplicity <int> channels <n>"');
      }
      const label = tokens[1]!;
      if (!IRREP_LABEL.test(label)) fail(lineNumber, `"${clip(label)}" is not an irrep label`);
      const total = integer(tokens[3], lineNumber, "the total spin multiplicity");
      // An electron (spin ½) couples with a target of multiplicity M to M ± 1 only.
      if (total !== targetSpinMultiplicity + 1 && total !== targetSpinMultiplicity - 1) {
        fail(
          lineNumber,
          `total spin multiplicity ${total} is impossible for a target of multiplicity ${targetSpinMultiplicity} plus an electron`,
        );
      }
      const channels = integer(tokens[5], lineNumber, "the channel count");
      if (channels < 0 || channels > KMATRIX_MAX_CHANNELS) {
        fail(
          lineNumber,
          `${channels} channels: Sigmaflow reads 0 to ${KMATRIX_MAX_CHANNELS} channels per irrep`,
        );
      }
      const key = `${label}\u0000${total}`;
      if (seenSymmetries.has(key))
        fail(lineNumber, `irrep ${label} with total spin multiplicity ${total} appears twice`);
      seenSymmetries.add(key);
      if (irreps.length >= MAX_IRREPS) fail(lineNumber, `more than ${MAX_IRREPS} irrep blocks`);
      current = {
        irrep: label,
        totalSpinMultiplicity: total,
        channels: [],
        points: [],
        line: lineNumber,
        expectedChannels: channels,
      };
      continue;
    }

    const block = current;
    if (head === "channel") {
      if (block.points.length > 0) fail(lineNumber, "a channel line after the energy lines");
      if (block.channels.length >= block.expectedChannels) {
        fail(
          lineNumber,
          `irrep ${block.irrep} declares ${block.expectedChannels} channels; this is one more`,
        );
      }
      if (tokens.length !== 4) fail(lineNumber, 'expected "channel <i> <l> <m>"');
      const i = integer(tokens[1], lineNumber, "the channel index");
      const l = integer(tokens[2], lineNumber, "l");
      const m = integer(tokens[3], lineNumber, "m");
      if (i !== block.channels.length + 1) {
        fail(
          lineNumber,
          `channel index ${i}: expected ${block.channels.length + 1} (channels are numbered 1..n in order)`,
        );
      }
      if (l < 0 || l > MAX_L) fail(lineNumber, `l = ${l} is not in 0..${MAX_L}`);
      if (Math.abs(m) > l) fail(lineNumber, `m = ${m} is not in −l..l for l = ${l}`);
      if (block.channels.some((c) => c.l === l && c.m === m)) {
        fail(lineNumber, `channel (l = ${l}, m = ${m}) appears twice in irrep ${block.irrep}`);
      }
      block.channels.push({ l, m });
      continue;
    }
    if (head === "energy") {
      const n = block.expectedChannels;
      if (block.channels.length !== n) {
        fail(
          lineNumber,
          `irrep ${block.irrep} declares ${n} channels but lists ${block.channels.length} before its energies`,
        );
      }
      if (n === 0) fail(lineNumber, `irrep ${block.irrep} has no channels, so it has no K-matrices`);
      if (tokens.length !== 2 + n * n) {
        fail(
          lineNumber,
          `expected the energy and ${n * n} K-matrix values (${n}×${n}); found ${tokens.length - 1} values`,
        );
      }
      const energyEv = number(tokens[1], lineNumber, "the energy");
      if (!(energyEv > 0)) fail(lineNumber, `the energy ${energyEv} eV is not above 0 eV`);
      const previous = block.points.at(-1);
      if (previous && !(energyEv > previous.energyEv)) {
        fail(
          lineNumber,
          `energies must increase within an irrep (${previous.energyEv} eV, then ${energyEv} eV)`,
        );
      }
      if (grid) {
        const expected = grid[block.points.length];
        if (expected === undefined) {
          fail(lineNumber, `irrep ${block.irrep} has more energies than the first irrep (${grid.length})`);
        } else if (Math.abs(expected - energyEv) > ENERGY_MATCH_TOLERANCE_EV) {
          fail(
            lineNumber,
            `energy ${energyEv} eV differs from ${expected} eV of the first irrep; every irrep must use the same energies`,
          );
        }
      }
      const kMatrix = new Float64Array(n * n);
      let largest = 0;
      for (let v = 0; v < n * n; v++) {
        const value = number(tokens[2 + v], lineNumber, `K(${Math.floor(v / n) + 1},${(v % n) + 1})`);
        if (Math.abs(value) > MAX_KMATRIX_ENTRY) {
          fail(
            lineNumber,
            `K(${Math.floor(v / n) + 1},${(v % n) + 1}) = ${value} exceeds ${MAX_KMATRIX_ENTRY} in magnitude`,
          );
        }
        kMatrix[v] = value;
        largest = Math.max(largest, Math.abs(value));
      }
      for (let r = 0; r < n; r++) {
        for (let c = r + 1; c < n; c++) {
          const a = kMatrix[r * n + c]!;
          const b = kMatrix[c * n + r]!;
          if (Math.abs(a - b) > KMATRIX_SYMMETRY_TOLERANCE * largest) {
            fail(
              lineNumber,
              `K is not symmetric: K(${r + 1},${c + 1}) = ${a} but K(${c + 1},${r + 1}) = ${b}`,
            );
          }
          kMatrix[r * n + c] = kMatrix[c * n + r] = (a + b) / 2;
        }
      }
      block.points.push({ energyEv, kMatrix });
      continue;
    }
    if (head === "end") {
      if (tokens.length !== 2 || tokens[1] !== "irrep") fail(lineNumber, 'expected "end irrep"');
      if (block.channels.length !== block.expectedChannels) {
        fail(
          lineNumber,
          `irrep ${block.irrep} declares ${block.expectedChannels} channels but lists ${block.channels.length}`,
        );
      }
      if (block.expectedChannels > 0) {
        if (block.points.length === 0)
          fail(lineNumber, `irrep ${block.irrep} has channels but no energy lines`);
        if (grid && block.points.length !== grid.length) {
          fail(
            lineNumber,
            `irrep ${block.irrep} has ${block.points.length} energies but the first irrep has ${grid.length}; every irrep must use the same energies`,
          );
        }
        grid ??= block.points.map((point) => point.energyEv);
      }
      const { expectedChannels: _, ...irrep } = block;
      irreps.push(irrep);
      current = null;
      continue;
    }
    fail(
      lineNumber,
      `unexpected "${clip(head)}" inside irrep ${block.irrep} (channel, energy or "end irrep" expected)`,
    );
  }

  if (!formatSeen)
    throw new ResultReadError(fileName, null, 'the file is empty (no "format sigmaflow-kmatrix 1" line)');
  if (model === null) throw new ResultReadError(fileName, null, "the model line is missing");
  if (targetSpinMultiplicity === null) {
    throw new ResultReadError(fileName, null, "the target_spin_multiplicity line is missing");
  }
  if (current !== null) fail(lastLine, `irrep ${current.irrep} (line ${current.line}) has no "end irrep"`);
  if (!grid) throw new ResultReadError(fileName, null, "no irrep has channels, so there are no K-matrices");
  return { model, targetSpinMultiplicity, irreps, energiesEv: grid };
}

/** A token quoted in a message, cut to a readable length (the file is not ours to trust). */
function clip(token: string): string {
  return token.length > 40 ? `${token.slice(0, 40)}…` : token;
}

/** The single target state the file's channels belong to. */
export const GROUND_STATE_ID = "ground";

/**
 * The table as the science core's K-matrix input document (shared/schemas/science-scattering.ts
 * `kMatrixInputSchema`): one target state (the ground state at 0 eV) and the irreps that have channels.
 *
 * @param table - a table from {@link readKMatrixTable}
 */
export function kMatrixTableToInputDocument(table: KMatrixTable): KMatrixInputDocument {
  return {
    targetStates: [{ id: GROUND_STATE_ID, spinMultiplicity: table.targetSpinMultiplicity, energyEv: 0 }],
    symmetries: table.irreps
      .filter((irrep) => irrep.channels.length > 0)
      .map((irrep) => {
        const n = irrep.channels.length;
        return {
          irrep: irrep.irrep,
          totalSpinMultiplicity: irrep.totalSpinMultiplicity,
          channels: irrep.channels.map((channel) => ({ targetState: GROUND_STATE_ID, ...channel })),
          points: irrep.points.map((point) => ({
            energyEv: point.energyEv,
            kMatrix: Array.from({ length: n }, (_, r) =>
              Array.from(point.kMatrix.subarray(r * n, r * n + n)),
            ),
          })),
        };
      }),
  };
}
