/**
 * Deterministic random matrices for the scattering tests (fixed seeds, so failures reproduce).
 */

/** mulberry32: a 32-bit seeded PRNG (public-domain algorithm by Tommy Ettinger), uniform in [0, 1). */
export function seededUniform(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Random real symmetric n×n matrix with entries uniform in [−scale, scale].
 *
 * @returns nested rows
 */
export function randomSymmetricMatrix(n: number, seed: number, scale = 1): number[][] {
  const random = seededUniform(seed);
  const rows = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const value = (2 * random() - 1) * scale;
      rows[i]![j] = value;
      rows[j]![i] = value;
    }
  }
  return rows;
}

/** Random real symmetric matrix, row-major, written into `out` (length ≥ n²). */
export function fillRandomSymmetric(
  out: Float64Array,
  n: number,
  random: () => number,
  scale = 1,
): Float64Array {
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const value = (2 * random() - 1) * scale;
      out[i * n + j] = value;
      out[j * n + i] = value;
    }
  }
  return out;
}
