/**
 * Exact integrals of low-degree polynomials against e^{−x}, written to stay accurate for very short and
 * very long intervals. They make Maxwellian averages of piecewise-linear tables exact.
 */

/**
 * Truncated exponential moments M_m(h) = ∫₀ʰ y^m e^{−y} dy for m = 0, 1, 2.
 *
 * Method: for h ≥ 1 the closed forms M₀ = 1 − e^{−h}, M₁ = 1 − (1 + h)e^{−h}, M₂ = 2 − (h² + 2h + 2)e^{−h}
 * (no serious cancellation there); for h < 1 the series M_m = h^{m+1} Σ_k (−h)^k / (k!(m + k + 1)),
 * summed until the terms fall below 1e-17 of the sum, which avoids the cancellation 1 − (…)e^{−h} for
 * small h. h = ∞ gives 1, 1, 2.
 *
 * @param h - interval length in units of the exponential scale (≥ 0)
 * @param out - destination of length ≥ 3: out[m] = M_m(h)
 * @returns `out`
 */
export function truncatedExponentialMoments(h: number, out: Float64Array): Float64Array {
  if (h >= 1) {
    const decay = Math.exp(-h);
    if (decay === 0) {
      // h ≥ 745 (or ∞): the limits, without forming h² e^{−h} as ∞·0 when h² overflows.
      out[0] = 1;
      out[1] = 1;
      out[2] = 2;
      return out;
    }
    out[0] = 1 - decay;
    out[1] = 1 - (1 + h) * decay;
    out[2] = 2 - (h * h + 2 * h + 2) * decay;
    return out;
  }
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let term = 1; // (−h)^k / k!
  for (let k = 0; k < 40; k++) {
    const t0 = term / (k + 1);
    s0 += t0;
    s1 += term / (k + 2);
    s2 += term / (k + 3);
    if (Math.abs(t0) < 1e-17 * Math.abs(s0)) break;
    term *= -h / (k + 1);
  }
  out[0] = h * s0;
  out[1] = h * h * s1;
  out[2] = h * h * h * s2;
  return out;
}

/**
 * Weights of the two end values of a linear function f on [x_a, x_a + h] in ∫ f(x) · x · e^{−x} dx,
 * scaled by e^{x_a}:
 *   ∫_{x_a}^{x_a+h} f(x) x e^{−x} dx = e^{−x_a} (f_a·W_a + f_b·W_b).
 *
 * Method: with y = x − x_a and f = f_a(1 − y/h) + f_b·y/h,
 *   W_b = (x_a M₁ + M₂)/h,   W_a = x_a (M₀ − M₁/h) + (M₁ − M₂/h),
 * where M_m = M_m(h) (see {@link truncatedExponentialMoments}). Each difference above is at least a third
 * of its first term, so no cancellation occurs; both weights are ≥ 0.
 *
 * @param xa - interval start (≥ 0), in units of the exponential scale
 * @param h - interval length (> 0)
 * @param moments - scratch buffer of length ≥ 3
 * @param out - destination of length ≥ 2: out[0] = W_a, out[1] = W_b
 * @returns `out`
 */
export function linearTimesXExponentialWeights(
  xa: number,
  h: number,
  moments: Float64Array,
  out: Float64Array,
): Float64Array {
  truncatedExponentialMoments(h, moments);
  const m0 = moments[0]!;
  const m1 = moments[1]!;
  const m2 = moments[2]!;
  out[1] = (xa * m1 + m2) / h;
  out[0] = xa * (m0 - m1 / h) + (m1 - m2 / h);
  return out;
}
