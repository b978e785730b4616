/**
 * Removing branch jumps from phase series sampled on an energy grid.
 */

/**
 * Makes a phase series continuous by removing jumps of whole periods between neighbouring samples.
 *
 * Eigenphases are defined modulo π, and the sum Σ arctan λ_k jumps by ±π whenever an eigenvalue of K passes
 * through ±∞ (a pole of K). This adds the multiple of `periodRad` that brings each step
 * δ_i − δ_{i−1} into [−period/2, period/2).
 *
 * Method: like numpy.unwrap(p, period=π): accumulate the correction −period·round(step/period).
 * Limitation: a genuine rise steeper than half a period between two samples (an unresolved narrow
 * resonance) is taken for a jump; sample more densely around resonances.
 *
 * @param phasesRad - phases in radians, in energy order
 * @param periodRad - period to remove (default π, the eigenphase ambiguity)
 * @returns the continuous series (same length), starting at the first input value
 */
export function unwrapPhases(phasesRad: ArrayLike<number>, periodRad = Math.PI): Float64Array {
  const out = new Float64Array(phasesRad.length);
  if (phasesRad.length === 0) return out;
  let correction = 0;
  out[0] = phasesRad[0]!;
  for (let i = 1; i < phasesRad.length; i++) {
    const step = phasesRad[i]! - phasesRad[i - 1]!;
    correction -= periodRad * Math.round(step / periodRad);
    out[i] = phasesRad[i]! + correction;
  }
  return out;
}
