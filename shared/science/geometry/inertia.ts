/**
 * Mass distribution of a target: centre of mass, inertia tensor, principal moments, rotational constants
 * and rotor type. Masses are isotope masses in u, lengths in Å.
 */
import { ATOMIC_MASS_CONSTANT_KG, PLANCK_J_S, SPEED_OF_LIGHT_M_PER_S } from "../constants";
import { jacobiEigenSymmetric, type Mat3, sub, type Vec3 } from "./linear-algebra";
import type { TargetAtom } from "./target";

type MassPoint = Pick<TargetAtom, "massU" | "positionAngstrom">;

/**
 * Centre of mass R = Σ mᵢ rᵢ / Σ mᵢ.
 *
 * @param atoms - isotope masses (u) and positions (Å)
 * @returns centre of mass in Å
 */
export function centreOfMass(atoms: readonly MassPoint[]): Vec3 {
  let total = 0;
  const sum: Vec3 = [0, 0, 0];
  for (const atom of atoms) {
    total += atom.massU;
    for (let k = 0; k < 3; k++) sum[k]! += atom.massU * atom.positionAngstrom[k]!;
  }
  return [sum[0] / total, sum[1] / total, sum[2] / total];
}

/** Total mass Σ mᵢ in u. */
export function totalMassU(atoms: readonly MassPoint[]): number {
  return atoms.reduce((acc, atom) => acc + atom.massU, 0);
}

/**
 * The atoms translated so that their centre of mass is at the origin.
 *
 * @returns new atoms (input untouched), positions in Å
 */
export function recentre<T extends MassPoint>(atoms: readonly T[]): T[] {
  const com = centreOfMass(atoms);
  return atoms.map((atom) => ({ ...atom, positionAngstrom: sub(atom.positionAngstrom, com) }));
}

/**
 * Inertia tensor I_jk = Σ mᵢ (|rᵢ|² δ_jk − r_ij r_ik) about the centre of mass.
 *
 * @returns symmetric 3×3 tensor in u·Å²
 * Reference: Goldstein, Poole & Safko, "Classical Mechanics", 3rd ed., §5.3.
 */
export function inertiaTensor(atoms: readonly MassPoint[]): Mat3 {
  const com = centreOfMass(atoms);
  const t: Mat3 = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  for (const atom of atoms) {
    const r = sub(atom.positionAngstrom, com);
    const r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2];
    for (let j = 0; j < 3; j++) {
      for (let k = 0; k < 3; k++) {
        t[j]![k]! += atom.massU * ((j === k ? r2 : 0) - r[j]! * r[k]!);
      }
    }
  }
  return t;
}

export interface PrincipalAxes {
  /** Principal moments I_A ≤ I_B ≤ I_C in u·Å². */
  momentsUAngstrom2: [number, number, number];
  /** Unit principal axes a, b, c (rows), matching the moments. */
  axes: [Vec3, Vec3, Vec3];
}

/**
 * Principal moments and axes: eigen-decomposition of the inertia tensor (Jacobi method).
 *
 * @returns moments ascending in u·Å² (tiny negative round-off is clipped to 0) and their unit axes
 */
export function principalAxes(atoms: readonly MassPoint[]): PrincipalAxes {
  const { values, vectors } = jacobiEigenSymmetric(inertiaTensor(atoms));
  const clip = (x: number) => Math.max(x, 0);
  return {
    momentsUAngstrom2: [clip(values[0]!), clip(values[1]!), clip(values[2]!)],
    axes: vectors.map((v) => [v[0]!, v[1]!, v[2]!] as Vec3) as [Vec3, Vec3, Vec3],
  };
}

/** h / (8π²) / (1 u·Å²) in Hz: B[Hz] = ROTATIONAL_HZ_U_A2 / I[u·Å²] (≈ 505 379 MHz·u·Å²). */
const ROTATIONAL_HZ_U_A2 = PLANCK_J_S / (8 * Math.PI ** 2 * ATOMIC_MASS_CONSTANT_KG * 1e-20);

export interface RotationalConstants {
  /** A ≥ B ≥ C in cm⁻¹; null where the moment vanishes (A of a linear molecule, all three of an atom). */
  cm1: [number | null, number | null, number | null];
  /** The same in MHz. */
  mhz: [number | null, number | null, number | null];
}

/**
 * Rotational constants A = h/(8π² c I_A), B, C from principal moments.
 *
 * @param momentsUAngstrom2 - I_A ≤ I_B ≤ I_C in u·Å²
 * @param zeroMomentU_A2 - moments at or below this are treated as zero (default 1e-8 u·Å², far below any
 *   real moment: one hydrogen at 0.01 Å gives 1e-4)
 * @returns A ≥ B ≥ C in cm⁻¹ and MHz (null for zero moments)
 * Reference: Gordy & Cook, "Microwave Molecular Spectra", 3rd ed. (1984), ch. 2 — B = h/(8π²I).
 */
export function rotationalConstants(
  momentsUAngstrom2: readonly [number, number, number],
  zeroMomentU_A2 = 1e-8,
): RotationalConstants {
  const hz = momentsUAngstrom2.map((moment) =>
    moment > zeroMomentU_A2 ? ROTATIONAL_HZ_U_A2 / moment : null,
  );
  const mhz = hz.map((value) => (value === null ? null : value / 1e6));
  const cm1 = hz.map((value) => (value === null ? null : value / (SPEED_OF_LIGHT_M_PER_S * 100)));
  return {
    cm1: cm1 as RotationalConstants["cm1"],
    mhz: mhz as RotationalConstants["mhz"],
  };
}

export type RotorType = "atom" | "linear" | "spherical" | "prolate" | "oblate" | "asymmetric";

/**
 * Rotor type from the principal moments alone (accidental degeneracies included).
 *
 * @param momentsUAngstrom2 - I_A ≤ I_B ≤ I_C in u·Å²
 * @param relativeTolerance - two moments are equal when they differ by less than this fraction of I_C
 *   (default 1e-4)
 * @returns "atom" (all moments zero), "linear" (I_A = 0, I_B = I_C), "spherical" (all equal), "prolate"
 *   (I_A < I_B = I_C), "oblate" (I_A = I_B < I_C) or "asymmetric"
 */
export function classifyRotor(
  momentsUAngstrom2: readonly [number, number, number],
  relativeTolerance = 1e-4,
): RotorType {
  const [ia, ib, ic] = momentsUAngstrom2;
  if (ic <= 1e-8) return "atom";
  const tol = relativeTolerance * ic;
  if (ia <= tol) return "linear";
  const abEqual = ib - ia <= tol;
  const bcEqual = ic - ib <= tol;
  if (abEqual && bcEqual) return "spherical";
  if (bcEqual) return "prolate";
  if (abEqual) return "oblate";
  return "asymmetric";
}

/**
 * Ray's asymmetry parameter κ = (2B − A − C)/(A − C): −1 for a prolate and +1 for an oblate symmetric top.
 *
 * @returns κ, or null when A or C is undefined (linear molecule, atom) or A = C (spherical top)
 * Reference: Ray, Z. Phys. 78, 74 (1932); Gordy & Cook, ch. 7.
 */
export function rayAsymmetry(cm1: RotationalConstants["cm1"]): number | null {
  const [a, b, c] = cm1;
  if (a === null || b === null || c === null || a - c <= 1e-12 * a) return null;
  return (2 * b - a - c) / (a - c);
}
