/**
 * Demo targets as data: what the demo seed enters for a group (requests in the shape of
 * `createTargetRequestSchema`, atoms as JSON, Å) and the isotopologues it enters under them
 * (`createIsotopologueRequestSchema` plus the parent's name).
 *
 * Geometries are experimental equilibrium (or near-equilibrium) structures written out from bond lengths
 * and angles; each target's notes name the source. Values marked "from memory" were written down from
 * the cited tables without looking them up again and are good to about 0.001 Å and 0.05°, enough for a
 * demo (the cross-checks against psi4 compare Sigmaflow with psi4 on these very coordinates, not with
 * the literature).
 */
import type { CreateIsotopologueRequest, CreateTargetRequest } from "../../shared/schemas/targets";

type DemoAtom = { symbol: string; massNumber?: number | null; x: number; y: number; z: number };

const atoms = (list: readonly DemoAtom[]) =>
  list.map((a) => ({
    symbol: a.symbol,
    massNumber: a.massNumber ?? null,
    xAngstrom: a.x,
    yAngstrom: a.y,
    zAngstrom: a.z,
    partialChargeE: null,
  }));

/** A demo target: the create request, in the JSON-atoms variant. */
export type DemoTarget = CreateTargetRequest & { name: string; atoms: ReturnType<typeof atoms> };

/** An isotopologue of a demo target, by the parent's name. */
export type DemoIsotopologue = CreateIsotopologueRequest & { parent: string };

/*
 * Water: r_e(OH) = 0.9578 Å, θ_e(HOH) = 104.48° (A. R. Hoy and P. R. Bunker, J. Mol. Spectrosc. 74, 1
 * (1979), as listed in the NIST CCCBDB, https://cccbdb.nist.gov, experimental geometries; from memory).
 * O at the origin, the molecule in the xz plane: H at (±r sin(θ/2), 0, r cos(θ/2)).
 */
const WATER_H_X = 0.7572201193;
const WATER_H_Z = 0.5865138796;

/*
 * Nitrogen trifluoride: r(NF) = 1.365 Å, ∠FNF = 102.37° (NIST CCCBDB experimental geometry; from memory).
 * N on the z axis above the plane of the three F atoms, which lie on a circle of radius ρ = 2 r sin(α/2)/√3
 * a height h = √(r² − ρ²) below N.
 */
const NF3_RHO = 1.2281075824;
const NF3_H = 0.5957992666;
const NF3_RHO_COS120 = -0.6140537912;
const NF3_RHO_SIN120 = 1.063572365;

/*
 * Methane: r_e(CH) = 1.087 Å, tetrahedral (NIST CCCBDB experimental geometry; from memory). H at
 * (r/√3)(±1, ±1, ±1) with an even number of minus signs.
 */
const CH4_COORD = 0.6275797426;

export const DEMO_TARGETS: readonly DemoTarget[] = [
  {
    name: "Water",
    charge: 0,
    multiplicity: 1,
    notes:
      "Experimental equilibrium geometry r(OH) = 0.9578 Å, θ(HOH) = 104.48° (Hoy & Bunker 1979, as listed in NIST CCCBDB).",
    atoms: atoms([
      { symbol: "O", x: 0, y: 0, z: 0 },
      { symbol: "H", x: WATER_H_X, y: 0, z: WATER_H_Z },
      { symbol: "H", x: -WATER_H_X, y: 0, z: WATER_H_Z },
    ]),
  },
  {
    name: "Nitrogen trifluoride",
    charge: 0,
    multiplicity: 1,
    notes: "Experimental geometry r(NF) = 1.365 Å, ∠FNF = 102.37° (NIST CCCBDB), C3v.",
    atoms: atoms([
      { symbol: "N", x: 0, y: 0, z: NF3_H },
      { symbol: "F", x: NF3_RHO, y: 0, z: 0 },
      { symbol: "F", x: NF3_RHO_COS120, y: NF3_RHO_SIN120, z: 0 },
      { symbol: "F", x: NF3_RHO_COS120, y: -NF3_RHO_SIN120, z: 0 },
    ]),
  },
  {
    /*
     * Formyl cation HCO⁺, linear: r(CH) = 1.092 Å, r(CO) = 1.105 Å, equilibrium values from the
     * rotational spectroscopy of HCO⁺ and its isotopologues (R. C. Woods et al., Phys. Rev. Lett. 35, 1269
     * (1975) and later millimetre-wave work); from memory, to about 0.002 Å.
     */
    name: "Formyl cation",
    charge: 1,
    multiplicity: 1,
    notes:
      "Linear HCO⁺, r(CH) = 1.092 Å, r(CO) = 1.105 Å (rotational spectroscopy, Woods et al. 1975 and later).",
    atoms: atoms([
      { symbol: "H", x: 0, y: 0, z: -1.092 },
      { symbol: "C", x: 0, y: 0, z: 0 },
      { symbol: "O", x: 0, y: 0, z: 1.105 },
    ]),
  },
  {
    name: "Methane",
    charge: 0,
    multiplicity: 1,
    notes: "Experimental equilibrium geometry r(CH) = 1.087 Å, tetrahedral (NIST CCCBDB), Td.",
    atoms: atoms([
      { symbol: "C", x: 0, y: 0, z: 0 },
      { symbol: "H", x: CH4_COORD, y: CH4_COORD, z: CH4_COORD },
      { symbol: "H", x: -CH4_COORD, y: -CH4_COORD, z: CH4_COORD },
      { symbol: "H", x: -CH4_COORD, y: CH4_COORD, z: -CH4_COORD },
      { symbol: "H", x: CH4_COORD, y: -CH4_COORD, z: -CH4_COORD },
    ]),
  },
];

export const DEMO_ISOTOPOLOGUES: readonly DemoIsotopologue[] = [
  {
    parent: "Water",
    name: "Heavy water",
    isotopes: [
      { atom: 2, massNumber: 2 },
      { atom: 3, massNumber: 2 },
    ],
    notes: "D2O: both hydrogen atoms deuterium, on the water geometry (Born–Oppenheimer).",
  },
  {
    parent: "Methane",
    name: "Monodeuteromethane",
    isotopes: [{ atom: 2, massNumber: 2 }],
    notes: "CH3D: one hydrogen atom deuterium; the symmetry drops from Td to C3v.",
  },
];
