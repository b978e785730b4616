/**
 * Point-group detection: Sigmaflow's detector against pymatgen's PointGroupAnalyzer on the same molecules
 * (reference molecules and synthetic molecules of 44 point groups). pymatgen runs in one Python child
 * process and times itself per molecule (PointGroupAnalyzer construction, which performs the analysis);
 * ours is timed in-process: the first call (includes JIT compilation), then the median and minimum of
 * repeated calls after a warm-up. The machine's load shows in the median; the minimum is the undisturbed
 * cost.
 *
 * Run: node --import tsx bench/science/point-group.bench.ts [--repeat N]
 */
import { buildTarget } from "../../shared/science/geometry/target";
import { analyzeSymmetry } from "../../shared/science/symmetry/point-group";
import {
  REFERENCE_MOLECULES,
  type ReferenceAtom,
} from "../../tests/unit/science/fixtures/reference-molecules";
import { pymatgenPointGroups } from "../../tests/unit/science/support/crosscheck";
import { syntheticMolecule } from "../../tests/unit/science/support/point-group-builders";

const GROUPS = [
  ...["C1", "Cs", "Ci", "C2", "C3", "C4", "C5", "C6", "C2v", "C3v", "C4v", "C5v", "C6v"],
  ...["C2h", "C3h", "C4h", "C5h", "C6h", "D2", "D3", "D4", "D5", "D6", "D2h", "D3h", "D4h", "D5h", "D6h"],
  ...["D2d", "D3d", "D4d", "D5d", "D6d", "S4", "S6", "S8", "S10", "T", "Td", "Th", "O", "Oh", "I", "Ih"],
];

const repeatIndex = process.argv.indexOf("--repeat");
const repeat = repeatIndex > 0 ? Number(process.argv[repeatIndex + 1]) : 30;

const toAtoms = (atoms: readonly ReferenceAtom[]) =>
  buildTarget(
    atoms.map((a) => ({ symbol: a.symbol, massNumber: a.massNumber ?? null, positionAngstrom: a.position })),
  );

const molecules = [
  ...REFERENCE_MOLECULES.map((m) => ({ name: m.name, atoms: toAtoms(m.atoms) })),
  ...GROUPS.map((g) => ({ name: `synthetic ${g}`, atoms: toAtoms(syntheticMolecule(g)) })),
];

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)]!;
}

const ours = molecules.map((m) => {
  const start = performance.now();
  const first = analyzeSymmetry(m.atoms);
  const firstMs = performance.now() - start;
  for (let k = 0; k < 5; k++) analyzeSymmetry(m.atoms); // warm-up, not timed
  const times: number[] = [];
  for (let k = 0; k < repeat; k++) {
    const t0 = performance.now();
    analyzeSymmetry(m.atoms);
    times.push(performance.now() - t0);
  }
  return {
    group: first.pointGroup,
    order: first.order,
    firstMs,
    medianMs: median(times),
    minMs: Math.min(...times),
  };
});

const pymatgenStart = performance.now();
const theirs = pymatgenPointGroups(molecules, 0.01, 1e-5);
const pymatgenWallS = (performance.now() - pymatgenStart) / 1000;

const rows = molecules.map((m, i) => {
  const o = ours[i]!;
  const p = theirs[i]!;
  const pyMs = p.seconds * 1000;
  return [
    m.name,
    String(m.atoms.length),
    o.group,
    p.pointGroup,
    o.group === p.pointGroup ? "yes" : "NO",
    o.firstMs.toFixed(3),
    o.medianMs.toFixed(3),
    o.minMs.toFixed(3),
    pyMs.toFixed(2),
    (pyMs / o.medianMs).toFixed(0),
  ];
});
const header = [
  "molecule",
  "atoms",
  "Sigmaflow",
  "pymatgen",
  "agree",
  "first ms",
  "median ms",
  "pymatgen ms",
  "ratio",
];
const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c]!.length)));
const line = (cells: string[]) =>
  cells.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]!) : cell.padStart(widths[c]!))).join("  ");
console.log(
  `Point-group detection, ${molecules.length} molecules; Sigmaflow: first call, then median and minimum of ${repeat} runs after 5 warm-up runs.`,
);
console.log("pymatgen: PointGroupAnalyzer(tolerance=0.01 Å, eigen_tolerance=1e-5), timed inside Python.\n");
console.log(line(header));
console.log(widths.map((w) => "-".repeat(w)).join("  "));
for (const row of rows) console.log(line(row));

const sum = (values: number[]) => values.reduce((a, b) => a + b, 0);
const ourTotal = sum(ours.map((o) => o.medianMs));
const theirTotal = sum(theirs.map((p) => p.seconds * 1000));
const c60 = molecules.findIndex((m) => m.name === "C60");
console.log("");
console.log(`agreement: ${rows.filter((r) => r[4] === "yes").length}/${rows.length}`);
console.log(
  `total: Sigmaflow ${ourTotal.toFixed(1)} ms (median runs), pymatgen ${theirTotal.toFixed(0)} ms; ratio ${(theirTotal / ourTotal).toFixed(0)}×`,
);
console.log(
  `C60: Sigmaflow ${ours[c60]!.medianMs.toFixed(2)} ms median, ${ours[c60]!.minMs.toFixed(2)} ms min ` +
    `(${ours[c60]!.firstMs.toFixed(2)} ms first call), ` +
    `pymatgen ${(theirs[c60]!.seconds * 1000).toFixed(1)} ms`,
);
console.log(`pymatgen child process wall time including Python start-up: ${pymatgenWallS.toFixed(1)} s`);
