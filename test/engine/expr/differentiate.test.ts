/**
 * differentiate(ir, x): symbolic derivatives for the stiff solver's Jacobian, checked
 * against central finite differences, (f(x+h) − f(x−h)) / 2h with h = 1e-5·max(1, |x|)
 * (truncation error O(h²), common practice), to 1e-6 relative. Pieces without a derivative
 * everywhere (min, max, abs, floor, ceil, conditionals, comparisons, not) give null.
 */
import { describe, expect, it } from 'vitest';
import { differentiate } from '../../../src/lib/engine/expr/differentiate';
import { evaluateIr } from '../../../src/lib/engine/expr/evaluate';
import { parseExpression } from '../../../src/lib/engine/expr/parse';
import type { Ir } from '../../../src/lib/engine/expr/ir';

const ENV: Record<string, number> = { a: 1.7, b: 0.3, n: 2.2, k: 0.8 };

function parse(source: string): Ir {
  const r = parseExpression(source);
  if (!r.ok) throw new Error(`test setup: ${source}: ${JSON.stringify(r.issues)}`);
  return r.ir;
}

const at = (ir: Ir, x: number) => evaluateIr(ir, (name) => (name === 'x' ? x : ENV[name]));

function centralDifference(ir: Ir, x: number): number {
  const h = 1e-5 * Math.max(1, Math.abs(x));
  return (at(ir, x + h) - at(ir, x - h)) / (2 * h);
}

const POINTS = [0.35, 1.2, 3.7];

describe('differentiate(ir, x) matches central finite differences (1e-6 relative)', () => {
  it.each([
    'x',
    'a * x + b',
    'a - x',
    '-x * a',
    'x^2',
    'x^3',
    'x^0.5',
    'x^-1',
    'x^n',
    'a^x',
    'x^x',
    '(a * x)^(b + x)',
    'pow(x, 2.5)',
    'e^x',
    'pi * x',
    'exp(a * x)',
    'exp(-x) * sin(x)',
    'log(x)',
    'log10(x)',
    'sqrt(x)',
    'sin(x)',
    'cos(a * x)',
    'tanh(x - a)',
    'x / (a + x)',
    'a / x',
    'monod(x, a)',
    'inhibit(x, a)',
    'hill(x, a, n)',
    'k * monod(x, a) * x - b * x^2',
    'log(1 + x^2) / sqrt(x + a)',
    'min(a, b) * x'
  ])('%s', (source) => {
    const ir = parse(source);
    const d = differentiate(ir, 'x');
    expect(d).not.toBeNull();
    for (const x of POINTS) {
      const exact = at(d!, x);
      const fd = centralDifference(ir, x);
      expect(Number.isFinite(exact)).toBe(true);
      expect(Math.abs(exact - fd), `d/dx ${source} at x = ${x}: ${exact} vs ${fd}`).toBeLessThanOrEqual(1e-6 * Math.max(Math.abs(fd), 1e-12));
    }
  });

  it('the derivative of an expression without x is the number 0', () => {
    expect(differentiate(parse('a * b + min(a, b)'), 'x')).toEqual({ k: 'num', v: 0 });
  });

  it('d/dx of a conditional that does not read x is 0', () => {
    expect(differentiate(parse('a > b ? a : b'), 'x')).toEqual({ k: 'num', v: 0 });
  });
});

describe('differentiate(ir, x) returns null where there is no derivative formula', () => {
  it.each([
    'min(x, a)',
    'max(x, a)',
    'max(a, b, x)',
    'abs(x)',
    'floor(x)',
    'ceil(x)',
    'x > a ? x : a',
    'a > b ? x : a',
    'x > a',
    'x == a',
    'not x',
    '(x > a) and (x < 2)',
    'k * min(x, a) + x^2'
  ])('%s → null', (source) => {
    expect(differentiate(parse(source), 'x')).toBeNull();
  });
});
