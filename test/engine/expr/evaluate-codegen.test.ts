/**
 * The generated code (expr/codegen.ts, through compileModel) and the direct evaluator
 * (expr/evaluate.ts) give the same numbers, and both equal the expression written by hand
 * in JavaScript, to 1e-14 relative.
 *
 * Each expression becomes the one derived quantity of a tiny model: one dimensionless,
 * non-conserved state X and dimensionless parameters, so SI values are the model's values,
 * except time: the generated code works in seconds (t·86400) and `year` is 365 d.
 */
import { describe, expect, it } from 'vitest';
import { compileModel } from '../../../src/lib/engine';
import type { ModelDoc } from '../../../src/lib/engine';
import { evaluateIr } from '../../../src/lib/engine/expr/evaluate';
import { parseExpression } from '../../../src/lib/engine/expr/parse';

const P = { a: 1.7, b: 0.3, c: -2.5, n: 2.2, theta: 1.07 };
const YEAR_DAYS = 365;
const DAY = 86400;

function tinyModel(expression: string): ModelDoc {
  return {
    format: 'lakeledger.model/1',
    id: 'tiny',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 1, unit: 'm^3' },
      { id: 'k', value: 0.1, unit: '1/d' },
      { id: 'year', value: YEAR_DAYS, unit: 'd' },
      { id: 't0', value: 30, unit: 'd' },
      ...Object.entries(P).map(([id, value]) => ({ id, value, unit: '1' }))
    ],
    states: [{ id: 'X', unit: '1', initial: 1, size: 'V', conserved: false }],
    derived: [{ id: 'out', expression, unit: '1' }],
    flows: [{ id: 'decay', from: 'X', rate: 'k * X' }]
  };
}

/** |x − y| ≤ tol · max(|x|, |y|); equal infinities and two zeros pass. */
function close(x: number, y: number, tol = 1e-14): boolean {
  if (x === y) return true;
  return Math.abs(x - y) <= tol * Math.max(Math.abs(x), Math.abs(y));
}

const { a, b, c, n, theta } = P;
// [expression, closed form in JavaScript of (X, t in days)]
const CASES: [string, (X: number, t: number) => number][] = [
  ['a * X + b', (X) => a * X + b],
  ['a - b - X', (X) => a - b - X],
  ['a / b / X', (X) => a / b / X],
  ['-X^2', (X) => -(X ** 2)],
  ['X^2', (X) => X * X],
  ['X^3', (X) => X * X * X],
  ['X^0.5', (X) => Math.sqrt(X)],
  ['X^-1', (X) => 1 / X],
  ['X^n', (X) => Math.pow(X, n)],
  ['X^(1/3)', (X) => Math.pow(X, 1 / 3)],
  ['pow(X, b)', (X) => Math.pow(X, b)],
  ['theta^(X - 1)', (X) => Math.pow(theta, X - 1)],
  ['theta^(20 * sin(2*pi*t/year))', (_X, t) => Math.pow(theta, 20 * Math.sin((2 * Math.PI * t) / YEAR_DAYS))],
  ['e^X', (X) => Math.exp(X)],
  ['X > 1 ? a : b', (X) => (X > 1 ? a : b)],
  ['X >= 1.3 ? a * X : b / X', (X) => (X >= 1.3 ? a * X : b / X)],
  ['X < 1.3', (X) => (X < 1.3 ? 1 : 0)],
  ['X <= 1.3', (X) => (X <= 1.3 ? 1 : 0)],
  ['X == 1.3', (X) => (X === 1.3 ? 1 : 0)],
  ['X != 1.3', (X) => (X !== 1.3 ? 1 : 0)],
  ['X > b and X < a', (X) => (X > b && X < a ? 1 : 0)],
  ['X < b or X > a', (X) => (X < b || X > a ? 1 : 0)],
  ['not (X > 1)', (X) => (X > 1 ? 0 : 1)],
  ['(X > 1) * a + (X <= 1) * b', (X) => (X > 1 ? a : b)],
  ['min(X, a)', (X) => Math.min(X, a)],
  ['max(X, a, b)', (X) => Math.max(X, a, b)],
  ['monod(X, a)', (X) => X / (a + X)],
  ['inhibit(X, a)', (X) => a / (a + X)],
  ['hill(X, a, n)', (X) => Math.pow(X, n) / (Math.pow(a, n) + Math.pow(X, n))],
  ['log10(X)', (X) => Math.log10(X)],
  ['log(X)', (X) => Math.log(X)],
  ['exp(-X)', (X) => Math.exp(-X)],
  ['sqrt(X)', (X) => Math.sqrt(X)],
  ['abs(c * X)', (X) => Math.abs(c * X)],
  ['tanh(X - a)', (X) => Math.tanh(X - a)],
  ['floor(3 * X)', (X) => Math.floor(3 * X)],
  ['ceil(X)', (X) => Math.ceil(X)],
  ['cos(pi * X)', (X) => Math.cos(Math.PI * X)],
  ['a * cos(2*pi*(t - t0)/year) + X', (X, t) => a * Math.cos((2 * Math.PI * (t - 30)) / YEAR_DAYS) + X],
  ['theta^a * X', (X) => Math.pow(theta, a) * X]
];

const POINTS: [number, number][] = [
  [0.4, 0],
  [1.3, 40.5],
  [2.9, 200]
];

describe('generated code = evaluateIr = closed form (1e-14 relative)', () => {
  it.each(CASES)('%s', (expression, closed) => {
    const compiled = compileModel(tinyModel(expression));
    const bound = compiled.bind();
    const iOut = compiled.derivedIds.indexOf('out');
    expect(iOut).toBeGreaterThanOrEqual(0);
    const parsed = parseExpression(expression);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const si: Record<string, number> = { ...P, V: 1, k: 0.1 / DAY, year: YEAR_DAYS * DAY, t0: 30 * DAY };

    const y = new Float64Array(compiled.dim);
    const out = new Float64Array(compiled.derivedIds.length);
    for (const [X, t] of POINTS) {
      y[0] = X;
      bound.derived(t, y, out);
      const generated = out[iOut];
      const direct = evaluateIr(parsed.ir, (name) => (name === 't' ? t * DAY : name === 'X' ? X : si[name]));
      const expected = closed(X, t);
      expect(Number.isFinite(expected)).toBe(true);
      expect(close(generated, direct), `generated ${generated} vs evaluateIr ${direct} at X=${X}, t=${t}`).toBe(true);
      expect(close(generated, expected), `generated ${generated} vs closed form ${expected} at X=${X}, t=${t}`).toBe(true);
    }
  });

  // A static base to a varying power is generated as exp(ln(base) · exponent) (codegen.ts);
  // its rounding error grows with |ln(result)| (the error of ln(base) · exponent, times the
  // result), so a large result is compared with that bound instead of 1e-14.
  it('2^3^X (a static base to a varying power, result up to 2e7) agrees to 1e-14 · |ln(result)|', () => {
    const compiled = compileModel(tinyModel('2^3^X'));
    const bound = compiled.bind();
    const y = new Float64Array(compiled.dim);
    const out = new Float64Array(1);
    for (const [X, t] of POINTS) {
      y[0] = X;
      bound.derived(t, y, out);
      const expected = Math.pow(2, Math.pow(3, X));
      expect(close(out[0], expected, 1e-14 * Math.max(1, Math.abs(Math.log(expected))))).toBe(true);
    }
  });

  it('X == 1.3 is 1 exactly at X = 1.3 and 0 elsewhere (a test that the points reach both branches)', () => {
    const compiled = compileModel(tinyModel('X == 1.3'));
    const bound = compiled.bind();
    const y = new Float64Array(compiled.dim);
    const out = new Float64Array(1);
    const values = POINTS.map(([X, t]) => {
      y[0] = X;
      bound.derived(t, y, out);
      return out[0];
    });
    expect(values).toEqual([0, 1, 0]);
  });

  it('bind(overrides) reaches hoisted constants: theta^a * X with a overridden', () => {
    const compiled = compileModel(tinyModel('theta^a * X'));
    const y = new Float64Array(compiled.dim);
    y[0] = 2;
    const out = new Float64Array(1);
    compiled.bind({ a: 0.5 }).derived(0, y, out);
    expect(close(out[0], Math.pow(theta, 0.5) * 2)).toBe(true);
  });
});
