/**
 * Results from an orbital table that describe the target itself: the calculation's total energy, nuclear
 * repulsion, dipole moment and rotational constants (one row), and harmonic frequencies when the code
 * computed them (a second row). The dipole is the one the chemistry code printed about its origin; the
 * demo templates put the centre of mass there (templates receive the target in its standard orientation),
 * so it is the dipole about the centre of mass — for an ion the dipole depends on that choice.
 */
import { type Derivation, type DerivedResult, resultRow } from "./derive-common";
import type { OrbitalTable } from "./readers/orbital-table";

const ROTATIONAL_LABELS = ["a", "b", "c"] as const;

export function deriveTargetProperties(table: OrbitalTable, context: { source: string }): Derivation {
  const origin = `${table.program} ${table.method}/${table.basis} (${table.pointGroup}) from ${context.source}`;
  const columns: [string, number[]][] = [
    ["total_energy_hartree", [table.totalEnergyHartree]],
    ["nuclear_repulsion_hartree", [table.nuclearRepulsionHartree]],
  ];
  if (table.dipoleDebye) {
    const [x, y, z] = table.dipoleDebye;
    columns.push(
      ["dipole_x_D", [x]],
      ["dipole_y_D", [y]],
      ["dipole_z_D", [z]],
      ["dipole_magnitude_D", [Math.hypot(x, y, z)]],
    );
  }
  table.rotationalConstantsCm1.forEach((value, i) => {
    if (value !== null) columns.push([`rotational_constant_${ROTATIONAL_LABELS[i]}_cm1`, [value]]);
  });
  const results: DerivedResult[] = [
    resultRow(
      {
        kind: "target-properties",
        process: "orbitals",
        irrep: null,
        label: "",
        method:
          `${origin}: total energy, nuclear repulsion, dipole moment about the origin of the calculation ` +
          "(the centre of mass for Sigmaflow's demo templates; for an ion the dipole depends on that origin) " +
          "and rotational constants, as the code printed them.",
      },
      columns,
    ),
  ];
  if (table.harmonicFrequenciesCm1 && table.harmonicFrequenciesCm1.length > 0) {
    results.push(
      resultRow(
        {
          kind: "target-properties",
          process: "orbitals",
          irrep: null,
          label: "harmonic frequencies",
          method:
            `${origin}: harmonic vibrational frequencies at the target's geometry as given (not optimized ` +
            "first), unscaled; imaginary modes are printed by the code as negative numbers.",
        },
        [["harmonic_frequency_cm1", table.harmonicFrequenciesCm1]],
      ),
    );
  }
  return { results, notes: [] };
}
