/**
 * Every shipped example runs through the command line with closure ok, and the demo lake
 * shows the behaviour it was built for (static/examples/README.md):
 * - the baseline sits turbid (summer chlorophyll-a well above 40 ug/L);
 * - fish removal alone clears the lake for a few years and then relapses, as restored
 *   shallow lakes often did 5–10 years after biomanipulation (Søndergaard et al. 2007,
 *   J. Appl. Ecol. 44: 1095–1105; Søndergaard et al. 2017, Water 9: 43);
 * - fish removal with the external load halved lasts;
 * - the same load holds a clear state when the lake starts clear (alternative stable
 *   states: Scheffer et al. 1993, Trends Ecol. Evol. 8: 275–279).
 * Summer = June to August, common practice for shallow-lake indicators.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { main, type Io } from '../../src/cli/main';
import { simulate, type ModelDoc, type RunDoc, type ScenarioDoc } from '../../src/lib/engine';

const dir = join(process.cwd(), 'static', 'examples');
const read = <T>(name: string): T => JSON.parse(readFileSync(join(dir, name), 'utf8')) as T;

function cli(args: string[]): { code: number; out: string; err: string } {
  let out = '';
  let err = '';
  const io: Io = {
    out: (t) => (out += t + '\n'),
    err: (t) => (err += t + '\n'),
    readFile: (p) => readFileSync(p, 'utf8'),
    writeFile: () => {
      throw new Error('not in this test');
    },
    now: () => new Date('2027-01-01T00:00:00Z'),
    clock: () => 0
  };
  const code = main(args, io);
  return { code, out, err };
}

const models = readdirSync(dir).filter((f) => f.endsWith('.model.json'));
const demoScenarios = readdirSync(dir).filter((f) => f.startsWith('demo-lake.') && f.endsWith('.scenario.json'));

describe('the shipped examples through the command line', () => {
  it('there are three example models and four demo scenarios', () => {
    expect(models.length).toBe(3);
    expect(demoScenarios.length).toBe(4);
  });

  it.each(models)('run %s (no scenario: a 20-year baseline) exits 0 with closure ok', (file) => {
    const r = cli(['run', join(dir, file)]);
    expect(r.code, r.err).toBe(0);
    const run = JSON.parse(r.out) as RunDoc;
    expect(run.status).toBe('ok');
    expect(run.closure.ok).toBe(true);
  });

  it.each(demoScenarios)('run demo-lake.model.json %s exits 0 with closure ok and never leaves odex', (file) => {
    const r = cli(['run', join(dir, 'demo-lake.model.json'), join(dir, file)]);
    expect(r.code, r.err).toBe(0);
    const run = JSON.parse(r.out) as RunDoc;
    expect(run.closure.ok).toBe(true);
    expect(run.closure.relativeResidual).toBeLessThan(1e-12);
    expect(run.solver.switchedAt).toBeNull();
    expect(run.warnings).toEqual([]);
  });

  it.each(models)('equations %s prints one balance per state', (file) => {
    const r = cli(['equations', join(dir, file)]);
    expect(r.code, r.err).toBe(0);
    const model = read<ModelDoc>(file);
    for (const s of model.states) expect(r.out).toContain(`d${s.id}/dt =`);
  });
});

/** Summer (June–August) mean of a series, per calendar year. */
function summerMeans(run: RunDoc, id: string): Map<number, number> {
  const start = Date.parse(`${run.start}T00:00:00Z`);
  const sums = new Map<number, { s: number; n: number }>();
  run.times.forEach((t, k) => {
    const d = new Date(start + t * 86400000);
    const m = d.getUTCMonth();
    if (m < 5 || m > 7) return;
    const y = d.getUTCFullYear();
    const e = sums.get(y) ?? { s: 0, n: 0 };
    e.s += run.series[id][k];
    e.n++;
    sums.set(y, e);
  });
  return new Map([...sums].map(([y, e]) => [y, e.s / e.n]));
}

describe('the demo lake behaves as designed', () => {
  const model = read<ModelDoc>('demo-lake.model.json');
  const chlId = model.derived!.find((d) => d.role === 'chlorophyll')!.id;
  const runOf = (name: string) => simulate(model, read<ScenarioDoc>(`demo-lake.${name}.scenario.json`));
  const base = summerMeans(runOf('baseline'), chlId);
  const fish = summerMeans(runOf('fish-removal'), chlId);
  const both = summerMeans(runOf('load-and-fish'), chlId);
  const years = (m: Map<number, number>, from: number, to: number) => [...m].filter(([y]) => y >= from && y <= to).map(([, v]) => v);

  it('the baseline is turbid every summer (mean chlorophyll-a above 40 ug/L)', () => {
    expect(Math.min(...base.values())).toBeGreaterThan(40);
  });

  it('fish removal alone clears the lake within two years (summer chlorophyll-a below 30 ug/L)', () => {
    expect(Math.min(...years(fish, 2029, 2031))).toBeLessThan(30);
  });

  it('fish removal alone relapses: turbid again (above 40 ug/L) from 2036 on', () => {
    expect(Math.min(...years(fish, 2036, 2046))).toBeGreaterThan(40);
  });

  it('fish removal with the load halved lasts: clear (below 30 ug/L) every summer 2031–2046', () => {
    expect(Math.max(...years(both, 2031, 2046))).toBeLessThan(30);
  });

  it('the baseline load also holds a clear state when the lake starts clear (bistability)', () => {
    const sc = read<ScenarioDoc>('demo-lake.baseline.scenario.json');
    const veg = model.states.find((s) => s.id === 'VEG');
    expect(veg).toBeDefined();
    const clear = simulate(model, sc, { initial: { VEG: 0.8, BFI: 40, PFI: 30, PHY: 5, DET: 5 } });
    expect(clear.status).toBe('ok');
    const chl = summerMeans(clear, chlId);
    expect(Math.max(...years(chl, 2030, 2046))).toBeLessThan(30);
  });
});

describe('indicators and budget of the demo runs', () => {
  const model = read<ModelDoc>('demo-lake.model.json');
  const role = (r: string) => model.derived!.find((d) => d.role === r)!.id;
  const run = (name: string) => simulate(model, read<ScenarioDoc>(`demo-lake.${name}.scenario.json`));
  const base = run('baseline');
  const both = run('load-and-fish');

  it('the yearly budgets add up to the closure (imports − exports = storage change, every year)', () => {
    for (const r of [base, both]) {
      let imp = 0;
      let exp = 0;
      for (const y of r.budget) {
        imp += y.imported;
        exp += y.exported;
        expect(Math.abs(y.residual)).toBeLessThan(1e-9 * Math.max(y.imported, y.exported, 1));
      }
      expect(imp).toBeCloseTo(r.closure.imported, 6);
      expect(exp).toBeCloseTo(r.closure.exported, 6);
      expect(r.budget.reduce((a, y) => a + y.storageChange, 0)).toBeCloseTo(r.closure.finalMass - r.closure.initialMass, 6);
    }
  });

  it('load cut and fish removal give a lower growing-season chlorophyll-a (April–September) than the baseline in every year from 2029', async () => {
    const { seasonalMeans, toDaily } = await import('../../src/lib/engine');
    const chl = role('chlorophyll');
    const b = seasonalMeans(toDaily(base.start, base.times, base.series[chl]));
    const c = seasonalMeans(toDaily(both.start, both.times, both.series[chl]));
    for (let i = 0; i < b.length; i++) if (b[i].year >= 2029) expect(c[i].value).toBeLessThan(b[i].value);
  });
});
