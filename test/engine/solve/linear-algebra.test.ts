import { describe, expect, it } from 'vitest';
import { luDecompose, luSolve } from '../../../src/lib/engine/solve/linear-algebra';

/** b = A x, so that solving A x = b must give x back (round-trip check, common practice). */
function multiply(a: Float64Array, n: number, x: Float64Array): Float64Array {
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) s += a[i * n + j] * x[j];
    b[i] = s;
  }
  return b;
}

describe('luDecompose / luSolve', () => {
  it('luSolve recovers x when the first pivot is zero (needs row exchanges)', () => {
    const n = 3;
    const a = Float64Array.from([0, 2, 1, 1, 1, 1, 2, 1, 0]);
    const x = Float64Array.from([1, -2, 3]);
    const b = multiply(a, n, x);
    const pivots = new Int32Array(n);
    expect(luDecompose(a, n, pivots)).toBe(true);
    expect(Array.from(pivots)).not.toEqual([0, 1, 2]);
    luSolve(a, n, pivots, b);
    for (let i = 0; i < n; i++) expect(Math.abs(b[i] - x[i])).toBeLessThan(1e-14);
  });

  it('luSolve recovers x for a 40×40 matrix like a stiff step matrix I/(hγ) − J', () => {
    const n = 40;
    let seed = 12345;
    // Park & Miller (1988) minimal standard generator: a fixed, reproducible matrix.
    const next = (): number => {
      seed = (seed * 16807) % 2147483647;
      return seed / 2147483647 - 0.5;
    };
    const a = new Float64Array(n * n);
    for (let k = 0; k < n * n; k++) a[k] = 1e3 * next();
    for (let i = 0; i < n; i++) a[i * n + i] += 10;
    const x = Float64Array.from({ length: n }, () => next());
    const b = multiply(a, n, x);
    const pivots = new Int32Array(n);
    expect(luDecompose(a, n, pivots)).toBe(true);
    luSolve(a, n, pivots, b);
    let worst = 0;
    for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(b[i] - x[i]));
    expect(worst).toBeLessThan(1e-10);
  });

  it('luDecompose reports a singular matrix', () => {
    const a = Float64Array.from([1, 2, 2, 4]);
    expect(luDecompose(a, 2, new Int32Array(2))).toBe(false);
  });

  it('luDecompose reports a matrix holding NaN or Infinity', () => {
    expect(luDecompose(Float64Array.from([NaN, 0, 0, NaN]), 2, new Int32Array(2))).toBe(false);
    expect(luDecompose(Float64Array.from([1, 0, 0, Infinity]), 2, new Int32Array(2))).toBe(false);
  });
});
