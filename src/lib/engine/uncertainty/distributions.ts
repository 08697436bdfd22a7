/**
 * Inverse cumulative distribution functions (quantile functions) of the three range
 * distributions a model may give a parameter or an initial value (documents.md):
 *
 *   uniform on [a, b]:            x(u) = a + u·(b − a)
 *   log-uniform on [a, b], a > 0: ln x uniform on [ln a, ln b], so
 *                                 x(u) = exp(ln a + u·(ln b − ln a)) = a·(b/a)^u
 *   triangular, min a, mode c, max b (mode at the item's value), with F(c) = (c − a)/(b − a):
 *                                 x(u) = a + √(u·(b − a)·(c − a))            for u < F(c)
 *                                 x(u) = b − √((1 − u)·(b − a)·(b − c))      for u ≥ F(c)
 *     (from F(x) = (x − a)²/((b − a)(c − a)) on [a, c] and
 *      1 − F(x) = (b − x)²/((b − a)(b − c)) on [c, b], solved for x)
 *
 * u is in [0, 1). Every function here is pure.
 */
import type { Distribution, Range } from '../document/types';
import { UncertaintyInputError } from './errors';

export interface Marginal {
  distribution: Distribution;
  min: number;
  max: number;
  /** The mode of a triangular distribution (the item's value); unused otherwise. */
  mode: number;
}

export function uniformQuantile(u: number, a: number, b: number): number {
  return a + u * (b - a);
}

export function logUniformQuantile(u: number, a: number, b: number): number {
  return Math.exp(Math.log(a) + u * (Math.log(b) - Math.log(a)));
}

export function triangularQuantile(u: number, a: number, c: number, b: number): number {
  const w = b - a;
  const fc = (c - a) / w;
  return u < fc ? a + Math.sqrt(u * w * (c - a)) : b - Math.sqrt((1 - u) * w * (b - c));
}

export function quantile(m: Marginal, u: number): number {
  switch (m.distribution) {
    case 'loguniform':
      return logUniformQuantile(u, m.min, m.max);
    case 'triangular':
      return triangularQuantile(u, m.min, m.mode, m.max);
    default:
      return uniformQuantile(u, m.min, m.max);
  }
}

/** A range as a marginal distribution, checked: min < max, finite, log-uniform min > 0, mode inside. */
export function marginalOf(range: Range, value: number, what: string, id: string): Marginal {
  const distribution = range.distribution ?? 'uniform';
  const { min, max } = range;
  const bad = (why: string) => new UncertaintyInputError('invalid_range', `${what} '${id}': range ${why}`, id);
  if (!Number.isFinite(min) || !Number.isFinite(max)) throw bad('min and max must be finite numbers');
  if (!(min < max)) throw bad(`min (${min}) must be below max (${max})`);
  if (distribution !== 'uniform' && distribution !== 'loguniform' && distribution !== 'triangular') throw bad(`distribution '${String(distribution)}' is not uniform, triangular or loguniform`);
  if (distribution === 'loguniform' && !(min > 0)) throw bad(`loguniform needs min > 0, got ${min}`);
  if (distribution === 'triangular' && !(value >= min && value <= max)) throw bad(`triangular has its mode at the value ${value}, which lies outside [${min}, ${max}]`);
  return { distribution, min, max, mode: value };
}
