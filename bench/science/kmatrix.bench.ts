/**
 * K-matrix cross-section throughput: 100 open channels at 10 000 energies.
 *
 * Run: node --import tsx bench/science/kmatrix.bench.ts [energies]
 * Prints wall-clock and CPU milliseconds for
 *   (a) one symmetry with 100 channels (a dense 100×100 K per energy: O(n³) per point), and
 *   (b) the same 100 channels spread over 8 irreducible representations (12–13 channels each), the usual
 *       shape for a target in D2h.
 * K(E) = K₀ + (E − E₀)·K₁ is regenerated into one reused buffer per point; its O(n²) cost is included.
 */
import type { TargetState } from "../../shared/schemas/science-scattering";
import {
  KMatrixCrossSectionAccumulator,
  type KMatrixSymmetrySetup,
} from "../../shared/science/kmatrix/cross-sections";
import { fillRandomSymmetric, seededUniform } from "../../tests/unit/science/support/random-matrices";

const energyCount = Number(process.argv[2] ?? 10_000);
const channelCount = 100;
const targetStates: TargetState[] = [0, 1, 2, 3, 4].map((i) => ({
  id: `S${i}`,
  spinMultiplicity: 1,
  energyEv: i,
  degeneracy: 1,
}));
// All channels open on 5–15 eV, so every K-matrix has the full size.
const energiesEv = Float64Array.from(
  { length: energyCount },
  (_, e) => 5 + (10 * e) / Math.max(1, energyCount - 1),
);

function channels(count: number, offset: number) {
  return Array.from({ length: count }, (_, c) => ({ targetState: `S${(offset + c) % 5}`, l: c % 7 }));
}

function run(label: string, sizes: number[]): void {
  const symmetries: KMatrixSymmetrySetup[] = sizes.map((size, s) => ({
    irrep: `G${s}`,
    totalSpinMultiplicity: 2,
    channels: channels(size, s),
  }));
  const random = seededUniform(2024);
  const base = sizes.map((n) => fillRandomSymmetric(new Float64Array(n * n), n, random, 0.5));
  const slope = sizes.map((n) => fillRandomSymmetric(new Float64Array(n * n), n, random, 0.05));
  const buffer = new Float64Array(channelCount * channelCount);
  const wallStart = performance.now();
  const cpuStart = process.cpuUsage();
  const accumulator = new KMatrixCrossSectionAccumulator({ targetStates, symmetries, energiesEv });
  for (let e = 0; e < energyCount; e++) {
    const shift = energiesEv[e]! - 5;
    sizes.forEach((n, s) => {
      const k0 = base[s]!;
      const k1 = slope[s]!;
      const view = buffer.subarray(0, n * n);
      for (let i = 0; i < n * n; i++) view[i] = k0[i]! + shift * k1[i]!;
      accumulator.addPoint(s, e, view);
    });
  }
  const result = accumulator.result({ continuousEigenphaseSum: true });
  const cpu = process.cpuUsage(cpuStart);
  const wallMs = performance.now() - wallStart;
  const cpuMs = (cpu.user + cpu.system) / 1000;
  const checksum = result.transitions.reduce((sum, t) => sum + t.crossSectionA2[energyCount - 1]!, 0);
  console.log(
    `${label}: ${energyCount} energies, ${wallMs.toFixed(0)} ms wall, ${cpuMs.toFixed(0)} ms CPU ` +
      `(${((cpuMs / energyCount) * 1000).toFixed(1)} µs CPU per energy; Σσ at last energy ${checksum.toFixed(3)} Å²)`,
  );
}

run("8 irreps × 12–13 channels (100 total)", [13, 13, 13, 13, 12, 12, 12, 12]);
run("1 irrep × 100 channels", [channelCount]);
