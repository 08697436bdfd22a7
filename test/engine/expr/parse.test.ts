/**
 * parseExpression(source): mathjs parses, then an allow-list of operators and functions
 * (not of node kinds) turns the tree into the engine's own, or refuses it with a stable code.
 * Symbols are not checked here (validate-model does that against the declared ids).
 */
import { describe, expect, it } from 'vitest';
import { parseExpression } from '../../../src/lib/engine/expr/parse';
import { bin, num, sym, type Ir } from '../../../src/lib/engine/expr/ir';
import { printIr } from '../../../src/lib/engine/expr/print';

const un = (op: '-' | 'not', a: Ir): Ir => ({ k: 'un', op, a });
const call = (fn: string, ...args: Ir[]): Ir => ({ k: 'call', fn, args });
const cond = (c: Ir, a: Ir, b: Ir): Ir => ({ k: 'cond', c, a, b });

describe('parseExpression(source) accepts the allowed language and builds the tree', () => {
  it.each<[string, Ir]>([
    ['k * X', bin('*', sym('k'), sym('X'))],
    ['a - b - c', bin('-', bin('-', sym('a'), sym('b')), sym('c'))],
    ['a / b / c', bin('/', bin('/', sym('a'), sym('b')), sym('c'))],
    ['2^3^x', bin('^', num(2), bin('^', num(3), sym('x')))],
    ['-x^2', un('-', bin('^', sym('x'), num(2)))],
    ['+x', sym('x')],
    ['((x))', sym('x')],
    ['1e-3 * x', bin('*', num(0.001), sym('x'))],
    ['.5', num(0.5)],
    ['x > 1 ? a : b', cond(bin('>', sym('x'), num(1)), sym('a'), sym('b'))],
    ['a ? b : c ? d : f', cond(sym('a'), sym('b'), cond(sym('c'), sym('d'), sym('f')))],
    ['x <= y and not z', bin('and', bin('<=', sym('x'), sym('y')), un('not', sym('z')))],
    ['x < a or x >= b', bin('or', bin('<', sym('x'), sym('a')), bin('>=', sym('x'), sym('b')))],
    ['x == y', bin('==', sym('x'), sym('y'))],
    ['x != y', bin('!=', sym('x'), sym('y'))],
    ['monod(DIP, kP)', call('monod', sym('DIP'), sym('kP'))],
    ['hill(x, k, n)', call('hill', sym('x'), sym('k'), sym('n'))],
    ['max(a, b, c, d)', call('max', sym('a'), sym('b'), sym('c'), sym('d'))],
    ['pow(x, 2)', call('pow', sym('x'), num(2))],
    ['cos(2*pi*t/year)', call('cos', bin('/', bin('*', bin('*', num(2), sym('pi')), sym('t')), sym('year')))],
    ['theta^(T - 20)', bin('^', sym('theta'), bin('-', sym('T'), num(20)))],
    ['x_1 * Y2', bin('*', sym('x_1'), sym('Y2'))]
  ])('%s', (source, ir) => {
    expect(parseExpression(source)).toEqual({ ok: true, ir });
  });

  it.each([
    'exp(x) * log(y) + log10(z) - sqrt(w)',
    'abs(x) + min(a, b) + max(a, b)',
    'sin(x) + cos(x) + tanh(x) + floor(x) + ceil(x)',
    'inhibit(x, k) * monod(y, k)',
    'e^x + pi'
  ])('every allowed function and constant: %s', (source) => {
    expect(parseExpression(source).ok).toBe(true);
  });

  it.each(['a - (b - c)', 'a / (b * c)', '(a + b) * c', '-(a + b)', '(-a)^2', 'a^(b^c)', '(a^b)^c', 'not (a and b)', 'a ? (b ? c : d) : f'])(
    'printIr(parse(%s)) parses back to the same tree',
    (source) => {
      const r = parseExpression(source);
      expect(r.ok).toBe(true);
      if (!r.ok) return;
      expect(parseExpression(printIr(r.ir))).toEqual(r);
    }
  );
});

describe('parseExpression(source) refuses what is not allowed, with a stable code', () => {
  it.each<[string, string]>([
    // syntax
    ['k * (X', 'syntax_error'],
    ['min(a, b,)', 'syntax_error'],
    ['', 'empty_expression'],
    ['   ', 'empty_expression'],
    // constructs
    ['a.b', 'forbidden_construct'],
    ['a[1]', 'forbidden_construct'],
    ['a?.b', 'forbidden_construct'],
    ['a.b(c)', 'forbidden_construct'],
    ['f(x) = x', 'forbidden_construct'],
    ['a = 2', 'forbidden_construct'],
    ['[1, 2]', 'forbidden_construct'],
    ['{a: 1}', 'forbidden_construct'],
    ['1:3', 'forbidden_construct'],
    ['a; b', 'forbidden_construct'],
    ['a\nb', 'forbidden_construct'],
    ['1 < x < 3', 'forbidden_construct'],
    ['"text"', 'forbidden_construct'],
    ["'text'", 'forbidden_construct'],
    ['NaN', 'forbidden_construct'],
    ['Infinity', 'forbidden_construct'],
    ['1e400', 'forbidden_construct'],
    ['true', 'forbidden_construct'],
    ['null', 'forbidden_construct'],
    ['undefined', 'forbidden_construct'],
    // operators mathjs has and the language does not
    ['a mod b', 'forbidden_operator'],
    ['a % b', 'forbidden_operator'],
    ['x to cm', 'forbidden_operator'],
    ['x in cm', 'forbidden_operator'],
    ["k'", 'forbidden_operator'],
    ['x!', 'forbidden_operator'],
    ['a xor b', 'forbidden_operator'],
    ['a & b', 'forbidden_operator'],
    ['a | b', 'forbidden_operator'],
    ['~a', 'forbidden_operator'],
    ['a << 1', 'forbidden_operator'],
    ['a >> 1', 'forbidden_operator'],
    ['a >>> 1', 'forbidden_operator'],
    ['a .* b', 'forbidden_operator'],
    ['a ./ b', 'forbidden_operator'],
    ['a .^ b', 'forbidden_operator'],
    ['a ?? b', 'forbidden_operator'],
    // implicit multiplication
    ['k1 Xa', 'implicit_multiplication'],
    ['2x', 'implicit_multiplication'],
    ['x 2', 'implicit_multiplication'],
    ['2 cm', 'implicit_multiplication'],
    ['2e', 'implicit_multiplication'],
    ['(a)(b)', 'implicit_multiplication'],
    ['2(x)', 'implicit_multiplication'],
    // functions
    ['foo(x)', 'unknown_function'],
    ['cbrt(x)', 'unknown_function'],
    ['sum(x)', 'unknown_function'],
    ['evaluate("1")', 'unknown_function'],
    ['import(x)', 'unknown_function'],
    ['constructor(x)', 'unknown_function'],
    ['__proto__(x)', 'unknown_function'],
    ['toString(x)', 'unknown_function'],
    ['hasOwnProperty(x)', 'unknown_function'],
    ['sqrt(x, 2)', 'wrong_arity'],
    ['exp()', 'wrong_arity'],
    ['min(x)', 'wrong_arity'],
    ['hill(x, k)', 'wrong_arity'],
    ['pow(x)', 'wrong_arity'],
    ['monod(x, k, n)', 'wrong_arity']
  ])('%j → %s', (source, code) => {
    const r = parseExpression(source);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.issues.length).toBeGreaterThan(0);
    expect(r.issues[0].code).toBe(code);
    for (const i of r.issues) expect(i.message.length).toBeGreaterThan(0);
  });

  it('a refused operator deep inside an allowed expression is still found', () => {
    const r = parseExpression('k * monod(X, kX) * (1 + max(a, b mod c))');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.issues.map((i) => i.code)).toEqual(['forbidden_operator']);
  });

  it('implicit multiplication names both factors', () => {
    const r = parseExpression('k1 Xa');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.issues[0].message).toContain('`k1`');
    expect(r.issues[0].message).toContain('`Xa`');
  });

  it('parseExpression(non-string) → empty_expression, no throw', () => {
    for (const v of [null, undefined, 42, {}, []]) {
      const r = parseExpression(v as unknown as string);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.issues[0].code).toBe('empty_expression');
    }
  });
});

describe('parseExpression(source) refuses what mathjs reads silently (regressions)', () => {
  it.each([
    ['50%', 'forbidden_operator'],
    ['k * 50%', 'forbidden_operator'],
    ['0x1F', 'forbidden_construct'],
    ['0b101 * k', 'forbidden_construct'],
    ['a # comment', 'forbidden_construct']
  ])('parseExpression(%j) is refused with %s', (source, code) => {
    const r = parseExpression(source);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues.map((i) => i.code)).toContain(code);
  });

  it('parseExpression("k1 (DIP + 1)") suggests writing * when the name is not a function', () => {
    const r = parseExpression('k1 (DIP + 1)');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues[0].message).toContain('k1 * (');
  });
});
