import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { cautionsOf, ensembleSummary, optionMeasures, yearChart } from './report-view';
import type { EnsembleRecord } from '$lib/archive/records';
import { wilsonInterval } from '$lib/engine/uncertainty/share';

const read = <T>(p: string) => JSON.parse(readFileSync(p, 'utf8')) as T;
const demo = read<ModelDoc>('static/examples/demo-lake.model.json');
const combined = read<ScenarioDoc>('static/examples/demo-lake.load-and-fish.scenario.json');
const baseline = read<ScenarioDoc>('static/examples/demo-lake.baseline.scenario.json');

describe('report: options in words', () => {
  it('lists each measure in words, the fish removal with its caution and both with their costs', () => {
    const ms = optionMeasures(combined, demo);
    expect(ms).toHaveLength(2);
    expect(ms[0].text).toMatch(/50 %/);
    expect(ms[0].costs[0]).toMatch(/^EUR 2,400,000/);
    expect(ms[1].text).toMatch(/^Remove 80 %/);
    expect(ms[1].caution).toMatch(/permit|licen/i);
    expect(ms[1].costs[0]).toMatch(/^EUR 210,000/);
  });

  it('a baseline has no measures and no cautions; cautions are listed once across options', () => {
    expect(optionMeasures(baseline, demo)).toEqual([]);
    const a = optionMeasures(combined, demo);
    expect(cautionsOf([a, a, []])).toHaveLength(a.filter((m) => m.caution).length);
  });
});

describe('report: yearly chart', () => {
  const line = (id: string, vals: [number, number][]) => ({ id, colour: '#000', dash: [4, 2], values: vals.map(([year, value]) => ({ year, value, days: 183 })) });

  it('puts the years across and values up from zero on a rounded scale, with the target line', () => {
    const c = yearChart([line('a', [[2030, 10], [2035, 40]]), line('b', [[2030, 20], [2035, 30]])], 25, { width: 256, height: 124 });
    // scale: max 40 rounds to 50; plot area 200 × 90 from (44, 10)
    expect(c.yTicks.map((t) => t.label)).toEqual(['0', '12.5', '25', '37.5', '50']);
    expect(c.paths[0].d).toBe('M44.0 82.0 L244.0 28.0');
    expect(c.paths[0].dash).toBe('4 2');
    expect(c.xTicks).toEqual([{ x: 44, label: '2030' }, { x: 244, label: '2035' }]);
    expect(c.target).toEqual({ y: 55, label: 'target 25' });
  });

  it('breaks a line at a year without a value and leaves out a target above the scale', () => {
    const c = yearChart([line('a', [[2030, 10], [2031, Number.NaN], [2032, 10]])], 1000);
    expect(c.paths[0].d.match(/M/g)).toHaveLength(2);
    expect(c.target).not.toBeNull();
    const none = yearChart([line('a', [[2030, 10]])], null);
    expect(none.target).toBeNull();
  });
});

describe('report: the spread from a stored ensemble', () => {
  const member = (j: number, base: number | null, option: number | null, closed = true) => ({
    member: j,
    runs: [base, option].map((v) => ({ status: 'ok' as const, closed, relativeResidual: 0, code: null, message: null, values: { 'chlorophyll.last': v }, series: null }))
  });
  // baseline 40, 42, …, 58; option 20, 21, …, 29; member 10 did not close (left out)
  const record = {
    id: 'ens_0000000000000001',
    modelDigest: 'sha256:m',
    scenarios: [
      { id: 'baseline', title: 'Baseline', digest: 'sha256:b' },
      { id: 'combined', title: 'Both measures', digest: 'sha256:c' }
    ],
    n: 12,
    seed: 5,
    completed: 11,
    partial: true,
    columns: [{ key: 'chlorophyll.last', role: 'chlorophyll', label: 'Growing-season chlorophyll-a', unit: 'ug/L', better: 'lower' }],
    members: [...Array.from({ length: 10 }, (_, j) => member(j, 40 + 2 * j, 20 + j)), member(10, 1, 1, false)],
    ranges: { source: 'calibration', calibration: 'cal_x', replaced: ['k'], values: {} }
  } as unknown as EnsembleRecord;
  const report = { modelDigest: 'sha256:m', options: [{ scenarioDigest: 'sha256:b' }, { scenarioDigest: 'sha256:c' }] };

  it('gives each shared option its median, 5–95 % (type 7) and the share meeting the target with its Wilson interval', () => {
    const s = ensembleSummary(record, report, 25)!;
    expect(s).toMatchObject({ id: 'ens_0000000000000001', n: 12, partial: true, direction: 'below', unit: 'ug/L', calibration: 'cal_x' });
    const [b, c] = s.lines;
    expect(b).toMatchObject({ title: 'Baseline', members: 10, p50: 49 });
    // Hyndman & Fan (1996) type 7: h = (10 − 1) × 0.05 = 0.45 → 40 + 0.45 × 2; Wilson (1927) for the interval
    expect(b.p05).toBeCloseTo(40.9, 12);
    expect(c.p50).toBe(24.5);
    expect(c.share).toMatchObject({ met: 6, n: 10 });
    expect(c.share!.low).toBe(wilsonInterval(6, 10).low);
    expect(b.share!.met).toBe(0);
  });

  it('is null for another model, for fewer than two options in common, or without the indicator', () => {
    expect(ensembleSummary(record, { ...report, modelDigest: 'sha256:other' }, null)).toBeNull();
    expect(ensembleSummary(record, { ...report, options: [{ scenarioDigest: 'sha256:b' }] }, null)).toBeNull();
    expect(ensembleSummary(record, report, null, 'secchi.last')).toBeNull();
    expect(ensembleSummary(record, report, null)!.lines[0].share).toBeNull();
  });
});
