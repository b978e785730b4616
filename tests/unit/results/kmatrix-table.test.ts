/**
 * The K-matrix table reader (format `sigmaflow-kmatrix 1`, worker/results/readers/kmatrix-table.ts) on a
 * small valid file and on each kind of malformed file, with the line it must name. The valid file is
 * made up for the test; what it must give back is what it says (counts, channels, numbers).
 */
import { describe, expect, it } from "vitest";
import { kMatrixInputSchema } from "../../../shared/schemas/science-scattering";
import { ResultReadError } from "../../../worker/results/readers/errors";
import {
  KMATRIX_MAX_BYTES,
  kMatrixTableToInputDocument,
  readKMatrixTable,
} from "../../../worker/results/readers/kmatrix-table";

const GOOD = [
  "# written by a made-up solver for this test", // 1
  "format sigmaflow-kmatrix 1", // 2
  "model spherical square well, depth 0.5 hartree (teaching-grade model)", // 3
  "target_spin_multiplicity 1", // 4
  "", // 5
  "irrep A1 total_spin_multiplicity 2 channels 2", // 6
  "channel 1 0 0", // 7
  "channel 2 1 0", // 8
  "energy 0.5 0.5 0.01 0.01 -0.2", // 9
  "energy 1.5 4.0e-1 2e-2 0.02 -0.3", // 10
  "end irrep", // 11
  "irrep A2 total_spin_multiplicity 2 channels 0", // 12
  "end irrep", // 13
  "irrep B1 total_spin_multiplicity 2 channels 1", // 14
  "channel 1 1 1", // 15
  "energy 0.5 0.1", // 16
  "energy 1.5 0.2", // 17
  "end irrep", // 18
  "",
].join("\n");

/** The error a read throws, so its line and reason can be checked. */
function readError(text: string): ResultReadError {
  try {
    readKMatrixTable(text);
  } catch (error) {
    if (error instanceof ResultReadError) return error;
    throw error;
  }
  throw new Error("the reader accepted the file");
}

/** GOOD with line `n` (1-based) replaced; `null` removes it. */
function withLine(n: number, replacement: string | null): string {
  const lines = GOOD.split("\n");
  if (replacement === null) lines.splice(n - 1, 1);
  else lines[n - 1] = replacement;
  return lines.join("\n");
}

describe("K-matrix table: a valid file", () => {
  const table = readKMatrixTable(GOOD);

  it("reads the header, irreps in file order, channels and K-matrices", () => {
    expect(table.model).toBe("spherical square well, depth 0.5 hartree (teaching-grade model)");
    expect(table.targetSpinMultiplicity).toBe(1);
    expect(table.irreps.map((i) => [i.irrep, i.totalSpinMultiplicity, i.channels.length])).toEqual([
      ["A1", 2, 2],
      ["A2", 2, 0],
      ["B1", 2, 1],
    ]);
    expect(table.irreps[0]!.channels).toEqual([
      { l: 0, m: 0 },
      { l: 1, m: 0 },
    ]);
    expect(table.energiesEv).toEqual([0.5, 1.5]);
    expect(Array.from(table.irreps[0]!.points[1]!.kMatrix)).toEqual([0.4, 0.02, 0.02, -0.3]);
    expect(table.irreps[1]!.points).toEqual([]);
  });

  it("converts to the science core's K-matrix input document, leaving out irreps without channels", () => {
    const document = kMatrixInputSchema.parse(kMatrixTableToInputDocument(table));
    expect(document.targetStates).toEqual([
      { id: "ground", spinMultiplicity: 1, energyEv: 0, degeneracy: 1 },
    ]);
    expect(document.symmetries.map((s) => s.irrep)).toEqual(["A1", "B1"]);
    expect(document.symmetries[0]!.channels[1]).toEqual({ targetState: "ground", l: 1, m: 0 });
    expect(document.symmetries[0]!.points[0]).toEqual({
      energyEv: 0.5,
      kMatrix: [
        [0.5, 0.01],
        [0.01, -0.2],
      ],
    });
  });

  it("accepts CRLF line ends and K symmetric within the relative tolerance 1e-6", () => {
    const nearlySymmetric = withLine(9, "energy 0.5 0.5 0.0100000001 0.01 -0.2").replace(/\n/g, "\r\n");
    const k = readKMatrixTable(nearlySymmetric).irreps[0]!.points[0]!.kMatrix;
    expect(k[1]).toBe(k[2]);
  });
});

describe("K-matrix table: malformed files name the line at fault", () => {
  const cases: [string, string, number | null, RegExp][] = [
    ["no format line", withLine(2, null), 2, /first line must be "format sigmaflow-kmatrix 1"/],
    ["another format version", withLine(2, "format sigmaflow-kmatrix 2"), 2, /format sigmaflow-kmatrix 1/],
    ["no model line", withLine(3, null), 3, /expected "model/],
    ["an empty model", withLine(3, "model   "), 3, /describes no model/],
    ["a target multiplicity of 0", withLine(4, "target_spin_multiplicity 0"), 4, /not in 1\.\.99/],
    [
      "a total spin the target cannot give",
      withLine(6, "irrep A1 total_spin_multiplicity 4 channels 2"),
      6,
      /impossible for a target of multiplicity 1/,
    ],
    [
      "more channels than Sigmaflow reads",
      withLine(6, "irrep A1 total_spin_multiplicity 2 channels 2001"),
      6,
      /0 to 2000 channels/,
    ],
    ["a channel out of order", withLine(8, "channel 3 1 0"), 8, /channel index 3: expected 2/],
    ["m outside −l..l", withLine(8, "channel 2 1 2"), 8, /m = 2 is not in −l\.\.l for l = 1/],
    ["a negative l", withLine(8, "channel 2 -1 0"), 8, /l = -1 is not in 0\.\.500/],
    ["a repeated channel", withLine(8, "channel 2 0 0"), 8, /appears twice/],
    ["an energy line before all channels", withLine(8, null), 8, /declares 2 channels but lists 1/],
    ["too few K values", withLine(9, "energy 0.5 0.5 0.01 0.01"), 9, /found 4 values/],
    ["too many K values", withLine(9, "energy 0.5 0.5 0.01 0.01 -0.2 7"), 9, /found 6 values/],
    [
      "a value that is not a number",
      withLine(9, "energy 0.5 0.5 abc 0.01 -0.2"),
      9,
      /K\(1,2\) "abc" is not a number/,
    ],
    ["NaN", withLine(9, "energy 0.5 0.5 NaN 0.01 -0.2"), 9, /"NaN" is not a number/],
    ["Infinity", withLine(9, "energy 0.5 Infinity 0.01 0.01 -0.2"), 9, /"Infinity" is not a number/],
    ["a hexadecimal number", withLine(9, "energy 0.5 0x10 0.01 0.01 -0.2"), 9, /"0x10" is not a number/],
    ["a number beyond the double range", withLine(9, "energy 0.5 1e999 0.01 0.01 -0.2"), 9, /not finite/],
    ["an entry beyond 1e100", withLine(9, "energy 0.5 1e101 0.01 0.01 -0.2"), 9, /exceeds 1e\+100/],
    [
      "a K that is not symmetric",
      withLine(9, "energy 0.5 0.5 0.01 0.02 -0.2"),
      9,
      /K\(1,2\) = 0\.01 but K\(2,1\) = 0\.02/,
    ],
    ["a zero energy", withLine(9, "energy 0 0.5 0.01 0.01 -0.2"), 9, /not above 0 eV/],
    ["energies not increasing", withLine(10, "energy 0.5 0.4 0.02 0.02 -0.3"), 10, /must increase/],
    [
      "an irrep on other energies",
      withLine(17, "energy 1.6 0.2"),
      17,
      /differs from 1\.5 eV of the first irrep/,
    ],
    ["an irrep with fewer energies", withLine(17, null), 17, /1 energies but the first irrep has 2/],
    [
      "an unknown line inside an irrep",
      withLine(10, "phase 1.5 0.3"),
      10,
      /unexpected "phase" inside irrep A1/,
    ],
    ["energy lines for an irrep without channels", withLine(13, "energy 0.5"), 13, /has no channels/],
    [
      "an irrep given twice",
      withLine(14, "irrep A1 total_spin_multiplicity 2 channels 1"),
      14,
      /appears twice/,
    ],
    [
      "a bad irrep label",
      withLine(14, "irrep B1; total_spin_multiplicity 2 channels 1"),
      14,
      /not an irrep label/,
    ],
    ["a channel after the energies", withLine(10, "channel 3 2 0"), 10, /after the energy lines/],
    ["a missing end irrep", withLine(18, null), 17, /has no "end irrep"/],
  ];
  for (const [what, text, line, reason] of cases) {
    it(`refuses ${what} (line ${line})`, () => {
      const error = readError(text);
      expect(error.line).toBe(line);
      expect(error.reason).toMatch(reason);
      expect(error.message).toContain(`kmatrices.txt, line ${line}: `);
    });
  }

  it("refuses a file without any channels, naming no line", () => {
    const text = [
      "format sigmaflow-kmatrix 1",
      "model nothing",
      "target_spin_multiplicity 1",
      "irrep A total_spin_multiplicity 2 channels 0",
      "end irrep",
    ].join("\n");
    const error = readError(text);
    expect(error.line).toBeNull();
    expect(error.reason).toMatch(/no irrep has channels/);
  });

  it("refuses an empty file", () => {
    expect(readError("# only a comment\n").reason).toMatch(/empty/);
  });

  it("refuses a file over 50 MB before reading it", () => {
    const error = readError(`${GOOD}#${"x".repeat(KMATRIX_MAX_BYTES)}\n`);
    expect(error.line).toBeNull();
    expect(error.reason).toMatch(/at most 52428800 bytes/);
  });
});
