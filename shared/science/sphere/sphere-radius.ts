/**
 * R-matrix sphere check: the smallest sphere radius that encloses the target's charge to a stated
 * tolerance, and a check of a chosen radius.
 *
 * Derivation. A Gaussian basis function χ ∝ r^l e^{−α r²} Y_lm centred on an atom carries the charge
 * density |χ|² ∝ r^{2l} e^{−2α r²}, so its radial probability is ∝ r^{2l+2} e^{−2α r²} dr. Substituting
 * u = 2α r² turns it into a Gamma(l + 3/2) distribution in u, and the fraction of the charge beyond a
 * distance ρ from the atom is
 *     F(ρ) = Q(l + 3/2, 2α ρ²)          (Q: regularized upper incomplete gamma function),
 * for l = 0: F = erfc(x) + (2/√π) x e^{−x²}, x = √(2α) ρ. The tail radius ρ_ε solves F(ρ_ε) = ε. A sphere of
 * radius R about the centre c contains the ball of radius R − |r_i − c| about atom i, so every function on
 * every atom leaks at most ε when
 *     R ≥ max_i |r_i − c| + ρ_ε.
 * The most diffuse exponent α gives the largest ρ_ε; that is the function to pass.
 * Reference: Abramowitz & Stegun 6.5 (incomplete gamma); the bound is elementary geometry.
 */

import {
  parseTargetInput,
  type SphereRadiusRequest,
  sphereRadiusRequestSchema,
} from "../../schemas/science-target";
import { BOHR_RADIUS_ANGSTROM } from "../constants";
import { ScienceInputError } from "../errors";
import { regularizedUpperGamma } from "../quadrature/incomplete-gamma";

/**
 * Fraction of the charge of a normalized Gaussian function r^l e^{−α r²} lying beyond a distance ρ.
 *
 * @param exponentBohr2 - α in bohr⁻²
 * @param distanceBohr - ρ in bohr (≥ 0)
 * @param angularMomentum - l (default 0)
 * @returns F(ρ) = Q(l + 3/2, 2αρ²) in [0, 1]
 */
export function gaussianChargeBeyond(
  exponentBohr2: number,
  distanceBohr: number,
  angularMomentum = 0,
): number {
  if (!(exponentBohr2 > 0) || !(distanceBohr >= 0)) {
    throw new ScienceInputError("The Gaussian exponent must be > 0 and the distance ≥ 0.");
  }
  // (√(2α)·ρ)² rather than 2αρ²: ρ² alone overflows for the radii of very diffuse functions.
  const scaledDistance = Math.sqrt(2 * exponentBohr2) * distanceBohr;
  return regularizedUpperGamma(angularMomentum + 1.5, scaledDistance * scaledDistance);
}

/**
 * Tail radius ρ_ε of a Gaussian: the distance beyond which it holds the fraction ε of its charge.
 *
 * @param exponentBohr2 - α in bohr⁻²
 * @param chargeTolerance - ε in (0, 1)
 * @param angularMomentum - l (default 0)
 * @returns ρ_ε in bohr, from bisection on F(ρ) (monotone), relative accuracy 1e-12; finite for every
 *   positive α (ρ_ε ≈ 1e162 bohr at the smallest double)
 */
export function gaussianTailRadiusBohr(
  exponentBohr2: number,
  chargeTolerance: number,
  angularMomentum = 0,
): number {
  if (!(chargeTolerance > 0 && chargeTolerance < 1)) {
    throw new ScienceInputError(`The charge tolerance must lie in (0, 1), got ${chargeTolerance}.`);
  }
  const a = angularMomentum + 1.5;
  let low = 0;
  let high = a + 10;
  while (regularizedUpperGamma(a, high) > chargeTolerance) high *= 2;
  for (let i = 0; i < 200 && high - low > 1e-12 * high; i++) {
    const mid = 0.5 * (low + high);
    if (regularizedUpperGamma(a, mid) > chargeTolerance) low = mid;
    else high = mid;
  }
  // √x/√(2α), not √(x/(2α)): the quotient overflows for α near the smallest doubles, ρ_ε does not.
  return Math.sqrt(0.5 * (low + high)) / Math.sqrt(2 * exponentBohr2);
}

export interface SphereRadiusResult {
  /** Smallest radius enclosing the charge to the tolerance, bohr. */
  requiredRadiusBohr: number;
  /** max_i |r_i − c|, bohr. */
  atomicExtentBohr: number;
  /** ρ_ε of the most diffuse Gaussian (0 when no exponent is given), bohr. */
  tailRadiusBohr: number;
  /** 1-based index of the atom farthest from the centre. */
  farthestAtom: number;
  chargeTolerance: number;
  warnings: string[];
}

/**
 * Smallest R-matrix sphere radius for a target (see the module comment for the derivation).
 *
 * @param request - positions (Å), centre (Å, default origin), most diffuse exponent α (bohr⁻²), its l and
 *   the charge tolerance ε (default 1e-5)
 * @returns required radius and its parts, in bohr
 * @throws ScienceInputError for invalid input
 */
export function requiredSphereRadius(request: SphereRadiusRequest): SphereRadiusResult {
  const r = parseTargetInput(sphereRadiusRequestSchema, request, "sphere radius request");
  const centre = r.centreAngstrom ?? [0, 0, 0];
  const distancesBohr = r.positionsAngstrom.map(
    (p) => Math.hypot(p[0] - centre[0], p[1] - centre[1], p[2] - centre[2]) / BOHR_RADIUS_ANGSTROM,
  );
  const atomicExtentBohr = Math.max(...distancesBohr);
  const warnings: string[] = [];
  let tailRadiusBohr = 0;
  if (r.mostDiffuseExponentBohr2 === undefined) {
    warnings.push("No Gaussian exponent given: the radius encloses the nuclei only, not the electron cloud.");
  } else {
    tailRadiusBohr = gaussianTailRadiusBohr(r.mostDiffuseExponentBohr2, r.chargeTolerance, r.angularMomentum);
  }
  return {
    requiredRadiusBohr: atomicExtentBohr + tailRadiusBohr,
    atomicExtentBohr,
    tailRadiusBohr,
    farthestAtom: distancesBohr.indexOf(atomicExtentBohr) + 1,
    chargeTolerance: r.chargeTolerance,
    warnings,
  };
}

export interface SphereCheck extends SphereRadiusResult {
  radiusBohr: number;
  /** True when the chosen radius is at least the required one. */
  ok: boolean;
  /** Upper bound on the fraction of one diffuse function's charge outside the chosen sphere (null without
   * an exponent): max_i F(R − |r_i − c|), 1 when an atom lies on or outside the sphere. */
  leakedChargeBound: number | null;
}

/**
 * Checks a chosen R-matrix radius against the target's extent and its most diffuse Gaussian.
 *
 * @param radiusBohr - chosen radius a, bohr (> 0)
 * @param request - as for {@link requiredSphereRadius}
 * @returns the requirement, the leak bound at the chosen radius and warnings when it is too small
 */
export function checkSphereRadius(radiusBohr: number, request: SphereRadiusRequest): SphereCheck {
  if (!(radiusBohr > 0) || !Number.isFinite(radiusBohr)) {
    throw new ScienceInputError(`The sphere radius must be a positive number of bohr, got ${radiusBohr}.`);
  }
  const required = requiredSphereRadius(request);
  const r = parseTargetInput(sphereRadiusRequestSchema, request, "sphere radius request");
  const warnings = [...required.warnings];
  let leakedChargeBound: number | null = null;
  if (radiusBohr <= required.atomicExtentBohr) {
    warnings.push(
      `Radius ${radiusBohr.toFixed(3)} bohr does not even enclose atom ${required.farthestAtom} ` +
        `(${required.atomicExtentBohr.toFixed(3)} bohr from the centre).`,
    );
  }
  if (r.mostDiffuseExponentBohr2 !== undefined) {
    const margin = radiusBohr - required.atomicExtentBohr;
    leakedChargeBound =
      margin <= 0 ? 1 : gaussianChargeBeyond(r.mostDiffuseExponentBohr2, margin, r.angularMomentum);
    if (radiusBohr < required.requiredRadiusBohr) {
      warnings.push(
        `Radius ${radiusBohr.toFixed(3)} bohr is too small: up to ${leakedChargeBound.toExponential(2)} of the most ` +
          `diffuse function's charge lies outside (tolerance ${r.chargeTolerance.toExponential(1)}); ` +
          `use at least ${required.requiredRadiusBohr.toFixed(3)} bohr.`,
      );
    }
  }
  return {
    ...required,
    warnings,
    radiusBohr,
    ok: radiusBohr >= required.requiredRadiusBohr && radiusBohr > required.atomicExtentBohr,
    leakedChargeBound,
  };
}
