/**
 * Greatest common divisor of two integers, for element orders and rotation powers of point-group
 * operations (Euclid's algorithm).
 *
 * @param p - an integer
 * @param q - an integer
 * @returns gcd(|p|, |q|) ≥ 0; gcd(p, 0) = |p|
 */
export function gcd(p: number, q: number): number {
  let a = Math.abs(p);
  let b = Math.abs(q);
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}
