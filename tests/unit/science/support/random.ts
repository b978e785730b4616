/**
 * Seeded pseudo-random numbers for reproducible tests (mulberry32, a 32-bit generator by T. Ettinger,
 * public domain) and random rigid motions built on it.
 */
import type { Mat3, Vec3 } from "@shared/science/geometry/linear-algebra";
import { quaternionToMatrix } from "@shared/science/geometry/linear-algebra";

/** Returns a function giving uniform numbers in [0, 1), fully determined by `seed`. */
export function mulberry32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Uniformly distributed random rotation (Shoemake's method: uniform unit quaternion). */
export function randomRotation(random: () => number): Mat3 {
  const u1 = random();
  const u2 = random() * 2 * Math.PI;
  const u3 = random() * 2 * Math.PI;
  const a = Math.sqrt(1 - u1);
  const b = Math.sqrt(u1);
  return quaternionToMatrix(a * Math.sin(u2), a * Math.cos(u2), b * Math.sin(u3), b * Math.cos(u3));
}

/** Random translation with components in [−range, range) Å. */
export function randomTranslation(random: () => number, range = 10): Vec3 {
  return [(2 * random() - 1) * range, (2 * random() - 1) * range, (2 * random() - 1) * range];
}

/** Fisher–Yates shuffle of 0..n−1. */
export function randomPermutation(random: () => number, n: number): number[] {
  const out = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [out[i], out[j]] = [out[j]!, out[i]!];
  }
  return out;
}
