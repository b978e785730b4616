/**
 * Nuclear and electronic charge enclosed by a sphere about the centre of mass, as a function of its radius:
 * a guide for choosing the R-matrix sphere radius before a run.
 *
 * Model. The nuclei are points, so their enclosed charge is a staircase. The electrons of each atom are
 * spread as one normalized s-type Gaussian |χ|² ∝ e^{−2α r²} about that atom, α being the most diffuse
 * exponent of the chosen basis: every electron as diffuse as the most diffuse function, so the curve
 * understates the enclosed electronic charge and a radius chosen from it errs on the large side. The
 * density is a 3-D normal distribution with variance σ² = 1/(4α) per axis; the fraction inside a sphere of
 * radius R whose centre lies a distance d from the atom is the distribution function of a noncentral χ with
 * three degrees of freedom (Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions vol. 2,
 * ch. 29 — from memory):
 *     P(R; d) = ½[erf((R−d)/(σ√2)) + erf((R+d)/(σ√2))] − σ/(d√(2π))·[e^{−(R−d)²/(2σ²)} − e^{−(R+d)²/(2σ²)}],
 * and at d = 0 the Maxwell distribution function erf(x) − (2/√π)·x·e^{−x²}, x = R/(σ√2), which is
 * 1 − Q(3/2, 2αR²) of shared/science/sphere.
 */
import { BOHR_RADIUS_ANGSTROM } from "@shared/science/constants";
import type { TargetInspection } from "@shared/science/geometry";
import { erfc } from "@shared/science/quadrature/incomplete-gamma";

const erf = (x: number) => 1 - erfc(x);

/**
 * Fraction of a normalized s Gaussian (density ∝ e^{−2α r²}) inside a sphere of radius R whose centre is a
 * distance d from the Gaussian's centre.
 *
 * @param exponentBohr2 - α, bohr⁻² (> 0)
 * @param radiusBohr - R, bohr (≥ 0)
 * @param offsetBohr - d, bohr (≥ 0)
 * @returns the enclosed fraction in [0, 1]
 */
export function gaussianFractionInsideSphere(
  exponentBohr2: number,
  radiusBohr: number,
  offsetBohr: number,
): number {
  if (radiusBohr <= 0) return 0;
  const sigma = 1 / (2 * Math.sqrt(exponentBohr2));
  const scale = sigma * Math.SQRT2;
  let fraction: number;
  // Below this offset the two exponentials cancel to rounding noise; the d → 0 limit is exact there.
  if (offsetBohr < 1e-6 * sigma) {
    const x = radiusBohr / scale;
    fraction = erf(x) - (2 / Math.sqrt(Math.PI)) * x * Math.exp(-x * x);
  } else {
    const minus = (radiusBohr - offsetBohr) / scale;
    const plus = (radiusBohr + offsetBohr) / scale;
    fraction =
      0.5 * (erf(minus) + erf(plus)) -
      (sigma / (offsetBohr * Math.sqrt(2 * Math.PI))) * (Math.exp(-minus * minus) - Math.exp(-plus * plus));
  }
  return Math.min(1, Math.max(0, fraction));
}

export interface EnclosedChargePoint {
  radiusBohr: number;
  /** Sum of the atomic numbers of the nuclei within the radius, e. */
  nuclearE: number;
  /** Electrons within the radius under the model above, e. */
  electronicE: number;
}

export interface EnclosedChargeCurve {
  points: EnclosedChargePoint[];
  totalNuclearE: number;
  totalElectrons: number;
  /** Smallest sampled radius enclosing all nuclei and all but `tolerance` of the electrons, bohr (null if none). */
  suggestedRadiusBohr: number | null;
  tolerance: number;
}

/**
 * Enclosed nuclear and electronic charge on radii 0…maxRadiusBohr about the centre of mass.
 *
 * @param inspection - the target's inspection (standard orientation: centre of mass at the origin)
 * @param exponentBohr2 - α of the most diffuse function, bohr⁻²
 * @param samples - number of radii (default 121)
 * @param tolerance - electronic charge fraction allowed outside for the suggested radius (default 1e-3)
 */
export function enclosedChargeCurve(
  inspection: Pick<TargetInspection, "atoms" | "electronCount">,
  exponentBohr2: number,
  samples = 121,
  tolerance = 1e-3,
): EnclosedChargeCurve {
  const atoms = inspection.atoms.map((atom) => ({
    z: atom.atomicNumber,
    distanceBohr: Math.hypot(...atom.positionAngstrom) / BOHR_RADIUS_ANGSTROM,
  }));
  const totalNuclearE = atoms.reduce((sum, atom) => sum + atom.z, 0);
  const totalElectrons = inspection.electronCount;
  // The molecule's net charge is shared among atoms in proportion to their nuclear charge.
  const electronsPerNuclearCharge = totalNuclearE > 0 ? totalElectrons / totalNuclearE : 0;
  const extentBohr = Math.max(...atoms.map((atom) => atom.distanceBohr));
  // Beyond the extent plus five standard deviations of the Gaussian nothing changes on the chart.
  const maxRadiusBohr = extentBohr + 5 / (2 * Math.sqrt(exponentBohr2)) + 1;
  const points: EnclosedChargePoint[] = [];
  let suggestedRadiusBohr: number | null = null;
  for (let k = 0; k < samples; k++) {
    const radiusBohr = (maxRadiusBohr * k) / (samples - 1);
    let nuclearE = 0;
    let electronicE = 0;
    for (const atom of atoms) {
      if (atom.distanceBohr <= radiusBohr) nuclearE += atom.z;
      electronicE +=
        atom.z *
        electronsPerNuclearCharge *
        gaussianFractionInsideSphere(exponentBohr2, radiusBohr, atom.distanceBohr);
    }
    points.push({ radiusBohr, nuclearE, electronicE });
    if (
      suggestedRadiusBohr === null &&
      nuclearE === totalNuclearE &&
      totalElectrons - electronicE <= tolerance * Math.max(totalElectrons, 1)
    ) {
      suggestedRadiusBohr = radiusBohr;
    }
  }
  return { points, totalNuclearE, totalElectrons, suggestedRadiusBohr, tolerance };
}
