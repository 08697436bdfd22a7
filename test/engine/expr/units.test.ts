/**
 * parseUnit(text) and inferUnits(ir, lookup, issues): the unit check works on dimension
 * vectors (SI base dimensions), so units equal up to a factor (ug/L and mg/m^3, 1/yr and
 * 1/d) agree, and the engine's own short units (d, yr = 365.25 d, ha) are defined.
 * Conversion factors below are by hand: 1 d = 86400 s; 1 yr = 365.25 d; 1 ug/L = 1e-9 kg /
 * 1e-3 m^3 = 1e-6 kg/m^3 = 1 mg/m^3; 1 ha = 1e4 m^2.
 */
import { describe, expect, it } from 'vitest';
import { parseUnit, sameDims, isDimensionless, type UnitInfo } from '../../../src/lib/engine/expr/math';
import { inferUnits, type SymbolUnit } from '../../../src/lib/engine/expr/units';
import { parseExpression } from '../../../src/lib/engine/expr/parse';
import type { ExprIssue } from '../../../src/lib/engine/expr/parse';

function unit(text: string): UnitInfo {
  const u = parseUnit(text);
  if ('error' in u) throw new Error(`test setup: ${text}: ${u.error}`);
  return u;
}

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('parseUnit(text)', () => {
  it.each<[string, number]>([
    ['1/d', 1 / 86400],
    ['1/yr', 1 / (365.25 * 86400)],
    ['d', 86400],
    ['yr', 365.25 * 86400],
    ['ha', 1e4],
    ['mg/m^3', 1e-6],
    ['ug/L', 1e-6],
    ['g/m^2', 1e-3],
    ['m^3/d', 1 / 86400],
    ['m^3/yr', 1 / (365.25 * 86400)],
    ['kg', 1],
    ['1', 1]
  ])('%s has the SI factor %d', (text, si) => {
    expect(rel(unit(text).si, si)).toBeLessThan(1e-14);
  });

  it('keeps the text as the model writes it', () => {
    expect(unit(' ug/L ').text).toBe('ug/L');
    expect(unit('1/d').text).toBe('1/d');
  });

  it.each<[string, string]>([
    ['ug/L', 'mg/m^3'],
    ['1/yr', '1/d'],
    ['1/(yr)', '1/s'],
    ['ha', 'm^2'],
    ['m^3/yr', 'L/d']
  ])('%s has the dimensions of %s', (a, b) => {
    expect(sameDims(unit(a).dims, unit(b).dims)).toBe(true);
  });

  it.each(['degC', 'degF', '1'])('%s is treated as a plain number (dimensionless)', (text) => {
    expect(isDimensionless(unit(text).dims)).toBe(true);
    expect(unit(text).si).toBe(1);
  });

  it.each([
    ['a word that is no unit', 'furlongs'],
    ['a quantity', '2 m'],
    ['an empty text', ''],
    ['a temperature inside a compound unit', 'degC/d']
  ])('%s is refused with an error', (_what, text) => {
    expect(parseUnit(text)).toHaveProperty('error');
  });
});

/** The symbols of the small trees below, with their units (and SI values for parameters). */
const SYMBOLS: Record<string, { unit: string; value?: number }> = {
  C: { unit: 'mg/m^3' }, // a state
  Cl: { unit: 'ug/L' }, // a state
  K: { unit: 'mg/m^3', value: 3e-6 }, // a parameter (SI value)
  V: { unit: 'm^3', value: 1e6 },
  A: { unit: 'm^2', value: 2e5 },
  k: { unit: '1/d', value: 0.1 / 86400 },
  kYr: { unit: '1/yr', value: 1 / (365.25 * 86400) },
  p: { unit: '1', value: 2 }, // a dimensionless parameter
  n: { unit: '1', value: 3 },
  s: { unit: '1' }, // a dimensionless state (no value)
  T: { unit: 'degC' }, // a forcing
  year: { unit: 'd', value: 365 * 86400 }
};

function lookup(name: string): SymbolUnit | undefined {
  const s = SYMBOLS[name];
  return s ? { info: unit(s.unit), value: s.value } : undefined;
}

function infer(source: string) {
  const r = parseExpression(source);
  if (!r.ok) throw new Error(`test setup: ${source}: ${JSON.stringify(r.issues)}`);
  const issues: ExprIssue[] = [];
  const got = inferUnits(r.ir, lookup, issues);
  return { got, issues };
}

describe('inferUnits(ir) gives the unit of a well-formed tree', () => {
  it.each<[string, string, string]>([
    ['multiplication', 'C * V', 'kg'],
    ['division', 'C / K', '1'],
    ['a rate', 'k * C', 'mg/m^3/d'],
    ['a rate in 1/yr', 'kYr * C', 'kg/m^3/s'],
    ['a flow per volume', 'V * k / V', '1/d'],
    ['sqrt halves the dimensions', 'sqrt(A)', 'm'],
    ['sqrt of a volume', 'sqrt(V)', 'm^1.5'],
    ['monod of two like quantities is dimensionless', 'monod(C, K)', '1'],
    ['inhibit of two like quantities is dimensionless', 'inhibit(Cl, K)', '1'],
    ['hill with a dimensionless steepness', 'hill(C, K, n)', '1'],
    ['a parameter exponent on a base with a unit', 'C^p', 'mg^2/m^6'],
    ['pow with a parameter exponent', 'pow(C, p)', 'mg^2/m^6'],
    ['a constant expression as exponent', 'C^(p + 1)', 'mg^3/m^9'],
    ['a literal exponent', 'V^(1/3)', 'm'],
    ['a varying exponent on a dimensionless base', 'p^s', '1'],
    ['ug/L plus mg/m^3', 'Cl + C', 'mg/m^3'],
    ['1/yr plus 1/d', 'kYr + k', '1/d'],
    ['t over a period in days', 't / year', '1'],
    ['degC as a plain number', 'p^(T - 20)', '1'],
    ['a comparison of like quantities', 'C > K', '1'],
    ['a conditional with like branches', 'C > K ? C : K', 'mg/m^3'],
    ['min of like quantities', 'min(C, Cl, K)', 'mg/m^3'],
    ['abs keeps the unit', 'abs(k)', '1/d'],
    ['log of a ratio', 'log(C / K)', '1'],
    ['and/or/not are dimensionless', '(C > K) and not (k > kYr) or s', '1']
  ])('%s: %s has the unit %s', (_what, source, want) => {
    const { got, issues } = infer(source);
    expect(issues).toEqual([]);
    expect(got).not.toBeNull();
    expect(sameDims(got!.dims, unit(want).dims)).toBe(true);
  });

  it('folds constants: the value of (p + 1) * n is 9', () => {
    const { got } = infer('(p + 1) * n');
    expect(got!.value).toBe(9);
  });

  it('a state has no constant value', () => {
    const { got } = infer('C * 2');
    expect(got!.value).toBeUndefined();
  });
});

describe('inferUnits(ir) reports a badly formed tree', () => {
  it.each<[string, string, string]>([
    ['adding unlike quantities', 'C + k', 'unit_mismatch'],
    ['subtracting unlike quantities', 'V - A', 'unit_mismatch'],
    ['monod of unlike quantities', 'monod(C, k)', 'unit_mismatch'],
    ['hill with a steepness that has a unit', 'hill(C, K, k)', 'unit_mismatch'],
    ['hill of unlike quantities', 'hill(C, V, n)', 'unit_mismatch'],
    ['log of a quantity with a unit', 'log(C)', 'unit_mismatch'],
    ['exp of a rate', 'exp(k)', 'unit_mismatch'],
    ['cos of a time', 'cos(t)', 'unit_mismatch'],
    ['an exponent with a unit', 'p^k', 'unit_mismatch'],
    ['a non-constant exponent on a base with a unit', 'C^s', 'exponent_not_constant'],
    ['pow with a non-constant exponent on a base with a unit', 'pow(V, s)', 'exponent_not_constant'],
    ['comparing unlike quantities', 'C > k', 'unit_mismatch'],
    ['a conditional with unlike branches', 's > 1 ? C : k', 'unit_mismatch'],
    ['max of unlike quantities', 'max(C, V)', 'unit_mismatch'],
    ['t plus a rate', 't + k', 'unit_mismatch']
  ])('%s: %s → %s', (_what, source, code) => {
    const { got, issues } = infer(source);
    expect(got).toBeNull();
    expect(issues.map((i) => i.code)).toEqual([code]);
  });

  it('an unknown symbol gives null and no unit issue (unknown symbols are reported elsewhere)', () => {
    const { got, issues } = infer('C * nowhere');
    expect(got).toBeNull();
    expect(issues).toEqual([]);
  });
});
