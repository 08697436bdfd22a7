/**
 * balancesView(analysed) and identityCheck(analysed): what the Balances screen shows, as
 * data. The two-box model is the invented one of test/engine/balance/mass-balances.test.ts:
 * water in mg/m^3 over V, sediment in g/m^2 over A, so settling arrives in the sediment
 * multiplied by (V / A) · 1e-3 (mg → g, per volume → per area).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import katex from 'katex';
import { analyzeModel, evaluateIr, type AnalyzedModel, type Ir, type ModelDoc } from '$lib/engine';
import { parseExpression } from '$lib/engine/expr/parse';
import { balancesView, identityCheck, NO_ZONE, perDay, sizeRatio, unitLatex } from './balance-view';

function parseOk(source: string): Ir {
  const r = parseExpression(source);
  if (!r.ok) throw new Error(`${source}: ${r.issues[0].message}`);
  return r.ir;
}

function twoBox(): ModelDoc {
  return {
    format: 'lakeledger.model/1',
    id: 'two_box',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 4e6, unit: 'm^3' },
      { id: 'A', value: 1e6, unit: 'm^2' },
      { id: 'Q', value: 1e4, unit: 'm^3/d' },
      { id: 'Pin', value: 80, unit: 'mg/m^3' },
      { id: 'vs', value: 0.05, unit: 'm/d' },
      { id: 'z', value: 4, unit: 'm' },
      { id: 'kr', value: 0.002, unit: '1/d' },
      { id: 'kb', value: 0.0005, unit: '1/d' },
      { id: 'kS', value: 1, unit: 'g/m^2' }
    ],
    states: [
      { id: 'WAT', unit: 'mg/m^3', initial: 50, size: 'V', zone: 'water', label: 'Lake water P' },
      { id: 'SED', unit: 'g/m^2', initial: 2, size: 'A' }
    ],
    flows: [
      { id: 'load', to: 'WAT', rate: 'Q / V * Pin', label: 'River load' },
      { id: 'flush', from: 'WAT', rate: 'Q / V * WAT' },
      { id: 'settling', from: 'WAT', to: 'SED', rate: 'vs / z * WAT' },
      { id: 'release', from: 'SED', to: 'WAT', rate: 'kr * monod(SED, kS) * SED' },
      { id: 'burial', from: 'SED', rate: 'kb * SED' }
    ]
  };
}

const analysed = (m: ModelDoc): AnalyzedModel => {
  const a = analyzeModel(m).model;
  if (!a) throw new Error(`invalid test model: ${JSON.stringify(analyzeModel(m).problems)}`);
  return a;
};
const render = (s: string) => katex.renderToString(`\\displaystyle ${s}`, { throwOnError: true });

describe('balancesView(two-box model)', () => {
  const v = balancesView(analysed(twoBox()));
  const [water, sed] = v.zones.flatMap((z) => z.states);

  it('groups states by zone in document order; a state without a zone goes under "no zone"', () => {
    expect(v.zones.map((z) => [z.zone, z.states.map((s) => s.id)])).toEqual([
      ['water', ['WAT']],
      [NO_ZONE, ['SED']]
    ]);
  });

  it('writes dX/dt = inflows − outflows, with the conversion factor typeset on an arriving flow', () => {
    expect(sed.equationTex).toBe(
      '\\frac{\\mathrm{d}\\mathit{SED}}{\\mathrm{d}t} = {\\mathit{settling} \\cdot \\frac{\\mathit{V}}{\\mathit{A}} \\cdot 0.001} - \\mathit{release} - \\mathit{burial}'
    );
    expect(water.equationTex).toBe(
      '\\frac{\\mathrm{d}\\mathit{WAT}}{\\mathrm{d}t} = \\mathit{load} + {\\mathit{release} \\cdot \\frac{\\mathit{A}}{\\mathit{V}} \\cdot 1000} - \\mathit{flush} - \\mathit{settling}'
    );
  });

  it("gives each balance its unit per day and the engine's plain-text equation as its alternative", () => {
    expect([water.balanceUnit, sed.balanceUnit]).toEqual(['mg/m^3/d', 'g/m^2/d']);
    expect(sed.unitTex).toBe('\\left[\\mathrm{g}/\\mathrm{m}^{2}/\\mathrm{d}\\right]');
    expect(sed.equationText).toBe('dSED/dt = settling · (V / A) · 0.001 − release − burial, in g/m^2/d');
  });

  it("gives every term its rate as LaTeX and as written, in the unit of the state it leaves", () => {
    const settling = sed.terms.find((t) => t.flow === 'settling')!;
    expect(settling).toMatchObject({
      sign: 1,
      other: 'WAT',
      rateText: 'vs / z * WAT',
      rateTex: '\\frac{\\mathit{vs}}{\\mathit{z}} \\cdot \\mathit{WAT}',
      rateUnit: 'mg/m^3/d',
      factorText: '(V / A) · 0.001'
    });
    expect(Math.abs(settling.factor - 0.004)).toBeLessThan(1e-15);
    const load = water.terms.find((t) => t.flow === 'load')!;
    expect([load.other, load.rateUnit, load.factorTex]).toEqual(['outside', 'mg/m^3/d', '']);
  });

  it('names terms by label where asked and where a label exists, by id otherwise', () => {
    const byLabel = balancesView(analysed(twoBox()), { names: 'label' });
    expect(byLabel.zones[0].states[0].equationTex).toContain('\\text{River load} + {\\mathit{release}');
    expect(byLabel.zones[0].states[0].equationText).toBe('dWAT/dt = River load + release · (A / V) · 1000 − flush − settling, in mg/m^3/d');
  });

  it('keeps rate laws by name unless asked to expand them, and lists the ones used', () => {
    expect(sed.terms.find((t) => t.flow === 'release')!.rateTex).toContain('\\operatorname{monod}');
    const expanded = balancesView(analysed(twoBox()), { rateLaws: 'expanded' });
    const release = expanded.zones[1].states[0].terms.find((t) => t.flow === 'release')!;
    expect(release.rateTex).toBe('\\mathit{kr} \\cdot \\frac{\\mathit{SED}}{\\mathit{kS} + \\mathit{SED}} \\cdot \\mathit{SED}');
    expect(v.rateLaws).toEqual(['monod']);
  });

  it('the identity: imports minus exports as masses, internal flows listed as cancelling', () => {
    expect(v.identity.tex).toBe(
      '\\sum_{x} m_{x} \\, \\frac{\\mathrm{d}x}{\\mathrm{d}t} = {m_{\\mathit{WAT}} \\cdot \\mathit{load}} - {m_{\\mathit{WAT}} \\cdot \\mathit{flush}} - {m_{\\mathit{SED}} \\cdot \\mathit{burial}}'
    );
    expect(v.identity.imports).toEqual([{ flow: 'load', label: 'River load', state: 'WAT' }]);
    expect(v.identity.exports.map((f) => [f.flow, f.state])).toEqual([
      ['flush', 'WAT'],
      ['burial', 'SED']
    ]);
    expect(v.identity.internal.map((f) => `${f.flow}:${f.from}>${f.to}`)).toEqual(['settling:WAT>SED', 'release:SED>WAT']);
    expect(v.identity.excluded).toEqual([]);
  });

  it('everything it typesets renders in KaTeX', () => {
    for (const s of [water, sed]) {
      expect(() => render(`${s.equationTex} \\qquad ${s.unitTex}`)).not.toThrow();
      for (const t of s.terms) expect(() => render(`${t.rateTex}`)).not.toThrow();
    }
    expect(() => render(v.identity.tex)).not.toThrow();
  });
});

describe('identityCheck(analysed) says in words how well the identity holds at random states', () => {
  it('two-box model: holds, with the number of states and the worst gap', () => {
    const c = identityCheck(analysed(twoBox()));
    expect(c.holds).toBe(true);
    expect(c.samples).toBe(5);
    expect(c.words).toMatch(/^holds (exactly )?at 5 random states( to \de-\d+)?$/);
    expect(c.worst!).toBeLessThanOrEqual(1e-10);
  });
});

describe('balancesView(demo lake)', () => {
  const demo = JSON.parse(readFileSync(join(process.cwd(), 'static', 'examples', 'demo-lake.model.json'), 'utf8')) as ModelDoc;
  const v = balancesView(analysed(demo));
  const states = v.zones.flatMap((z) => z.states);

  it('has one balance per state, nine in four zones', () => {
    expect(states.map((s) => s.id)).toEqual(['DIP', 'PHY', 'ZOO', 'DET', 'BFI', 'PFI', 'VEG', 'SED', 'SEDinert']);
    expect(v.zones.map((z) => z.zone)).toEqual(['water', 'biota', 'plants', 'sediment']);
  });

  it('every balance, rate and factor typesets in KaTeX, with ids and labels', () => {
    for (const names of ['id', 'label'] as const) {
      for (const s of balancesView(analysed(demo), { names }).zones.flatMap((z) => z.states)) {
        expect(() => render(`${s.equationTex} \\qquad ${s.unitTex}`), s.id).not.toThrow();
        for (const t of s.terms) {
          expect(() => render(t.rateTex), t.flow).not.toThrow();
          if (t.factorTex) expect(() => render(t.factorTex), t.flow).not.toThrow();
        }
      }
    }
  });

  it('settling from the water (mg/m^3 over A·zMean) into the sediment (g/m^2 over A) carries its factor', () => {
    const sed = states.find((s) => s.id === 'SED')!;
    const t = sed.terms.find((x) => x.flow === 'detSettle')!;
    // A · zMean over A: the common A cancels.
    expect(t.factorTex).toBe('\\mathit{zMean} \\cdot 0.001');
    expect(t.factorText).toBe('zMean · 0.001');
    const dip = states.find((s) => s.id === 'DIP')!;
    const release = dip.terms.find((x) => x.flow === 'release')!;
    expect([release.factorTex, release.factorText]).toEqual(['\\frac{1}{\\mathit{zMean}} \\cdot 1000', '(1 / zMean) · 1000']);
    expect(dip.equationText).toContain('+ release · (1 / zMean) · 1000 +');
  });

  it('the factor it writes is the factor the engine uses (massBalances)', () => {
    const a = analysed(demo);
    const pv = new Map(a.parameters.map((p) => [p.id, p.value]));
    for (const s of states) {
      for (const t of s.terms) {
        if (!t.factorText) continue;
        const value = evaluateIr(parseOk(t.factorText.replace(/·/g, '*')), (n) => pv.get(n) ?? NaN);
        expect(Math.abs(value - t.factor) / t.factor, `${s.id} ${t.flow}: ${t.factorText}`).toBeLessThan(1e-5);
      }
    }
  });
});

describe('sizeRatio(from, to) cancels common factors of two sizes', () => {
  it.each([
    ['A * zMean', 'A', 'zMean', '\\mathit{zMean}'],
    ['A', 'A * zMean', '(1 / zMean)', '\\frac{1}{\\mathit{zMean}}'],
    ['V', 'A', '(V / A)', '\\frac{\\mathit{V}}{\\mathit{A}}'],
    ['2 * A * h', 'A * w', '(2 * h / w)', '\\frac{2 \\cdot \\mathit{h}}{\\mathit{w}}'],
    ['A + B', 'C', '((A + B) / C)', '\\frac{\\mathit{A} + \\mathit{B}}{\\mathit{C}}']
  ])('%s over %s is %s', (from, to, text, tex) => {
    expect(sizeRatio(parseOk(from), parseOk(to))).toEqual({ text, tex });
  });
  it('is null for equal sizes', () => {
    expect(sizeRatio(parseOk('A * z'), parseOk('A * z'))).toBeNull();
    expect(sizeRatio(parseOk('A + z'), parseOk('A + z'))).toBeNull();
  });
});

describe('unit writers', () => {
  it.each([
    ['mg/m^3/d', '\\mathrm{mg}/\\mathrm{m}^{3}/\\mathrm{d}'],
    ['1/d', '1/\\mathrm{d}'],
    ['kg/d', '\\mathrm{kg}/\\mathrm{d}'],
    ['m^2 * d', '\\mathrm{m}^{2} \\cdot \\mathrm{d}'],
    ['W/m^2', '\\mathrm{W}/\\mathrm{m}^{2}']
  ])('unitLatex(%s)', (unit, tex) => {
    expect(unitLatex(unit)).toBe(tex);
  });
  it('perDay(unit) appends /d; a dimensionless state is per day', () => {
    expect([perDay('mg/m^3'), perDay('g/m^2'), perDay('1')]).toEqual(['mg/m^3/d', 'g/m^2/d', '1/d']);
  });
});
