/**
 * From a run's collected result files to its results: each file read with its declared reader, the
 * derivations of each, the rows in display order (cross sections, eigenphase sums, rate coefficients,
 * orbital tables; within a kind elastic, momentum transfer, ionization) and the sentence for the run's
 * results message. Pure: the postprocess step does the reading and the storing.
 */
import type { ResultReader } from "../../shared/schemas/codes";
import type { ResultKind, ResultProcess, RunAnalysis } from "../../shared/schemas/results";
import type { Derivation, DerivedResult } from "./derive-common";
import { deriveIonizationResults } from "./derive-ionization";
import { deriveTargetProperties } from "./derive-properties";
import { deriveScatteringResults } from "./derive-scattering";
import { ResultReadError } from "./readers/errors";
import { readKMatrixTable } from "./readers/kmatrix-table";
import { readOrbitalTable } from "./readers/orbital-table";

/** A collected file a code of the recipe declared as a result file. */
export interface ResultFile {
  stage: string;
  fileName: string;
  reader: ResultReader;
  content: Buffer;
}

const KIND_ORDER: readonly ResultKind[] = [
  "cross-section",
  "eigenphase-sum",
  "rate-coefficient",
  "orbital-table",
  "target-properties",
];
const PROCESS_ORDER: readonly ResultProcess[] = ["elastic", "momentum-transfer", "ionization", "orbitals"];

const utf8 = new TextDecoder("utf-8", { fatal: true });

/**
 * Reads and derives every result file.
 *
 * @param files - the declared result files that were collected, in recipe order
 * @param analysis - the run's postprocess options
 * @param context.charge - the charge of the run's target (null without a target)
 * @returns rows in display order and the notes on what was not derived
 * @throws ResultReadError for a file its reader refuses, ScienceInputError for data the science core
 *   cannot use
 */
export function deriveRunResults(
  files: readonly ResultFile[],
  analysis: RunAnalysis,
  context: { charge: number | null },
): Derivation {
  const derivations = files.map((file): Derivation => {
    const source = `${file.fileName} of stage ${file.stage}`;
    const text = decode(file);
    if (file.reader === "orbital-table") {
      const table = readOrbitalTable(text, file.fileName);
      const ionization = deriveIonizationResults(table, analysis, { charge: context.charge, source });
      const properties = deriveTargetProperties(table, { source });
      return {
        results: [...ionization.results, ...properties.results],
        notes: [...ionization.notes, ...properties.notes],
      };
    }
    return deriveScatteringResults(readKMatrixTable(text, file.fileName), analysis, { source });
  });
  const results = derivations.flatMap((d) => d.results);
  const rank = (row: DerivedResult) =>
    KIND_ORDER.indexOf(row.kind) * PROCESS_ORDER.length + PROCESS_ORDER.indexOf(row.process);
  // Array.prototype.sort is stable: within a kind and process the derivation's order (sums first) stays.
  results.sort((a, b) => rank(a) - rank(b));
  const keys = new Set<string>();
  for (const row of results) {
    const key = [row.kind, row.process, row.irrep ?? "", row.label].join("\u0000");
    if (keys.has(key)) {
      throw new Error(
        `two result files give a ${row.kind} (${row.process}${row.irrep ? `, ${row.irrep}` : ""}); a recipe ` +
          "may declare each kind of result file once",
      );
    }
    keys.add(key);
  }
  return { results, notes: derivations.flatMap((d) => d.notes) };
}

function decode(file: ResultFile): string {
  try {
    return utf8.decode(file.content);
  } catch {
    throw new ResultReadError(file.fileName, null, `the file (stage ${file.stage}) is not UTF-8 text`);
  }
}
