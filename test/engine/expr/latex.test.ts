/**
 * latexOfIr(ir): the expression tree as LaTeX for KaTeX. The notation is the one written
 * at the top of src/lib/engine/expr/latex.ts: ids as whole italic words, `\frac` for
 * division, `\cdot` for products, braced powers, rate laws by name unless expanded.
 * Beyond the table, two properties: every expression of every example model typesets in
 * KaTeX without error, and the typeset form means the same as the expression (read back
 * into the expression language and evaluated at random values, it gives the same number).
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import katex from 'katex';
import { parseExpression } from '../../../src/lib/engine/expr/parse';
import { evaluateIr } from '../../../src/lib/engine/expr/evaluate';
import { symbolsOf, type Ir } from '../../../src/lib/engine/expr/ir';
import {
  escapeLatex,
  latexId,
  latexNumber,
  latexOfIr,
  latexText,
  rateLawDefinition,
  rateLawsIn
} from '../../../src/lib/engine/expr/latex';
import { analyzeModel } from '../../../src/lib/engine';

function ir(source: string): Ir {
  const r = parseExpression(source);
  if (!r.ok) throw new Error(`${source}: ${r.issues.map((i) => i.message).join('; ')}`);
  return r.ir;
}

const tex = (source: string, expanded = false) => latexOfIr(ir(source), { rateLaws: expanded ? 'expanded' : 'named' });
const render = (s: string) => katex.renderToString(s, { throwOnError: true });

describe('latexOfIr(ir) writes each construct in the documented notation', () => {
  it.each<[string, string]>([
    ['kDIP', '\\mathit{kDIP}'],
    ['k_DIP * x_1', '\\mathit{k\\_DIP} \\cdot \\mathit{x\\_1}'],
    ['A', '\\mathit{A}'],
    ['t', 't'],
    ['2 * pi * t', '2 \\cdot \\pi \\cdot t'],
    ['e^x', '{\\mathrm{e}}^{\\mathit{x}}'],
    ['a / b', '\\frac{\\mathit{a}}{\\mathit{b}}'],
    ['a * b / c', '\\frac{\\mathit{a} \\cdot \\mathit{b}}{\\mathit{c}}'],
    ['vs / z * X', '\\frac{\\mathit{vs}}{\\mathit{z}} \\cdot \\mathit{X}'],
    ['a / b / c', '\\frac{\\frac{\\mathit{a}}{\\mathit{b}}}{\\mathit{c}}'],
    ['a - b - c', '\\mathit{a} - \\mathit{b} - \\mathit{c}'],
    ['a - (b - c)', '\\mathit{a} - \\left(\\mathit{b} - \\mathit{c}\\right)'],
    ['a - (b + c)', '\\mathit{a} - \\left(\\mathit{b} + \\mathit{c}\\right)'],
    ['a + (b + c)', '\\mathit{a} + \\mathit{b} + \\mathit{c}'],
    ['(a + b) * c', '\\left(\\mathit{a} + \\mathit{b}\\right) \\cdot \\mathit{c}'],
    ['a * -b', '\\mathit{a} \\cdot \\left(-\\mathit{b}\\right)'],
    ['a + -b', '\\mathit{a} + \\left(-\\mathit{b}\\right)'],
    ['-a * b', '-\\mathit{a} \\cdot \\mathit{b}'],
    ['-(a + b)', '-\\left(\\mathit{a} + \\mathit{b}\\right)'],
    ['-x^2', '-{\\mathit{x}}^{2}'],
    ['(-x)^2', '{\\left(-\\mathit{x}\\right)}^{2}'],
    ['theta^(T - Tref)', '{\\mathit{theta}}^{\\mathit{T} - \\mathit{Tref}}'],
    ['a^b^c', '{\\mathit{a}}^{{\\mathit{b}}^{\\mathit{c}}}'],
    ['(a^b)^c', '{\\left({\\mathit{a}}^{\\mathit{b}}\\right)}^{\\mathit{c}}'],
    ['(a / b)^2', '{\\left(\\frac{\\mathit{a}}{\\mathit{b}}\\right)}^{2}'],
    ['pow(x, 3)', '{\\mathit{x}}^{3}'],
    ['exp(-k * t)', '\\exp\\left(-\\mathit{k} \\cdot t\\right)'],
    ['exp(x)^2', '{\\left(\\exp\\left(\\mathit{x}\\right)\\right)}^{2}'],
    ['log(x)', '\\ln\\left(\\mathit{x}\\right)'],
    ['log10(x)', '\\log_{10}\\left(\\mathit{x}\\right)'],
    ['sqrt(tau)', '\\sqrt{\\mathit{tau}}'],
    ['sqrt(x)^3', '{\\sqrt{\\mathit{x}}}^{3}'],
    ['abs(x - y)', '\\left|\\mathit{x} - \\mathit{y}\\right|'],
    ['floor(x) + ceil(y)', '\\left\\lfloor \\mathit{x} \\right\\rfloor + \\left\\lceil \\mathit{y} \\right\\rceil'],
    ['min(a, b, c)', '\\min\\left(\\mathit{a}, \\mathit{b}, \\mathit{c}\\right)'],
    ['max(0, x)', '\\max\\left(0, \\mathit{x}\\right)'],
    ['cos(2 * pi * t / year)', '\\cos\\left(\\frac{2 \\cdot \\pi \\cdot t}{\\mathit{year}}\\right)'],
    ['sin(x) * tanh(y)', '\\sin\\left(\\mathit{x}\\right) \\cdot \\tanh\\left(\\mathit{y}\\right)'],
    ['monod(DIP, kDIP)', '\\operatorname{monod}\\left(\\mathit{DIP}, \\mathit{kDIP}\\right)'],
    ['hill(B, kB, 2)', '\\operatorname{hill}\\left(\\mathit{B}, \\mathit{kB}, 2\\right)'],
    ['x > 1 ? a : b', '\\begin{cases} \\mathit{a} & \\text{if } \\mathit{x} > 1 \\\\ \\mathit{b} & \\text{otherwise} \\end{cases}'],
    [
      'x < 1 ? a : x < 2 ? b : c',
      '\\begin{cases} \\mathit{a} & \\text{if } \\mathit{x} < 1 \\\\ \\mathit{b} & \\text{if } \\mathit{x} < 2 \\\\ \\mathit{c} & \\text{otherwise} \\end{cases}'
    ],
    ['k * (x > 0 ? x : 0)', '\\mathit{k} \\cdot \\left(\\begin{cases} \\mathit{x} & \\text{if } \\mathit{x} > 0 \\\\ 0 & \\text{otherwise} \\end{cases}\\right)'],
    ['x <= y and not z', '\\mathit{x} \\leq \\mathit{y} \\land \\lnot \\mathit{z}'],
    ['x >= y or x != z', '\\mathit{x} \\geq \\mathit{y} \\lor \\mathit{x} \\neq \\mathit{z}'],
    ['x == y', '\\mathit{x} = \\mathit{y}'],
    ['1.5e-7 * x', '1.5 \\times 10^{-7} \\cdot \\mathit{x}'],
    ['1e-9', '10^{-9}'],
    ['0.05 * x', '0.05 \\cdot \\mathit{x}']
  ])('%s → %s', (source, expected) => {
    expect(tex(source)).toBe(expected);
  });
});

describe("latexOfIr(ir, { rateLaws: 'expanded' }) writes rate laws as their defining fractions", () => {
  it.each<[string, string]>([
    ['monod(DIP, kDIP)', '\\frac{\\mathit{DIP}}{\\mathit{kDIP} + \\mathit{DIP}}'],
    ['inhibit(VEG, kV)', '\\frac{\\mathit{kV}}{\\mathit{kV} + \\mathit{VEG}}'],
    ['hill(B, kB, 2)', '\\frac{{\\mathit{B}}^{2}}{{\\mathit{kB}}^{2} + {\\mathit{B}}^{2}}'],
    ['mu * monod(S, k) * X', '\\mathit{mu} \\cdot \\frac{\\mathit{S}}{\\mathit{k} + \\mathit{S}} \\cdot \\mathit{X}']
  ])('%s → %s', (source, expected) => {
    expect(tex(source, true)).toBe(expected);
  });
});

describe('latexOfIr(ir, { symbol }) lets the caller write chosen symbols otherwise', () => {
  it('replaces only the symbols the function answers for', () => {
    const s = latexOfIr(ir('load + release'), { symbol: (n) => (n === 'load' ? latexText('External load') : undefined) });
    expect(s).toBe('\\text{External load} + \\mathit{release}');
  });
});

describe('escaping and the small writers', () => {
  it('escapeLatex(text) escapes every character TeX gives a meaning', () => {
    expect(escapeLatex('a_b {c} 50% #1 $2 & ~ ^ \\')).toBe(
      'a\\_b \\{c\\} 50\\% \\#1 \\$2 \\& \\textasciitilde{} \\textasciicircum{} \\textbackslash{}'
    );
  });
  it('latexText(label) typesets in KaTeX whatever the label holds', () => {
    const s = latexText('P_in {50%} & #2 ~ ^ \\ $');
    expect(() => render(s)).not.toThrow();
    // KaTeX writes the spaces of \text as no-break spaces.
    const mathml = katex.renderToString(s, { output: 'mathml' }).replace(/\u00a0/g, ' ');
    expect(mathml).toContain('<mtext>P_in {50%} &amp; #2 ~</mtext>');
    expect(mathml).toContain('<mtext> \\</mtext>');
  });
  it('latexId(id) keeps an id one word; t, pi and e are the time and the constants', () => {
    expect([latexId('SEDinert'), latexId('k_1'), latexId('t'), latexId('pi'), latexId('e')]).toEqual([
      '\\mathit{SEDinert}',
      '\\mathit{k\\_1}',
      't',
      '\\pi',
      '\\mathrm{e}'
    ]);
  });
  it('latexNumber(v) writes powers of ten for exponent notation only', () => {
    expect([latexNumber(0.001), latexNumber(3.8e6), latexNumber(2.5e-12), latexNumber(1e21)]).toEqual([
      '0.001',
      '3800000',
      '2.5 \\times 10^{-12}',
      '10^{21}'
    ]);
  });
  it('rateLawDefinition(name) gives the definition line, null for other names', () => {
    expect(rateLawDefinition('monod')).toBe('\\operatorname{monod}\\left(x, k\\right) = \\frac{x}{k + x}');
    expect(rateLawDefinition('inhibit')).toBe('\\operatorname{inhibit}\\left(x, k\\right) = \\frac{k}{k + x}');
    expect(rateLawDefinition('hill')).toBe('\\operatorname{hill}\\left(x, k, n\\right) = \\frac{{x}^{n}}{{k}^{n} + {x}^{n}}');
    expect(rateLawDefinition('exp')).toBeNull();
    for (const f of ['monod', 'inhibit', 'hill']) expect(() => render(rateLawDefinition(f)!)).not.toThrow();
  });
  it('rateLawsIn(ir) finds the rate laws a tree calls, nested ones too', () => {
    expect([...rateLawsIn(ir('mu * monod(S, k) * inhibit(hill(B, kB, 2), kI) + exp(x)'))].sort()).toEqual(['hill', 'inhibit', 'monod']);
    expect(rateLawsIn(ir('a * b')).size).toBe(0);
  });
});

// ---- reading the LaTeX back (the subset latexOfIr writes, with rate laws expanded)

/** Turns latexOfIr's output back into the expression language, so it can be evaluated. */
function readBack(s: string): string {
  let i = 0;
  const group = (): string => {
    if (s[i] !== '{') throw new Error(`expected { at ${i} in ${s}`);
    i++;
    const inner = seq('}');
    i++;
    return `(${inner})`;
  };
  const seq = (end: string | null): string => {
    let out = '';
    while (i < s.length && s[i] !== end) {
      const rest = s.slice(i);
      const word = /^\\([A-Za-z]+)/.exec(rest);
      if (rest.startsWith('\\left(')) (out += '('), (i += 6);
      else if (rest.startsWith('\\right)')) (out += ')'), (i += 7);
      else if (rest.startsWith('\\left|')) (out += 'abs('), (i += 6);
      else if (rest.startsWith('\\right|')) (out += ')'), (i += 7);
      else if (rest.startsWith('\\log_{10}')) (out += 'log10'), (i += 9);
      else if (rest.startsWith('\\_')) (out += '_'), (i += 2);
      else if (word) {
        i += word[0].length;
        const w = word[1];
        if (w === 'frac') {
          const a = group();
          const b = group();
          out += `(${a} / ${b})`;
        } else if (w === 'sqrt') out += `sqrt${group()}`;
        else if (w === 'mathit' || w === 'mathrm' || w === 'operatorname') out += seq_group();
        else if (w === 'cdot' || w === 'times') out += ' * ';
        else if (w === 'pi') out += 'pi';
        else if (w === 'ln') out += 'log';
        else if (['exp', 'sin', 'cos', 'tanh', 'min', 'max'].includes(w)) out += w;
        else throw new Error(`cannot read \\${w} back`);
      } else if (s[i] === '{') out += group();
      else (out += s[i]), i++;
    }
    return out;
  };
  const seq_group = (): string => {
    i++;
    const inner = seq('}');
    i++;
    return inner;
  };
  return seq(null);
}

function sameValue(source: Ir, label: string): void {
  const tx = latexOfIr(source, { rateLaws: 'expanded' });
  const back = parseExpression(readBack(tx));
  if (!back.ok) throw new Error(`${label}: ${tx} read back as ${readBack(tx)}: ${back.issues[0].message}`);
  const names = [...symbolsOf(source)];
  for (let k = 0; k < 3; k++) {
    const env = new Map(names.map((n, j) => [n, 0.5 + ((j * 7 + k * 13) % 10) / 6]));
    const want = evaluateIr(source, (n) => env.get(n) ?? NaN);
    const got = evaluateIr(back.ir, (n) => env.get(n) ?? NaN);
    expect(Math.abs(got - want), `${label}: ${tx}`).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(want)));
  }
}

describe('the typeset form means the same expression (read back and evaluated)', () => {
  it.each([
    'a - (b - c)',
    'a / (b / c) - a / b / c',
    '(a + b)^2 - a^b^c + (a^b)^c',
    '-(a + b) * c - -a * b',
    'a * -b + a - -b',
    'theta^(T - 20) * exp(-k * t)',
    'sqrt(x)^3 / log10(y + 1) + log(z)',
    'min(a, b, c) - max(a * 2, b / 3)',
    'monod(S, k) * inhibit(V, kV) + hill(B, kB, 2)',
    '1.5e-7 * x + 2 * (3 * y)',
    'cos(2 * pi * (t - tMax) / year)'
  ])('%s', (source) => sameValue(ir(source), source));
});

// ---- every example model

const dir = join(process.cwd(), 'static', 'examples');
const examples = readdirSync(dir).filter((f) => f.endsWith('.model.json'));

describe('every expression of every example model typesets in KaTeX (throwOnError: true)', () => {
  it('there are example models to check', () => {
    expect(examples.length).toBeGreaterThanOrEqual(3);
  });
  for (const file of examples) {
    it(`${file}: rates, derived quantities, forcings and sizes, named and expanded, mean what they say`, () => {
      const a = analyzeModel(JSON.parse(readFileSync(join(dir, file), 'utf8'))).model;
      expect(a, `${file} is a valid model`).toBeDefined();
      const trees: [string, Ir][] = [
        ...a!.flows.map((f): [string, Ir] => [`flow ${f.id}`, f.ir]),
        ...a!.derived.map((d): [string, Ir] => [`derived ${d.id}`, d.ir]),
        ...a!.forcings.filter((f) => f.ir).map((f): [string, Ir] => [`forcing ${f.id}`, f.ir!]),
        ...a!.states.map((s): [string, Ir] => [`size of ${s.id}`, s.sizeIr])
      ];
      expect(trees.length).toBeGreaterThan(0);
      for (const [label, tree] of trees) {
        for (const rateLaws of ['named', 'expanded'] as const) {
          const s = latexOfIr(tree, { rateLaws });
          expect(() => render(s), `${label}: ${s}`).not.toThrow();
        }
        sameValue(tree, `${file} ${label}`);
      }
    });
  }
});
