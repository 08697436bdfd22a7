/**
 * Writes an expression tree as LaTeX for KaTeX (the Balances screen typesets rates with it).
 *
 * Notation (the rules the tests hold it to):
 * - Every declared id is written as one italic word, `\mathit{kDIP}`, with `_` escaped
 *   (`k_DIP` → `\mathit{k\_DIP}`). An id is never split into a letter and a subscript, so
 *   what is typeset reads exactly as the id the model declares; `t` is `t`, `pi` is `\pi`,
 *   `e` is an upright `\mathrm{e}`.
 * - `a * b` is `a \cdot b`; `a / b` is `\frac{a}{b}`; `a ^ b` is `a^{b}` (the base in
 *   parentheses unless it is an id, a number or a delimited function).
 * - `exp` → `\exp`, `log` → `\ln`, `log10` → `\log_{10}`, `sqrt` → `\sqrt{}`, `abs` → `|x|`,
 *   `floor`/`ceil` → `⌊x⌋`/`⌈x⌉`, `min`/`max`/`sin`/`cos`/`tanh` their operator names.
 * - The rate laws (`monod`, `inhibit`, `hill`) keep their names by default,
 *   `\operatorname{monod}(x, k)`, so a rate reads like the rate the model declares;
 *   `rateLaws: 'expanded'` writes their defining fractions instead, and
 *   `rateLawDefinition(name)` gives the definition line for a key under the equations.
 * - `c ? a : b` is `\begin{cases} a & \text{if } c \\ b & \text{otherwise} \end{cases}`;
 *   nested conditionals in the `otherwise` branch become further rows.
 * - Numbers are written as JavaScript prints them, with `e-7` as `\times 10^{-7}`.
 */
import type { Ir } from './ir';
import { expandRateLaws } from './functions';

export interface LatexOptions {
  /** `named` (default): `\operatorname{monod}(x, k)`; `expanded`: `\frac{x}{k + x}`. */
  rateLaws?: 'named' | 'expanded';
  /** Writes a symbol otherwise than `\mathit{id}` (return undefined for the default). */
  symbol?: (name: string) => string | undefined;
}

/** The rate laws that keep their name in `named` mode. */
export const RATE_LAWS: readonly string[] = ['monod', 'inhibit', 'hill'];

/** Precedence of the top of a written term: higher binds tighter. */
const P = { cond: 0, or: 1, and: 2, cmp: 3, add: 4, mul: 5, unary: 6, pow: 7, atom: 9 } as const;

interface Tex {
  s: string;
  p: number;
  /** The term is a fraction (needs parentheses as the base of a power). */
  frac?: boolean;
  /** The term starts with a unary minus (parenthesised as a right operand). */
  neg?: boolean;
  /** The term is a function call written `\name(…)`: parenthesised as the base of a power. */
  fnCall?: boolean;
}

const CMP: Readonly<Record<string, string>> = { '<': '<', '<=': '\\leq', '>': '>', '>=': '\\geq', '==': '=', '!=': '\\neq' };

const NAMED_FN: Readonly<Record<string, string>> = Object.assign(Object.create(null), {
  exp: '\\exp',
  log: '\\ln',
  log10: '\\log_{10}',
  sin: '\\sin',
  cos: '\\cos',
  tanh: '\\tanh',
  min: '\\min',
  max: '\\max'
});

const TEXT_ESCAPES: Readonly<Record<string, string>> = {
  '\\': '\\textbackslash{}',
  '{': '\\{',
  '}': '\\}',
  _: '\\_',
  '^': '\\textasciicircum{}',
  '~': '\\textasciitilde{}',
  '#': '\\#',
  $: '\\$',
  '%': '\\%',
  '&': '\\&'
};

/** Escapes free text (a label) for `\text{…}` or `\mathit{…}`. */
export function escapeLatex(s: string): string {
  return s.replace(/[\\{}_^~#$%&]/g, (c) => TEXT_ESCAPES[c]);
}

/** Free text (a label, a word) as LaTeX: `\text{Phytoplankton uptake}`. */
export function latexText(s: string): string {
  return `\\text{${escapeLatex(s)}}`;
}

/** A declared id as LaTeX: one italic word, `\mathit{kDIP}`. */
export function latexId(id: string): string {
  if (id === 't') return 't';
  if (id === 'pi') return '\\pi';
  if (id === 'e') return '\\mathrm{e}';
  return `\\mathit{${escapeLatex(id)}}`;
}

/** A number as LaTeX: `0.05`, `1.5 \times 10^{-7}`, `10^{6}`. */
export function latexNumber(v: number): string {
  return number(v).s;
}

function number(v: number): Tex {
  const s = String(v);
  const m = /^(-?[\d.]+)e([+-]\d+)$/.exec(s);
  if (!m) return { s, p: P.atom };
  const exp = String(Number(m[2]));
  if (m[1] === '1') return { s: `10^{${exp}}`, p: P.pow };
  return { s: `${m[1]} \\times 10^{${exp}}`, p: P.mul };
}

const paren = (s: string) => `\\left(${s}\\right)`;

/** Writes `ir` as LaTeX (see the notation at the top of this file). */
export function latexOfIr(ir: Ir, options: LatexOptions = {}): string {
  const named = (options.rateLaws ?? 'named') === 'named';
  const sym = (name: string) => options.symbol?.(name) ?? latexId(name);

  /** `t` written as an operand that must bind at least as tightly as `min`. */
  const operand = (t: Tex, min: number, rightSide = false): string =>
    t.p < min || (rightSide && t.neg) ? paren(t.s) : t.s;

  const go = (n: Ir): Tex => {
    switch (n.k) {
      case 'num':
        return number(n.v);
      case 'sym':
        return { s: sym(n.name), p: P.atom };
      case 'un': {
        const a = go(n.a);
        if (n.op === 'not') return { s: `\\lnot ${operand(a, P.unary, true)}`, p: P.unary };
        return { s: `-${operand(a, P.unary, true)}`, p: P.unary, neg: true };
      }
      case 'cond':
        return { s: cases(n), p: P.cond };
      case 'call':
        return call(n.fn, n.args);
      case 'bin':
        return binary(n.op, n.a, n.b);
    }
  };

  const binary = (op: string, an: Ir, bn: Ir): Tex => {
    if (op === '/') return { s: `\\frac{${go(an).s}}{${go(bn).s}}`, p: P.atom, frac: true };
    const a = go(an);
    const b = go(bn);
    if (op === '^') return power(a, b);
    if (op === '+') return { s: `${operand(a, P.add)} + ${operand(b, P.add, true)}`, p: P.add, neg: a.neg && a.p >= P.add };
    // `-` is left-associative: a − (b − c) keeps its parentheses.
    if (op === '-') return { s: `${operand(a, P.add)} - ${operand(b, P.add + 1, true)}`, p: P.add, neg: a.neg && a.p >= P.add };
    if (op === '*') return { s: `${operand(a, P.mul)} \\cdot ${operand(b, P.mul, true)}`, p: P.mul, neg: a.neg && a.p >= P.mul };
    if (op === 'and') return { s: `${operand(a, P.and)} \\land ${operand(b, P.and, true)}`, p: P.and };
    if (op === 'or') return { s: `${operand(a, P.or)} \\lor ${operand(b, P.or, true)}`, p: P.or };
    return { s: `${operand(a, P.cmp + 1)} ${CMP[op]} ${operand(b, P.cmp + 1, true)}`, p: P.cmp };
  };

  const power = (a: Tex, b: Tex): Tex => {
    const base = a.p === P.atom && !a.frac && !a.fnCall ? a.s : paren(a.s);
    return { s: `{${base}}^{${b.s}}`, p: P.pow };
  };

  const call = (fn: string, argIrs: Ir[]): Tex => {
    if (RATE_LAWS.includes(fn)) {
      if (!named) return go(expandRateLaws({ k: 'call', fn, args: argIrs }));
      return { s: `\\operatorname{${fn}}${paren(argIrs.map((x) => go(x).s).join(', '))}`, p: P.atom, fnCall: true };
    }
    if (fn === 'pow') return power(go(argIrs[0]), go(argIrs[1]));
    const args = argIrs.map((x) => go(x).s);
    switch (fn) {
      case 'sqrt':
        return { s: `\\sqrt{${args[0]}}`, p: P.atom };
      case 'abs':
        return { s: `\\left|${args[0]}\\right|`, p: P.atom };
      case 'floor':
        return { s: `\\left\\lfloor ${args[0]} \\right\\rfloor`, p: P.atom };
      case 'ceil':
        return { s: `\\left\\lceil ${args[0]} \\right\\rceil`, p: P.atom };
    }
    const name = NAMED_FN[fn] ?? `\\operatorname{${escapeLatex(fn)}}`;
    return { s: `${name}${paren(args.join(', '))}`, p: P.atom, fnCall: true };
  };

  const cases = (n: Extract<Ir, { k: 'cond' }>): string => {
    const rows: string[] = [];
    let cur: Ir = n;
    while (cur.k === 'cond') {
      rows.push(`${go(cur.a).s} & \\text{if } ${go(cur.c).s}`);
      cur = cur.b;
    }
    rows.push(`${go(cur).s} & \\text{otherwise}`);
    return `\\begin{cases} ${rows.join(' \\\\ ')} \\end{cases}`;
  };

  return go(ir).s;
}

/** Rate laws a tree calls (for the key of definitions under the equations). */
export function rateLawsIn(ir: Ir, out: Set<string> = new Set()): Set<string> {
  switch (ir.k) {
    case 'call':
      if (RATE_LAWS.includes(ir.fn)) out.add(ir.fn);
      for (const a of ir.args) rateLawsIn(a, out);
      break;
    case 'bin':
      rateLawsIn(ir.a, out);
      rateLawsIn(ir.b, out);
      break;
    case 'un':
      rateLawsIn(ir.a, out);
      break;
    case 'cond':
      rateLawsIn(ir.c, out);
      rateLawsIn(ir.a, out);
      rateLawsIn(ir.b, out);
      break;
  }
  return out;
}

const LAW_ARGS: Readonly<Record<string, string[]>> = { monod: ['x', 'k'], inhibit: ['x', 'k'], hill: ['x', 'k', 'n'] };

/** `\operatorname{monod}(x, k) = \frac{x}{k + x}`, or null for a name that is no rate law. */
export function rateLawDefinition(fn: string): string | null {
  const params = LAW_ARGS[fn];
  if (!params) return null;
  const call: Ir = { k: 'call', fn, args: params.map((name) => ({ k: 'sym', name })) };
  const plain = (name: string) => name;
  return `${latexOfIr(call, { symbol: plain })} = ${latexOfIr(call, { rateLaws: 'expanded', symbol: plain })}`;
}
