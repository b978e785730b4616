/**
 * `sigmaflow rotational born`: rotational excitation (J → J ± 1) of a polar linear or symmetric-top
 * molecule by electron impact in the dipole Born approximation.
 */
import { dipoleBornCrossSections } from "../../shared/science/rotational/dipole-born";
import { CliError } from "../errors";
import { assertFiniteResult } from "../lib/finite-output";
import {
  formatNumber,
  formatTable,
  parseNumberList,
  parseNumberOption,
  parseOptions,
  requireOption,
  withScienceErrors,
} from "../lib/input-files";

const USAGE = `Usage: sigmaflow rotational born --dipole-debye D --rotational-constant-cm1 B --j J
                               [--j-final J'] [--k K] --energies-ev LIST [--json]

Dipole Born cross section σ(J → J') of a rigid polar rotor (levels B·J(J+1)), J' = J ± 1.

  --dipole-debye D             permanent dipole moment in debye
  --rotational-constant-cm1 B  rotational constant in cm⁻¹
  --j J                        initial rotational level
  --j-final J'                 final level, J + 1 (default) or J − 1
  --k K                        projection K of a symmetric top (default 0, linear molecule)
  --energies-ev LIST           incident energies in eV: 0.01,0.1 or ranges start:stop:count[:log]
  --json                       print one JSON document {j, jFinal, kProjection, thresholdEv, energiesEv, crossSectionA2}
`;

function parseInteger(value: string, name: string): number {
  const number = parseNumberOption(value, name);
  if (!Number.isInteger(number)) throw new CliError(`${name} must be a whole number; got ${value}.`);
  return number;
}

/**
 * Entry point of `sigmaflow rotational ...`.
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
  if (command !== "born") throw new CliError(`unknown command "${command}".\n\n${USAGE}`);
  const options = parseOptions(rest, {
    "dipole-debye": { type: "string" },
    "rotational-constant-cm1": { type: "string" },
    j: { type: "string" },
    "j-final": { type: "string" },
    k: { type: "string" },
    "energies-ev": { type: "string" },
    json: { type: "boolean", default: false },
    help: { type: "boolean", short: "h", default: false },
  });
  if (options.help) {
    process.stdout.write(USAGE);
    return 0;
  }
  const request = {
    dipoleDebye: parseNumberOption(
      requireOption(options["dipole-debye"], "--dipole-debye"),
      "--dipole-debye",
    ),
    rotationalConstantCm1: parseNumberOption(
      requireOption(options["rotational-constant-cm1"], "--rotational-constant-cm1"),
      "--rotational-constant-cm1",
    ),
    j: parseInteger(requireOption(options.j, "--j"), "--j"),
    jFinal: options["j-final"] === undefined ? undefined : parseInteger(options["j-final"], "--j-final"),
    kProjection: options.k === undefined ? 0 : parseInteger(options.k, "--k"),
    energiesEv: parseNumberList(requireOption(options["energies-ev"], "--energies-ev"), "--energies-ev"),
  };
  const result = withScienceErrors(() => dipoleBornCrossSections(request));
  const document = {
    j: result.j,
    jFinal: result.jFinal,
    kProjection: result.kProjection,
    thresholdEv: result.thresholdEv,
    energiesEv: Array.from(result.energiesEv),
    crossSectionA2: Array.from(result.crossSectionA2),
  };
  assertFiniteResult(document, "Dipole Born cross sections");
  if (options.json) {
    process.stdout.write(`${JSON.stringify(document)}\n`);
    return 0;
  }
  const rows = Array.from(result.energiesEv, (energy, e) => [
    formatNumber(energy),
    formatNumber(result.crossSectionA2[e]!),
  ]);
  process.stdout.write(
    `Dipole Born σ(J=${result.j} → J'=${result.jFinal}, K=${result.kProjection}); ` +
      `ΔE = ${formatNumber(result.thresholdEv)} eV\n${formatTable(["E (eV)", "σ (Å²)"], rows)}`,
  );
  return 0;
}
