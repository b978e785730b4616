/**
 * `sigmaflow ionization beb`: electron-impact ionization cross sections of a molecule (or singly charged
 * molecular ion) from its orbital constants in the Binary-Encounter-Bethe model.
 */
import { type BebOrbital, bebOrbitalSchema } from "../../shared/schemas/science-ionization";
import { bebCrossSections } from "../../shared/science/ionization/beb";
import { CliError } from "../errors";
import { assertFiniteResult } from "../lib/finite-output";
import {
  formatNumber,
  formatTable,
  numericColumns,
  parseCsv,
  parseNumberList,
  parseOptions,
  readJsonFile,
  readTextFile,
  requireOption,
  withScienceErrors,
} from "../lib/input-files";

const USAGE = `Usage: sigmaflow ionization beb --orbitals FILE --energies-ev LIST [--ion] [--json]

Binary-Encounter-Bethe total ionization cross sections (Kim & Rudd 1994), per orbital and summed.

  --orbitals FILE     JSON array of {label?, bindingEv, kineticEv, occupation}, or CSV with the header
                      bindingEv,kineticEv,occupation (optional label column)
  --energies-ev LIST  incident energies in eV: 10,20,50 or ranges start:stop:count[:log], e.g. 10:1000:100:log
  --ion               singly charged molecular ion (modified BEB denominator)
  --json              print one JSON document {energiesEv, variant, crossSectionA2, orbitals}
`;

function readOrbitals(path: string): BebOrbital[] {
  const what = "orbital file";
  let rows: unknown[];
  if (path.toLowerCase().endsWith(".json")) {
    const document = readJsonFile(path, what);
    if (!Array.isArray(document)) throw new CliError(`${what} "${path}" must hold a JSON array of orbitals.`);
    rows = document;
  } else {
    const table = parseCsv(readTextFile(path, what), what);
    const columns = numericColumns(table, ["bindingEv", "kineticEv", "occupation"], what);
    const labelIndex = table.header.indexOf("label");
    rows = table.rows.map((row, i) => ({
      ...(labelIndex >= 0 ? { label: row.cells[labelIndex] } : {}),
      bindingEv: columns.bindingEv[i],
      kineticEv: columns.kineticEv[i],
      occupation: columns.occupation[i],
    }));
  }
  if (rows.length === 0) throw new CliError(`${what} "${path}" lists no orbitals.`);
  return rows.map((row, i) => {
    const parsed = bebOrbitalSchema.safeParse(row);
    if (!parsed.success) {
      const issue = parsed.error.issues[0]!;
      throw new CliError(`${what}, orbital ${i + 1}: ${issue.path.join(".") || "entry"}: ${issue.message}`);
    }
    return parsed.data;
  });
}

/**
 * Entry point of `sigmaflow ionization ...`.
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
  if (command !== "beb") throw new CliError(`unknown command "${command}".\n\n${USAGE}`);
  const options = parseOptions(rest, {
    orbitals: { type: "string" },
    "energies-ev": { type: "string" },
    ion: { type: "boolean", default: false },
    json: { type: "boolean", default: false },
    help: { type: "boolean", short: "h", default: false },
  });
  if (options.help) {
    process.stdout.write(USAGE);
    return 0;
  }
  const orbitals = readOrbitals(requireOption(options.orbitals, "--orbitals"));
  const energiesEv = parseNumberList(requireOption(options["energies-ev"], "--energies-ev"), "--energies-ev");
  const result = withScienceErrors(() =>
    bebCrossSections({ orbitals, energiesEv, variant: options.ion ? "singly-charged-ion" : "neutral" }),
  );
  const document = {
    energiesEv: Array.from(result.energiesEv),
    variant: result.variant,
    crossSectionA2: Array.from(result.totalA2),
    orbitals: result.orbitals.map((orbital, i) => ({
      ...orbital,
      crossSectionA2: Array.from(result.orbitalA2[i]!),
    })),
  };
  assertFiniteResult(document, "BEB ionization cross sections");
  if (options.json) {
    process.stdout.write(`${JSON.stringify(document)}\n`);
    return 0;
  }
  const names = result.orbitals.map((orbital, i) => orbital.label ?? `orbital ${i + 1}`);
  const header = ["E (eV)", "total (Å²)", ...names.map((name) => `${name} (Å²)`)];
  const rows = Array.from(result.energiesEv, (energy, e) => [
    formatNumber(energy),
    formatNumber(result.totalA2[e]!),
    ...result.orbitalA2.map((values) => formatNumber(values[e]!)),
  ]);
  process.stdout.write(
    `BEB ionization cross sections (${result.variant === "neutral" ? "neutral target" : "singly charged ion"})\n` +
      formatTable(header, rows),
  );
  return 0;
}
