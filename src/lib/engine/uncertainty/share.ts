/**
 * The share of members that meet a target, with a confidence interval for the true share
 * given the number of members: the Wilson score interval (Wilson 1927, JASA 22: 209–212),
 * the set of p for which the score test |p̂ − p| / √(p(1 − p)/n) ≤ z does not reject:
 *
 *   centre = (p̂ + z²/(2n)) / (1 + z²/n)
 *   half   = z / (1 + z²/n) · √(p̂(1 − p̂)/n + z²/(4n²))
 *
 * It stays inside [0, 1] and keeps close to its nominal coverage for small n and shares
 * near 0 or 1, where the textbook p̂ ± z√(p̂(1 − p̂)/n) fails (Brown, Cai & DasGupta 2001,
 * Statistical Science 16: 101–133). Default 95 % (z = 1.959963984540054).
 */
export const Z95 = 1.959963984540054;

export interface Share {
  /** Members that met the target. */
  met: number;
  /** Members counted (those with a value). */
  n: number;
  share: number;
  low: number;
  high: number;
  confidence: number;
}

export function wilsonInterval(met: number, n: number, z = Z95): { low: number; high: number } {
  if (n <= 0) return { low: 0, high: 1 };
  const p = met / n;
  const z2 = z * z;
  const d = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / d;
  const half = (z / d) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // at met = 0 or met = n the ends are 0 and 1 exactly; round-off must not move them
  return { low: met === 0 ? 0 : Math.max(0, centre - half), high: met === n ? 1 : Math.min(1, centre + half) };
}

/**
 * Share of values meeting a target: `below` (an upper limit, value ≤ target: chlorophyll,
 * phosphorus) or `above` (a lower limit, value ≥ target: Secchi depth). Non-finite values
 * are not counted.
 */
export function shareMeeting(values: readonly number[], target: number, direction: 'below' | 'above' = 'below', z = Z95, confidence = 0.95): Share {
  let n = 0;
  let met = 0;
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    n++;
    if (direction === 'below' ? v <= target : v >= target) met++;
  }
  const { low, high } = wilsonInterval(met, n, z);
  return { met, n, share: n ? met / n : NaN, low, high, confidence };
}
