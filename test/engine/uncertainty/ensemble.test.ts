/**
 * Ensembles over scenarios with common random numbers. The lake is one well-mixed box,
 * dP/dt = L − k·P (from memory: the one-box mass balance; its steady state is P* = L/k and
 * it approaches it with time constant 1/k), so every member's last-five-year mean is known
 * from its own draws to within the remaining transient.
 */
import { describe, expect, it } from 'vitest';
import { runEnsemble, runMembers, joinMembers, ensembleDocument, ENSEMBLE_FORMAT } from '../../../src/lib/engine/uncertainty/ensemble';
import { sampleModel } from '../../../src/lib/engine/uncertainty/lhs';
import { percentile } from '../../../src/lib/engine/uncertainty/summaries';
import { windowStartDay, timeMeanFrom } from '../../../src/lib/engine/uncertainty/window';
import type { ModelDoc, ScenarioDoc } from '../../../src/lib/engine/index';

const model: ModelDoc = {
  format: 'lakeledger.model/1',
  id: 'one_box',
  timeOrigin: '2027-01-01',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [
    { id: 'V', value: 1e6, unit: 'm^3' },
    { id: 'L', value: 1, unit: 'mg/m^3/d', range: { min: 0.5, max: 2, distribution: 'loguniform' } },
    { id: 'k', value: 0.02, unit: '1/d', range: { min: 0.01, max: 0.04, distribution: 'triangular' } }
  ],
  states: [{ id: 'P', unit: 'mg/m^3', initial: 50, size: 'V', initialRange: { min: 20, max: 80 } }],
  derived: [{ id: 'P2', expression: '2 * P', unit: 'mg/m^3', report: true }],
  flows: [
    { id: 'load', to: 'P', rate: 'L' },
    { id: 'loss', from: 'P', rate: 'k * P' }
  ]
};
const period = { start: '2027-01-01', end: '2037-01-01', outputStep: 1 };
const baseline: ScenarioDoc = { format: 'lakeledger.scenario/1', id: 'baseline', model: 'one_box', period };
const half: ScenarioDoc = {
  format: 'lakeledger.scenario/1',
  id: 'half',
  model: 'one_box',
  period,
  measures: [{ id: 'cut', kind: 'scale', target: 'L', factor: 0.5, from: '2027-01-01' }]
};

describe('the last-five-year window', () => {
  it('starts five calendar years before the end; a shorter period is taken whole', () => {
    // 2032-01-01 is 1826 days after 2027-01-01 (2028 is a leap year)
    expect(windowStartDay(baseline)).toBe(1826);
    expect(windowStartDay({ period: { start: '2027-01-01', end: '2029-01-01' } })).toBe(0);
  });
  it('is a trapezoidal time mean', () => {
    expect(timeMeanFrom([0, 1, 2, 4], [9, 1, 3, 5], 1)).toBeCloseTo((2 + 8) / 3, 14);
  });
});

describe('runEnsemble', () => {
  const n = 24;
  const seed = 99;
  const doc = runEnsemble(model, [baseline, half], { n, seed });
  const sample = sampleModel(model, n, seed);

  it('writes the lakeledger.ensemble/1 fields, every member closed', () => {
    expect(doc.format).toBe(ENSEMBLE_FORMAT);
    expect(doc).toMatchObject({ seed, n, completed: n, partial: false });
    expect(doc.sampled).toEqual({ parameters: ['L', 'k'], states: ['P'] });
    expect(doc.scenarios.map((s) => [s.id, s.closed, s.failed])).toEqual([
      ['baseline', n, 0],
      ['half', n, 0]
    ]);
    expect(Object.keys(doc.scenarios[0].series)).toEqual(['P', 'P2']);
  });

  it('summarises each member near its own steady state L/k (percentiles of the draws)', () => {
    const steady = sample.members.map((m) => m.parameters.L / m.parameters.k);
    const s = doc.scenarios[0].series.P;
    // slowest member: k = 0.01/d over 1826 days before the window, transient e^-18 of the start
    expect(s.p50).toBeCloseTo(percentile(steady, 0.5), 4);
    expect(s.p05).toBeCloseTo(percentile(steady, 0.05), 4);
    expect(s.p95).toBeCloseTo(percentile(steady, 0.95), 4);
    expect(doc.scenarios[0].series.P2.p50).toBeCloseTo(2 * s.p50, 10);
  });

  it('uses the same draws in every scenario: halving the load halves each member, so the paired difference is −½ of the baseline', () => {
    const b = doc.scenarios[0].series.P;
    const v = doc.scenarios[1].versus!;
    expect(v.scenario).toBe('baseline');
    expect(v.members).toBe(n);
    expect(v.series.P.p50).toBeCloseTo(-0.5 * b.p50, 4);
    expect(v.series.P.p95).toBeCloseTo(-0.5 * b.p05, 4);
    expect(doc.scenarios[1].series.P.mean).toBeCloseTo(0.5 * b.mean, 4);
  });

  it('the same seed gives the same document; slices run apart and joined give it too', () => {
    expect(runEnsemble(model, [baseline, half], { n, seed })).toEqual(doc);
    const a = runMembers(model, [baseline, half], sample.members.slice(0, 10), { offset: 0 });
    const c = runMembers(model, [baseline, half], sample.members.slice(10), { offset: 10 });
    expect(ensembleDocument(model, sample, joinMembers([a, c]))).toEqual(doc);
  });

  it('reports progress and stops on cancel, marked partial, with the same members in every scenario', () => {
    const signal = { aborted: false };
    const seen: number[] = [];
    const part = runEnsemble(model, [baseline, half], {
      n: 10,
      seed: 1,
      signal,
      onProgress: ({ done, total }) => {
        seen.push(done);
        expect(total).toBe(10);
        if (done === 3) signal.aborted = true;
      }
    });
    expect(seen).toEqual([1, 2, 3]);
    expect(part.partial).toBe(true);
    expect(part.completed).toBe(3);
    expect(part.scenarios.map((s) => s.closed)).toEqual([3, 3]);
  });
});

describe('failed members are counted and listed, never dropped silently', () => {
  it('a rate that is not finite for k < 0.02 fails exactly those members', () => {
    const fragile: ModelDoc = {
      ...model,
      parameters: [
        { id: 'V', value: 1e6, unit: 'm^3' },
        { id: 'L', value: 1, unit: 'mg/m^3/d' },
        { id: 'k', value: 0.03, unit: '1/d', range: { min: 0.01, max: 0.05 } },
        { id: 'one', value: 1, unit: '1/d' }
      ],
      states: [{ id: 'P', unit: 'mg/m^3', initial: 50, size: 'V' }],
      derived: [],
      flows: [
        { id: 'load', to: 'P', rate: 'L' },
        { id: 'loss', from: 'P', rate: 'sqrt((k - 0.02 * one) * one) * P' }
      ]
    };
    const short = { ...baseline, model: 'one_box', period: { start: '2027-01-01', end: '2028-01-01', outputStep: 1 } };
    const n = 12;
    const d = runEnsemble(fragile, [short], { n, seed: 4 });
    const bad = sampleModel(fragile, n, 4)
      .members.map((m, j) => [m.parameters.k, j] as const)
      .filter(([k]) => k < 0.02)
      .map(([, j]) => j);
    expect(bad.length).toBeGreaterThan(0);
    const s = d.scenarios[0];
    expect(s.failed).toBe(bad.length);
    expect(s.closed).toBe(n - bad.length);
    expect(s.problems.map((p) => p.member)).toEqual(bad);
    expect(s.problems.every((p) => p.status === 'failed' && p.code.length > 0)).toBe(true);
  });
});
