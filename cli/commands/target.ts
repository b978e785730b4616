/**
 * `sigmaflow target inspect`: isotopes, centre of mass, rotational constants, point group, Abelian
 * subgroup with irreps, standard orientation; optional basis-set coverage and R-matrix sphere checks.
 */
import { basisCoverage } from "../../shared/science/basis-coverage/coverage";
import { inspectTarget, type TargetInspection } from "../../shared/science/geometry/inspect-target";
import { parseGeometry } from "../../shared/science/geometry/parse-geometry";
import { checkSphereRadius, requiredSphereRadius } from "../../shared/science/sphere/sphere-radius";
import { DEFAULT_SYMMETRY_TOLERANCE_ANGSTROM } from "../../shared/science/symmetry/point-group";
import { CliError } from "../errors";
import {
  parseCommandArgs,
  parseIndexAssignments,
  parseNumberArg,
  splitCommand,
  writeJson,
} from "../lib/args";
import { assertFiniteResult } from "../lib/finite-output";
import { formatTable, readTextFile, withScienceErrors } from "../lib/input-files";

const COMMANDS = {
  inspect: "Point group, rotational constants, isotopes and standard orientation of a geometry",
};

const USAGE = `Usage: sigmaflow target inspect FILE.xyz [--isotope INDEX=MASSNUMBER ...] [--charge Q]
                               [--multiplicity M] [--tolerance A] [--basis NAME]
                               [--diffuse-exponent ALPHA [--radius-bohr R]] [--json]

Reads an XYZ file (count line, comment line, "Symbol x y z" in Å) or a plain "Symbol x y z" list.
Isotopes: H@2 or D in the file, or --isotope 2=2 (atom 2 becomes deuterium); default: most abundant.

  --isotope INDEX=A        isotope of atom INDEX (1-based) by mass number A; repeat or comma-separate
  --charge Q               total charge in e (default 0)
  --multiplicity M         spin multiplicity 2S+1 (default: 1 for an even electron count, else 2)
  --tolerance A            symmetry distance tolerance in Å (default ${DEFAULT_SYMMETRY_TOLERANCE_ANGSTROM})
  --basis NAME             warn about atoms the basis set family does not cover (e.g. aug-cc-pVTZ)
  --diffuse-exponent ALPHA most diffuse Gaussian exponent in bohr⁻²: smallest R-matrix radius
  --radius-bohr R          check a chosen R-matrix radius (needs --diffuse-exponent)
  --json                   print one JSON document instead of the text summary
`;

const fmt = (value: number | null, digits = 6) =>
  value === null ? "—" : Number(value.toPrecision(digits)).toString();
const mhz = (value: number | null) => (value === null ? "—" : value.toFixed(3));
const fixed = (value: number) => (Math.abs(value) < 5e-11 ? 0 : value).toFixed(6).padStart(12);

function textSummary(report: TargetInspection, extras: string[]): string {
  const [a, b, c] = report.rotationalConstantsCm1;
  const [am, bm, cm] = report.rotationalConstantsMHz;
  const lines = [
    `Target            ${report.formula}  (${report.atomCount} atoms, ${report.totalMassU.toFixed(6)} u)`,
    `Charge            ${report.chargeE} e, ${report.electronCount} electrons, multiplicity ${report.multiplicity}`,
    `Point group       ${report.pointGroup}${report.groupOrder === null ? " (infinite order)" : ` (order ${report.groupOrder})`}`,
    `Abelian subgroup  ${report.abelianSubgroup}: ${report.abelianOperations.join(", ")}`,
    `Irreps            ${report.irreps.join(", ")}`,
    `Centre of mass    ${report.centreOfMassAngstrom.map((v) => v.toFixed(6)).join(", ")} Å (input frame)`,
    `Rotor type        ${report.rotorType}${report.rayAsymmetry === null ? "" : ` (Ray's κ = ${report.rayAsymmetry.toFixed(4)})`}`,
    `Rotational const. A = ${fmt(a, 8)}, B = ${fmt(b, 8)}, C = ${fmt(c, 8)} cm⁻¹`,
    `                  A = ${mhz(am)}, B = ${mhz(bm)}, C = ${mhz(cm)} MHz`,
    `Moments           ${report.principalMomentsUAngstrom2.map((m) => fmt(m)).join(", ")} u·Å²`,
    `Nuclear repulsion ${report.nuclearRepulsionHartree.toFixed(8)} hartree`,
    `Equivalent atoms  ${report.equivalentAtomSets.map((set) => `{${set.join(",")}}`).join(" ")}`,
    `Operations        ${report.operations.map((op) => op.label).join(" ")}`,
    `Tolerance         ${report.toleranceAngstrom} Å (symmetrization moved atoms by ≤ ${report.maxSymmetrizationShiftAngstrom.toExponential(1)} Å)`,
    ...extras,
    "",
    "Atoms in the standard orientation (Å):",
    formatTable(
      ["#", "atom", "A", "mass/u", "x", "y", "z"],
      report.atoms.map((atom) => [
        String(atom.index),
        atom.symbol,
        String(atom.massNumber),
        atom.massU.toFixed(8),
        ...atom.positionAngstrom.map(fixed),
      ]),
    ),
  ];
  return `${lines.join("\n")}`;
}

async function inspect(args: string[]): Promise<number> {
  const { values, positionals } = parseCommandArgs(
    args,
    {
      isotope: { type: "string", multiple: true },
      charge: { type: "string" },
      multiplicity: { type: "string" },
      tolerance: { type: "string" },
      basis: { type: "string" },
      "diffuse-exponent": { type: "string" },
      "radius-bohr": { type: "string" },
      json: { type: "boolean", default: false },
      help: { type: "boolean", short: "h", default: false },
    },
    { names: ["FILE"], min: 0 },
  );
  if (values.help) {
    process.stdout.write(USAGE);
    return 0;
  }
  const file = positionals[0];
  if (!file) throw new CliError(`missing FILE.\n\n${USAGE}`);
  const text = readTextFile(file, "geometry file");
  const isotopeOverrides = parseIndexAssignments(values.isotope ?? [], "--isotope");
  const chargeE =
    values.charge === undefined ? 0 : parseNumberArg(values.charge, "--charge", { integer: true });
  const multiplicity =
    values.multiplicity === undefined
      ? undefined
      : parseNumberArg(values.multiplicity, "--multiplicity", { integer: true, min: 1 });
  const toleranceAngstrom =
    values.tolerance === undefined
      ? undefined
      : parseNumberArg(values.tolerance, "--tolerance", { min: 1e-6, max: 0.3 });
  const exponent =
    values["diffuse-exponent"] === undefined
      ? undefined
      : parseNumberArg(values["diffuse-exponent"], "--diffuse-exponent", { positive: true });
  const radius =
    values["radius-bohr"] === undefined
      ? undefined
      : parseNumberArg(values["radius-bohr"], "--radius-bohr", { positive: true });
  if (radius !== undefined && exponent === undefined) {
    throw new CliError("--radius-bohr needs --diffuse-exponent (the most diffuse Gaussian exponent).");
  }

  const { report, basis, sphere } = withScienceErrors(() => {
    const geometry = parseGeometry(text);
    const report = inspectTarget({
      atoms: geometry.atoms,
      isotopeOverrides,
      chargeE,
      multiplicity,
      toleranceAngstrom,
    });
    const basis =
      values.basis === undefined
        ? null
        : basisCoverage(
            values.basis,
            report.atoms.map((a) => a.symbol),
          );
    let sphere = null;
    if (exponent !== undefined) {
      const request = {
        positionsAngstrom: report.atoms.map((atom) => atom.positionAngstrom),
        mostDiffuseExponentBohr2: exponent,
      };
      sphere = radius === undefined ? requiredSphereRadius(request) : checkSphereRadius(radius, request);
    }
    return { report, basis, sphere };
  });

  const document = { ...report, basisCoverage: basis, sphere };
  assertFiniteResult(document, "Target inspection");
  if (values.json) {
    writeJson(document);
    return 0;
  }
  const extras: string[] = [];
  if (basis) {
    const list = (atoms: { index: number; symbol: string }[]) =>
      atoms.map((a) => `${a.symbol}${a.index}`).join(", ");
    extras.push(
      `Basis ${basis.basis.padEnd(11)} ${basis.covered ? "covers every atom" : `does NOT cover: ${list(basis.uncovered)}`}` +
        (basis.uncertain.length ? `; coverage uncertain for ${list(basis.uncertain)}` : "") +
        (basis.withEcp.length ? `; ECP on ${list(basis.withEcp)}` : ""),
    );
  }
  if (sphere) {
    extras.push(
      `R-matrix sphere   needs ≥ ${sphere.requiredRadiusBohr.toFixed(3)} bohr (atoms reach ${sphere.atomicExtentBohr.toFixed(3)}, ` +
        `Gaussian tail ${sphere.tailRadiusBohr.toFixed(3)}, charge tolerance ${sphere.chargeTolerance})`,
    );
    for (const warning of sphere.warnings) extras.push(`Warning           ${warning}`);
  }
  process.stdout.write(textSummary(report, extras));
  return 0;
}

export async function run(args: string[]): Promise<number> {
  if (args.length === 0) {
    process.stdout.write(USAGE);
    return 2;
  }
  const split = splitCommand(args, COMMANDS, "target");
  if (!split) return 0;
  return inspect(split.rest);
}
