/**
 * `lakeledger ensemble` on the demo lake (baseline and half load, a 3-year period so the
 * file runs quickly): the lakeledger.ensemble/1 fields, one thread against worker threads,
 * the seed, exit codes 0, 1 and 2.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { memoryCli } from './memory-cli';
import { wilsonInterval } from '../../src/lib/engine/uncertainty/share';

const read = (p: string) => readFileSync(new URL(p, import.meta.url), 'utf8');
const shorten = (text: string) => {
  const s = JSON.parse(text);
  s.period.end = '2030-01-01';
  return JSON.stringify(s);
};
const demo = read('../../static/examples/demo-lake.model.json');
const base = shorten(read('../../static/examples/demo-lake.baseline.scenario.json'));
const halfLoad = shorten(read('../../static/examples/demo-lake.half-load.scenario.json'));

/** A one-box lake whose loss rate is not finite for k < 0.02: the members drawn there fail. */
const fragile = {
  format: 'lakeledger.model/1',
  id: 'fragile',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [
    { id: 'V', value: 1e6, unit: 'm^3' },
    { id: 'L', value: 1, unit: 'mg/m^3/d' },
    { id: 'k', value: 0.03, unit: '1/d', range: { min: 0.01, max: 0.05 } },
    { id: 'one', value: 1, unit: '1/d' }
  ],
  states: [{ id: 'P', unit: 'mg/m^3', initial: 50, size: 'V' }],
  flows: [
    { id: 'load', to: 'P', rate: 'L' },
    { id: 'loss', from: 'P', rate: 'sqrt((k - 0.02 * one) * one) * P' }
  ]
};
const fragileScenario = { format: 'lakeledger.scenario/1', id: 'baseline', model: 'fragile', period: { start: '2027-01-01', end: '2028-01-01', outputStep: 1 } };

const cli = (args: string[]) =>
  memoryCli(
    {
      'demo.json': demo,
      'base.json': base,
      'half.json': halfLoad,
      'fragile.json': JSON.stringify(fragile),
      'fragile-base.json': JSON.stringify(fragileScenario),
      'bare.json': JSON.stringify({ ...fragile, parameters: fragile.parameters.map(({ range: _r, ...p }) => p) })
    },
    () => performance.now()
  )(args);

/** The written text without its timing field (the last one). */
const untimed = (text: string) => {
  const i = text.indexOf('\n "timing"');
  expect(i).toBeGreaterThan(0);
  return text.slice(0, i);
};

describe('lakeledger ensemble', () => {
  const args = ['ensemble', 'demo.json', 'base.json', 'half.json', '--n', '6', '--seed', '17', '--out', 'e.json'];
  const one = cli([...args, '--threads', '1']);
  const two = cli([...args, '--threads', '2']);

  it('writes format, seed, n and per scenario id, closed, failed and series summaries (exit 0)', () => {
    expect(one.code, one.err).toBe(0);
    const doc = JSON.parse(one.files.get('e.json')!);
    expect(doc).toMatchObject({ format: 'lakeledger.ensemble/1', seed: 17, n: 6, partial: false, completed: 6 });
    expect(Object.keys(doc).slice(0, 4)).toEqual(['format', 'seed', 'n', 'scenarios']);
    expect(doc.scenarios.map((s: { id: string; closed: number; failed: number }) => [s.id, s.closed, s.failed])).toEqual([
      ['baseline', 6, 0],
      ['half_load', 6, 0]
    ]);
    const chl = doc.scenarios[0].series.Chl;
    expect(Object.keys(chl)).toEqual(['mean', 'p05', 'p25', 'p50', 'p75', 'p95']);
    expect(chl.p05).toBeLessThanOrEqual(chl.p25);
    expect(chl.p25).toBeLessThanOrEqual(chl.p50);
    expect(chl.p50).toBeLessThanOrEqual(chl.p75);
    expect(chl.p75).toBeLessThanOrEqual(chl.p95);
    for (const id of ['DIP', 'SED', 'BFI', 'TP', 'Secchi']) expect(doc.scenarios[1].series[id]).toBeDefined();
    expect(doc.timing.threads).toBe(1);
  });

  it('worker threads give the same file as one thread, byte for byte apart from timing', () => {
    expect(two.code, two.err).toBe(0);
    expect(JSON.parse(two.files.get('e.json')!).timing.threads).toBe(2);
    expect(untimed(two.files.get('e.json')!)).toBe(untimed(one.files.get('e.json')!));
  });

  it('--meet: the share of parameter sets at most the median is 4 of 7 (type-7 median of 7 values is the 4th), with its Wilson interval', () => {
    const plain = cli(['ensemble', 'demo.json', 'base.json', '--n', '7', '--seed', '5', '--threads', '1', '--out', 'p.json']);
    expect(plain.code, plain.err).toBe(0);
    const p50 = JSON.parse(plain.files.get('p.json')!).scenarios[0].series.Chl.p50;
    const sec = JSON.parse(plain.files.get('p.json')!).scenarios[0].series.Secchi.p95;
    const r = cli(['ensemble', 'demo.json', 'base.json', '--n', '7', '--seed', '5', '--threads', '1', '--meet', `Chl<=${p50},Secchi>=${sec}`, '--out', 'm.json']);
    expect(r.code, r.err).toBe(0);
    const m = JSON.parse(r.files.get('m.json')!).scenarios[0].meeting;
    const w = wilsonInterval(4, 7);
    expect(m.Chl).toEqual({ limit: p50, direction: 'at_most', members: 7, met: 4, share: 4 / 7, low: w.low, high: w.high });
    // p95 of 7 by type 7 lies between the 6th and 7th values: only the largest is at least it
    expect(m.Secchi).toMatchObject({ direction: 'at_least', members: 7, met: 1 });
    expect(r.err).toMatch(/baseline: Chl ≤ .* in 4 of 7 parameter sets \(57 %, 95 % interval/);
    // the summaries themselves are unchanged by asking for shares
    expect(JSON.parse(r.files.get('m.json')!).scenarios[0].series).toEqual(JSON.parse(plain.files.get('p.json')!).scenarios[0].series);
  });

  it('--meet refuses an unknown series and a malformed target (exit 2)', () => {
    expect(cli(['ensemble', 'demo.json', 'base.json', '--n', '3', '--seed', '1', '--meet', 'Nope<=3']).err).toMatch(/--meet: 'Nope' is not a state or reported series/);
    const bad = cli(['ensemble', 'demo.json', 'base.json', '--n', '3', '--seed', '1', '--meet', 'Chl=3']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--meet: 'Chl=3' is not ID<=LIMIT or ID>=LIMIT/);
  });

  it('the same seed gives the same file; another seed another', () => {
    const again = cli([...args, '--threads', '1']);
    expect(untimed(again.files.get('e.json')!)).toBe(untimed(one.files.get('e.json')!));
    const other = cli(['ensemble', 'demo.json', 'base.json', '--n', '6', '--seed', '18', '--threads', '1', '--out', 'e.json']);
    expect(JSON.parse(other.files.get('e.json')!).scenarios[0].series.Chl).not.toEqual(JSON.parse(one.files.get('e.json')!).scenarios[0].series.Chl);
  });

  it('exits 1 when members fail, still writing the file with them counted and listed', () => {
    const r = cli(['ensemble', 'fragile.json', 'fragile-base.json', '--n', '8', '--seed', '3', '--threads', '1', '--out', 'f.json']);
    expect(r.code).toBe(1);
    const doc = JSON.parse(r.files.get('f.json')!);
    const s = doc.scenarios[0];
    expect(s.failed).toBeGreaterThan(0);
    expect(s.closed + s.failed).toBe(8);
    expect(s.problems).toHaveLength(s.failed);
    expect(r.err).toMatch(/member \d+ failed/);
  });

  it.each([
    [['ensemble', 'demo.json', 'base.json', '--seed', '1'], '--n'],
    [['ensemble', 'demo.json', 'base.json', '--n', '0', '--seed', '1'], '--n'],
    [['ensemble', 'demo.json', 'base.json', '--n', 'ten', '--seed', '1'], "'ten'"],
    [['ensemble', 'demo.json', 'base.json', '--n', '5'], '--seed'],
    [['ensemble', 'demo.json', 'base.json', '--n', '5', '--seed', '-3'], '--seed'],
    [['ensemble', 'demo.json', '--n', '5', '--seed', '1'], 'SCENARIO'],
    [['ensemble', 'demo.json', 'nope.json', '--n', '5', '--seed', '1'], 'nope.json'],
    [['ensemble', 'demo.json', 'fragile-base.json', '--n', '5', '--seed', '1'], 'fragile-base.json'],
    [['ensemble', 'bare.json', 'fragile-base.json', '--n', '5', '--seed', '1'], 'nothing_to_sample'],
    [['ensemble', 'demo.json', 'base.json', 'base.json', '--n', '5', '--seed', '1'], 'duplicate_scenario']
  ])('refuses bad usage or input with exit 2 and a message naming the item (%j)', (argv, word) => {
    const r = cli(argv as string[]);
    expect(r.code).toBe(2);
    expect(r.err).toContain(word as string);
    expect(r.err).not.toMatch(/\n\s+at /);
    expect(r.files.has('e.json')).toBe(false);
  });
});
