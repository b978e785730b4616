import type { ResultKind, ResultProcess } from "@shared/schemas";

/**
 * Unit suffixes of result column names (`resultColumnNameSchema`: words joined by `_`, the unit last) and
 * how they are printed. Longer suffixes come first so `cm3_per_s` wins over `s`.
 */
const UNITS: readonly (readonly [suffix: string, printed: string])[] = [
  ["cm3_per_s", "cm³ s⁻¹"],
  ["per_cm", "cm⁻¹"],
  ["per_s", "s⁻¹"],
  ["A2", "Å²"],
  ["cm2", "cm²"],
  ["m2", "m²"],
  ["bohr2", "a₀²"],
  ["A", "Å"],
  ["bohr", "a₀"],
  ["eV", "eV"],
  ["meV", "meV"],
  ["hartree", "Eₕ"],
  ["Eh", "Eₕ"],
  ["K", "K"],
  ["rad", "rad"],
  ["deg", "°"],
  ["MHz", "MHz"],
  ["GHz", "GHz"],
  ["cm1", "cm⁻¹"],
  ["debye", "D"],
  ["D", "D"],
  ["s", "s"],
  ["electrons", "electrons"],
];

/** Quantities with a conventional symbol; other names are printed as words. */
const QUANTITIES: Record<string, string> = {
  cross_section: "σ",
  momentum_transfer_cross_section: "σ_MT",
  rate: "k",
  rate_coefficient: "k",
  energy: "Energy",
  temperature: "Temperature",
  eigenphase_sum: "Eigenphase sum",
};

export type ColumnLabel = {
  /** The quantity: a symbol such as σ or words ("Binding energy"). */
  quantity: string;
  /** The unit as printed (Å², cm³ s⁻¹), or "" for a dimensionless column. */
  unit: string;
  /** "σ (Å²)", or the quantity alone without a unit. */
  text: string;
};

const sentence = (words: string) => {
  const spaced = words.replaceAll("_", " ");
  return spaced.charAt(0).toUpperCase() + spaced.slice(1);
};

/**
 * Axis and table-header label of a result column from its name: `energy_eV` → "Energy (eV)",
 * `cross_section_A2` → "σ (Å²)", `rate_cm3_per_s` → "k (cm³ s⁻¹)". A last word that is no known unit is
 * printed as written (a column's name always ends in its unit).
 */
export function columnLabel(name: string): ColumnLabel {
  const known = UNITS.find(([suffix]) => name.endsWith(`_${suffix}`) && name.length > suffix.length + 1);
  let stem: string;
  let unit: string;
  if (known) {
    stem = name.slice(0, -(known[0].length + 1));
    unit = known[1];
  } else {
    const cut = name.lastIndexOf("_");
    stem = cut > 0 ? name.slice(0, cut) : name;
    unit = cut > 0 ? name.slice(cut + 1) : "";
  }
  if (unit === "1" || unit === "dimensionless") unit = "";
  const quantity = QUANTITIES[stem] ?? sentence(stem);
  return { quantity, unit, text: unit ? `${quantity} (${unit})` : quantity };
}

const PROCESS_WORDS: Record<ResultProcess, string> = {
  elastic: "Elastic",
  "momentum-transfer": "Momentum-transfer",
  ionization: "Ionization",
  orbitals: "Orbital",
};

/** Heading of the results of one kind for one process. */
export function resultTitle(kind: ResultKind, process: ResultProcess): string {
  const processWords = PROCESS_WORDS[process];
  switch (kind) {
    case "cross-section":
      return `${processWords} cross section`;
    case "eigenphase-sum":
      return process === "elastic" ? "Eigenphase sums" : `Eigenphase sums (${processWords.toLowerCase()})`;
    case "rate-coefficient":
      return `${processWords} rate coefficient`;
    case "orbital-table":
      return "Orbitals used by the ionization model";
    case "target-properties":
      return "Target properties from the orbitals' calculation";
  }
}
