/**
 * Spherical Bessel functions of the first and second kind, j_l(x) and y_l(x), for l = 0..lMax at one
 * real argument x ≥ 0.
 *
 * Method (DLMF §10.51 recurrences, f_{l−1} + f_{l+1} = (2l + 1) f_l / x, and §3.6 on their stability):
 *  - y_l: upward recurrence from y_0 = −cos x / x and y_1 = −cos x / x² − sin x / x. y_l is the dominant
 *    solution for increasing l, so upward recurrence is stable for every x.
 *  - j_l for x > lMax: upward recurrence from j_0 = sin x / x, j_1 = sin x / x² − cos x / x (stable while
 *    l < x, where j_l still oscillates).
 *  - j_l for x ≤ lMax: Miller's downward recurrence. Start at an order N well above max(lMax, x) with
 *    f_{N+1} = 0, f_N = 1, recur down (rescaling to avoid overflow), then normalise with the exact j_0 (or j_1
 *    where j_0 is near a zero). The minimal solution j_l dominates downward, so errors decay.
 *  - x < 1e-5: two terms of the power series j_l(x) = x^l/(2l+1)!! · (1 − x²/(2(2l+3)) + …) (DLMF §10.53).
 * At x = 0, j_0 = 1 and j_l = 0 (l > 0); y_l(0) = −∞. For small x and large l, y_l overflows to −∞ and j_l
 * underflows to 0, which is the correct limiting behaviour for phase shifts.
 *
 * Reference: NIST DLMF, chapter 10 (§10.47–10.53), dlmf.nist.gov; J. C. P. Miller in British Association
 * Mathematical Tables vol. X (1952) for the downward algorithm.
 */
import { ScienceInputError } from "../errors";

function checkArguments(lMax: number, x: number): void {
  if (!Number.isInteger(lMax) || lMax < 0) {
    throw new ScienceInputError(`lMax must be a non-negative integer; got ${lMax}.`);
  }
  if (!Number.isFinite(x) || x < 0) {
    throw new ScienceInputError(`The argument x must be finite and ≥ 0; got ${x}.`);
  }
}

const SERIES_LIMIT = 1e-5;
const RESCALE_ABOVE = 1e200;

/**
 * Spherical Bessel functions of the first kind j_0(x) … j_lMax(x).
 *
 * @param lMax - highest order (integer ≥ 0)
 * @param x - argument (dimensionless, ≥ 0), e.g. k·r with k in bohr⁻¹ and r in bohr
 * @param out - optional destination of length ≥ lMax + 1
 * @returns `out[l] = j_l(x)`
 * @throws ScienceInputError for a negative or non-integer lMax or a negative or non-finite x
 */
export function sphericalBesselJ(lMax: number, x: number, out?: Float64Array): Float64Array {
  checkArguments(lMax, x);
  const j = out ?? new Float64Array(lMax + 1);
  if (x < SERIES_LIMIT) {
    let leading = 1;
    for (let l = 0; l <= lMax; l++) {
      if (l > 0) leading *= x / (2 * l + 1);
      j[l] = leading * (1 - (x * x) / (2 * (2 * l + 3)));
    }
    return j;
  }
  const j0 = Math.sin(x) / x;
  if (x > lMax) {
    j[0] = j0;
    if (lMax >= 1) j[1] = Math.sin(x) / (x * x) - Math.cos(x) / x;
    for (let l = 1; l < lMax; l++) j[l + 1] = ((2 * l + 1) / x) * j[l]! - j[l - 1]!;
    return j;
  }
  const start = lMax + 20 + Math.ceil(Math.sqrt(60 * (lMax + 1)));
  let above = 0;
  let current = 1;
  for (let l = start; l > 0; l--) {
    const below = ((2 * l + 1) / x) * current - above;
    above = current;
    current = below;
    if (l - 1 <= lMax) j[l - 1] = current;
    if (l <= lMax) j[l] = above;
    if (Math.abs(current) > RESCALE_ABOVE) {
      const scale = 1 / RESCALE_ABOVE;
      current *= scale;
      above *= scale;
      for (let m = l - 1; m <= lMax; m++) if (m >= 0) j[m]! *= scale;
    }
  }
  // Normalise with whichever of j_0, j_1 is safely away from a zero (they never vanish together).
  const j1 = x >= 1 ? Math.sin(x) / (x * x) - Math.cos(x) / x : Number.NaN;
  const useJ0 = x < 1 || Math.abs(j0) >= Math.abs(j1);
  const scale = useJ0 ? j0 / j[0]! : j1 / j[1]!;
  for (let l = 0; l <= lMax; l++) j[l]! *= scale;
  return j;
}

/**
 * Spherical Bessel functions of the second kind y_0(x) … y_lMax(x) (also written n_l).
 *
 * @param lMax - highest order (integer ≥ 0)
 * @param x - argument (dimensionless, ≥ 0)
 * @param out - optional destination of length ≥ lMax + 1
 * @returns `out[l] = y_l(x)`; −∞ at x = 0 and where the magnitude overflows
 * @throws ScienceInputError for invalid arguments
 */
export function sphericalBesselY(lMax: number, x: number, out?: Float64Array): Float64Array {
  checkArguments(lMax, x);
  const y = out ?? new Float64Array(lMax + 1);
  if (x === 0) {
    y.fill(Number.NEGATIVE_INFINITY, 0, lMax + 1);
    return y;
  }
  y[0] = -Math.cos(x) / x;
  if (lMax >= 1) y[1] = -Math.cos(x) / (x * x) - Math.sin(x) / x;
  for (let l = 1; l < lMax; l++) {
    const next = ((2 * l + 1) / x) * y[l]! - y[l - 1]!;
    y[l + 1] = Number.isFinite(next) ? next : Number.NEGATIVE_INFINITY;
  }
  return y;
}

/**
 * Derivative d f_l/dx of a spherical Bessel function from neighbouring orders:
 * f_l' = f_{l−1} − (l + 1) f_l / x for l ≥ 1 and f_0' = −f_1 (DLMF §10.51), valid for j and y alike.
 *
 * @param l - order
 * @param x - argument (> 0)
 * @param values - f_0 … f_l at x (f_0 and f_1 when l = 0)
 * @returns f_l'(x)
 */
export function sphericalBesselDerivative(l: number, x: number, values: ArrayLike<number>): number {
  if (l === 0) return -values[1]!;
  return values[l - 1]! - ((l + 1) / x) * values[l]!;
}
