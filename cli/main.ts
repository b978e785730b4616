/**
 * `sigmaflow` command line: `sigmaflow <group> <command> [options]`.
 * Each group lives in `cli/commands/<group>.ts` and exports `run(argv: string[]): Promise<number>`
 * returning the exit code. Errors meant for the user are thrown as `CliError`.
 */
import { CliError } from "./errors";

const GROUPS: Record<string, string> = {
  target: "Inspect a target geometry: isotopes, centre of mass, point group, rotational constants",
  ionization: "Electron-impact ionization cross sections (Binary-Encounter-Bethe model)",
  rotational: "Rotational excitation of polar targets (dipole Born approximation)",
  rates: "Maxwellian rate coefficients from tabulated cross sections; Arrhenius fits",
  kmatrix: "Cross sections and eigenphases from K-matrices per irreducible representation",
  runs: "A group's runs through the HTTP API: list, show, cancel, watch a run's log live",
};

function usage(): string {
  const lines = Object.entries(GROUPS).map(([name, text]) => `  ${name.padEnd(12)} ${text}`);
  return ["Usage: sigmaflow <group> <command> [options]", "", "Groups:", ...lines, ""].join("\n");
}

export async function main(argv: string[]): Promise<number> {
  const [group, ...rest] = argv;
  if (!group || group === "--help" || group === "-h" || group === "help") {
    process.stdout.write(usage());
    return group ? 0 : 2;
  }
  if (!(group in GROUPS)) {
    process.stderr.write(`sigmaflow: unknown command group "${group}".\n\n${usage()}`);
    return 2;
  }
  try {
    const module = (await import(`./commands/${group}.ts`)) as { run: (args: string[]) => Promise<number> };
    return await module.run(rest);
  } catch (error) {
    if (error instanceof CliError) {
      process.stderr.write(`sigmaflow ${group}: ${error.message}\n`);
      return error.exitCode;
    }
    throw error;
  }
}
