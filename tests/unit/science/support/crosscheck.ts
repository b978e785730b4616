/**
 * Runs the Python cross-check helper (./crosscheck.py) in a child process with Debian's python3, where
 * python3-pymatgen and psi4 are installed (deploy/apt-packages.txt). psi4's Python module lives in the
 * multiarch library folder, added to PYTHONPATH. The helper runs in a fresh temporary working folder
 * (./python-json.ts), where psi4 leaves its timer.dat.
 */
import { existsSync, readdirSync } from "node:fs";
import { fileURLToPath } from "node:url";
import type { TargetAtom } from "@shared/science/geometry/target";
import { runPythonJson } from "./python-json";

const SCRIPT = fileURLToPath(new URL("./crosscheck.py", import.meta.url));
/** Multiarch folders holding Debian's psi4 package (/usr/lib/x86_64-linux-gnu/psi4 on amd64). */
const PSI4_PATHS = existsSync("/usr/lib")
  ? readdirSync("/usr/lib")
      .map((name) => `/usr/lib/${name}`)
      .filter((dir) => existsSync(`${dir}/psi4/__init__.py`))
  : [];

export interface CrosscheckMolecule {
  name: string;
  atoms: readonly TargetAtom[];
}

export interface PymatgenResult {
  name: string;
  pointGroup: string;
  operations: number | null;
  seconds: number;
}

export interface Psi4Result {
  name: string;
  abelianSubgroup: string;
  rotationalConstantsCm1: [number, number, number];
  nuclearRepulsionHartree: number;
}

function payload(molecules: readonly CrosscheckMolecule[]) {
  return molecules.map((m) => ({
    name: m.name,
    symbols: m.atoms.map((a) => a.symbol),
    massNumbers: m.atoms.map((a) => a.massNumber),
    massesU: m.atoms.map((a) => a.massU),
    positionsAngstrom: m.atoms.map((a) => a.positionAngstrom),
  }));
}

function run(request: unknown): unknown[] {
  const output = runPythonJson(SCRIPT, request, {
    pythonPath: PSI4_PATHS,
    installHint:
      "Install the reference tools with: apt-get install -y --no-install-recommends python3-pymatgen psi4",
  });
  return (output as { results: unknown[] }).results;
}

/**
 * Point groups from pymatgen's PointGroupAnalyzer.
 *
 * @param tolerance - distance tolerance in Å (pymatgen default 0.3)
 * @param eigenTolerance - tolerance on the normalised inertia eigenvalues (pymatgen default 0.01). With
 *   the default, molecules whose moments are equal to ~0.5 % are routed to pymatgen's spherical-top branch
 *   and misassigned (our synthetic orbit molecules are such near-spherical tops), so the cross-checks on
 *   exact geometries pass 1e-5.
 */
export function pymatgenPointGroups(
  molecules: readonly CrosscheckMolecule[],
  tolerance = 0.3,
  eigenTolerance = 0.01,
): PymatgenResult[] {
  return run({
    tool: "pymatgen",
    tolerance,
    eigenTolerance,
    molecules: payload(molecules),
  }) as PymatgenResult[];
}

/** Largest D2h subgroup, rotational constants and nuclear repulsion from psi4 (geometry only, no SCF). */
export function psi4Geometries(molecules: readonly CrosscheckMolecule[]): Psi4Result[] {
  return run({ tool: "psi4", molecules: payload(molecules) }) as Psi4Result[];
}
