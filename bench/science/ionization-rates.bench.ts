/**
 * BEB ionization and Maxwellian rate throughput over 10⁵ energies.
 *
 * Run: node --import tsx bench/science/ionization-rates.bench.ts
 * Prints wall-clock and CPU milliseconds for
 *   (a) H2O BEB cross sections (5 orbitals) at 10⁵ energies,
 *   (b) Maxwellian rates of that 10⁵-point table at 100 temperatures (10³–10⁶ K),
 *   (c) a modified-Arrhenius fit of those 100 rates with refinement.
 */
import { bebCrossSections } from "../../shared/science/ionization/beb";
import { fitModifiedArrhenius } from "../../shared/science/rates/arrhenius-fit";
import { maxwellianRateCoefficients } from "../../shared/science/rates/maxwellian-rate";

function timed<T>(label: string, task: () => T): T {
  const wallStart = performance.now();
  const cpuStart = process.cpuUsage();
  const value = task();
  const cpu = process.cpuUsage(cpuStart);
  console.log(
    `${label}: ${(performance.now() - wallStart).toFixed(1)} ms wall, ${((cpu.user + cpu.system) / 1000).toFixed(1)} ms CPU`,
  );
  return value;
}

const orbitals = [
  { label: "1a1", bindingEv: 539.7, kineticEv: 794.5, occupation: 2 },
  { label: "2a1", bindingEv: 36.88, kineticEv: 70.71, occupation: 2 },
  { label: "1b2", bindingEv: 19.83, kineticEv: 48.36, occupation: 2 },
  { label: "3a1", bindingEv: 15.57, kineticEv: 59.52, occupation: 2 },
  { label: "1b1", bindingEv: 12.61, kineticEv: 61.91, occupation: 2 },
];
const count = 100_000;
const energiesEv = Array.from({ length: count }, (_, i) => 12.61 * (1e4 / 12.61) ** (i / (count - 1)));
const temperaturesK = Array.from({ length: 100 }, (_, i) => 1e3 * 1e3 ** (i / 99));

const beb = timed(`BEB, ${orbitals.length} orbitals × ${count} energies`, () =>
  bebCrossSections({ orbitals, energiesEv }),
);
const rates = timed(`Maxwellian rates, ${count}-point table × ${temperaturesK.length} temperatures`, () =>
  maxwellianRateCoefficients({
    table: { energiesEv, crossSectionsA2: Array.from(beb.totalA2) },
    temperaturesK,
    tail: "inverse-energy",
  }),
);
const fit = timed("Arrhenius fit (log-linear + refinement), 100 points", () =>
  fitModifiedArrhenius(rates.temperaturesK, rates.rateCm3PerS, { refine: true }),
);
console.log(
  `k(10⁴ K) = ${rates.rateCm3PerS[33]!.toExponential(4)} cm³/s; Arrhenius alpha ${fit.alpha.toExponential(3)} cm³/s, ` +
    `beta ${fit.beta.toFixed(3)}, gamma ${fit.gamma.toFixed(0)} K, rms rel. ${fit.rmsRelativeResidual.toExponential(2)}`,
);
