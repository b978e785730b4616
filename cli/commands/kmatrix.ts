/**
 * `sigmaflow kmatrix cross-sections`: state-to-state cross sections and eigenphase sums from K-matrices
 * given per irreducible representation, total spin and energy.
 */
import {
  computeKMatrixCrossSections,
  kMatrixCrossSectionResultToJson,
} from "../../shared/science/kmatrix/cross-sections-from-document";
import { CliError } from "../errors";
import { assertFiniteResult } from "../lib/finite-output";
import {
  formatNumber,
  formatTable,
  parseOptions,
  readJsonFile,
  requireOption,
  withScienceErrors,
} from "../lib/input-files";

const USAGE = `Usage: sigmaflow kmatrix cross-sections --input FILE.json [--continuous-eigenphase] [--json]

Integral cross sections σ(i → j) in Å² (summed over symmetries and total spins) and eigenphase sums per
symmetry, from K-matrices over the open channels (S = (1 + iK)(1 − iK)⁻¹, T = S − 1).

  --input FILE.json          {targetStates: [...], symmetries: [{irrep, totalSpinMultiplicity, channels, points}]}
                             (format in cli/docs/kmatrix.md)
  --continuous-eigenphase    remove π jumps from the eigenphase sums along the energy grid
  --json                     print one JSON document {energiesEv, symmetries, transitions}
`;

/**
 * Entry point of `sigmaflow kmatrix ...`.
 *
 * @param args - arguments after the group name (subcommand first)
 * @returns the exit code (0 success, 2 usage error); user errors are thrown as CliError
 */
export async function run(args: string[]): Promise<number> {
  const [command, ...rest] = args;
  if (command === undefined || command === "--help" || command === "-h" || command === "help") {
    process.stdout.write(USAGE);
    return command === undefined ? 2 : 0;
  }
  if (command !== "cross-sections") throw new CliError(`unknown command "${command}".\n\n${USAGE}`);
  const options = parseOptions(rest, {
    input: { type: "string" },
    "continuous-eigenphase": { type: "boolean", default: false },
    json: { type: "boolean", default: false },
    help: { type: "boolean", short: "h", default: false },
  });
  if (options.help) {
    process.stdout.write(USAGE);
    return 0;
  }
  const input = readJsonFile(requireOption(options.input, "--input"), "K-matrix input");
  const result = withScienceErrors(() =>
    computeKMatrixCrossSections(input, { continuousEigenphaseSum: options["continuous-eigenphase"] }),
  );
  const document = kMatrixCrossSectionResultToJson(result);
  assertFiniteResult(document, "K-matrix cross sections");
  if (options.json) {
    process.stdout.write(`${JSON.stringify(document)}\n`);
    return 0;
  }
  const energies = Array.from(result.energiesEv);
  const sigmaTable = formatTable(
    ["E (eV)", ...result.transitions.map((t) => `${t.fromState}→${t.toState} (Å²)`)],
    energies.map((energy, e) => [
      formatNumber(energy),
      ...result.transitions.map((t) => formatNumber(t.crossSectionA2[e]!)),
    ]),
  );
  const phaseTable = formatTable(
    ["E (eV)", ...result.symmetries.map((s) => `${s.irrep} 2S+1=${s.totalSpinMultiplicity} (rad)`)],
    energies.map((energy, e) => [
      formatNumber(energy),
      ...result.symmetries.map((s) => formatNumber(s.eigenphaseSumRad[e]!)),
    ]),
  );
  process.stdout.write(`Integral cross sections\n${sigmaTable}\nEigenphase sums\n${phaseTable}`);
  return 0;
}
