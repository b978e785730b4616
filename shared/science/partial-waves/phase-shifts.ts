/**
 * Phase shifts of a short-range potential obtained by matching an interior radial solution to the free
 * solutions j_l(kr), y_l(kr) at a radius R, and the two textbook cases built on it (hard sphere, attractive
 * square well). Hartree atomic units with the electron mass: E = k²/2, lengths in bohr.
 *
 * Convention: outside R the radial function is R_l(r) ∝ j_l(kr) − tan δ_l · y_l(kr), which behaves as
 * sin(kr − lπ/2 + δ_l)/(kr) at large r; an attractive potential gives δ_0 > 0 at low energy.
 * Reference: J. J. Sakurai, Modern Quantum Mechanics, rev. ed. (1994), ch. 7 (partial waves, hard sphere,
 * square well); C. J. Joachain, Quantum Collision Theory (North-Holland, 1975).
 */
import { ScienceInputError } from "../errors";
import { sphericalBesselDerivative, sphericalBesselJ, sphericalBesselY } from "./spherical-bessel";

function checkPositive(name: string, value: number): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new ScienceInputError(`${name} must be a positive finite number; got ${value}.`);
  }
}

/**
 * Phase shift δ_l from the value and slope of the interior radial function at the matching radius.
 *
 * Method: continuity of R_l and R_l' at r = R gives
 *   tan δ_l = [k j_l'(kR) F − F' j_l(kR)] / [k y_l'(kR) F − F' y_l(kR)],
 * written without the ratio F'/F so that a node of the interior solution at R (F = 0) is harmless.
 *
 * @param params.l - orbital angular momentum (integer ≥ 0)
 * @param params.wavenumberPerBohr - k in bohr⁻¹ (> 0)
 * @param params.radiusBohr - matching radius R in bohr (> 0), outside the potential
 * @param params.interiorValue - F = R_l(R) of the interior solution (any normalisation)
 * @param params.interiorDerivativePerBohr - F' = dR_l/dr at R, same normalisation, bohr⁻¹
 * @returns δ_l in radians, in (−π/2, π/2] (defined modulo π)
 * @throws ScienceInputError for non-positive k or R, or F = F' = 0
 */
export function phaseShiftFromMatching(params: {
  l: number;
  wavenumberPerBohr: number;
  radiusBohr: number;
  interiorValue: number;
  interiorDerivativePerBohr: number;
}): number {
  const {
    l,
    wavenumberPerBohr: k,
    radiusBohr: radius,
    interiorValue: f,
    interiorDerivativePerBohr: df,
  } = params;
  checkPositive("wavenumberPerBohr", k);
  checkPositive("radiusBohr", radius);
  if (f === 0 && df === 0) throw new ScienceInputError("The interior solution vanishes with its slope.");
  const x = k * radius;
  const order = Math.max(l, 1);
  const j = sphericalBesselJ(order, x);
  const y = sphericalBesselY(order, x);
  const numerator = k * sphericalBesselDerivative(l, x, j) * f - df * j[l]!;
  const denominator = k * sphericalBesselDerivative(l, x, y) * f - df * y[l]!;
  if (!Number.isFinite(denominator)) return 0;
  return Math.atan(numerator / denominator);
}

/**
 * Hard-sphere phase shifts tan δ_l = j_l(ka)/y_l(ka) for l = 0..lMax (impenetrable sphere of radius a).
 *
 * @param lMax - highest l
 * @param wavenumberPerBohr - k in bohr⁻¹ (> 0)
 * @param radiusBohr - sphere radius a in bohr (> 0)
 * @returns δ_l in radians (δ_0 = −ka modulo π)
 * @throws ScienceInputError for invalid arguments
 */
export function hardSpherePhaseShifts(
  lMax: number,
  wavenumberPerBohr: number,
  radiusBohr: number,
): Float64Array {
  checkPositive("wavenumberPerBohr", wavenumberPerBohr);
  checkPositive("radiusBohr", radiusBohr);
  const x = wavenumberPerBohr * radiusBohr;
  const j = sphericalBesselJ(lMax, x);
  const y = sphericalBesselY(lMax, x);
  const delta = new Float64Array(lMax + 1);
  for (let l = 0; l <= lMax; l++) delta[l] = Number.isFinite(y[l]!) ? Math.atan(j[l]! / y[l]!) : 0;
  return delta;
}

/**
 * Phase shift of an attractive square well V(r) = −V₀ for r < R, 0 outside, for an electron.
 *
 * Method: the interior solution is j_l(κr) with κ = √(k² + 2V₀) (hartree units); match at R with
 * {@link phaseShiftFromMatching}.
 *
 * @param params.l - orbital angular momentum
 * @param params.wavenumberPerBohr - k in bohr⁻¹ (> 0)
 * @param params.radiusBohr - well radius R in bohr (> 0)
 * @param params.depthHartree - well depth V₀ in hartree (≥ 0; 0 gives δ = 0)
 * @returns δ_l in radians, modulo π
 */
export function squareWellPhaseShift(params: {
  l: number;
  wavenumberPerBohr: number;
  radiusBohr: number;
  depthHartree: number;
}): number {
  const { l, wavenumberPerBohr: k, radiusBohr: radius, depthHartree } = params;
  if (!Number.isFinite(depthHartree) || depthHartree < 0) {
    throw new ScienceInputError(`depthHartree must be ≥ 0; got ${depthHartree}.`);
  }
  checkPositive("wavenumberPerBohr", k);
  const kappa = Math.sqrt(k * k + 2 * depthHartree);
  const order = Math.max(l, 1);
  const inner = sphericalBesselJ(order, kappa * radius);
  return phaseShiftFromMatching({
    l,
    wavenumberPerBohr: k,
    radiusBohr: radius,
    interiorValue: inner[l]!,
    interiorDerivativePerBohr: kappa * sphericalBesselDerivative(l, kappa * radius, inner),
  });
}
