import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import { morris } from '$lib/engine/uncertainty/morris';
import { createEngineHost } from '$lib/worker/engine-host';
import type { FromWorker } from '$lib/worker/protocol';
import { PROTOCOL_VERSION } from '$lib/worker/protocol';
import { describeMorris, indicatorChoices, morrisBarConfig, morrisDelta, morrisRows, morrisRuns, parseMorris, rankRows } from './morris-view';

// two uniform inputs on [0, 2] and [0, 1]; the indicator is a constant series f(a, b)
const model = {
  format: 'lakeledger.model/1',
  id: 'toy',
  parameters: [
    { id: 'a', value: 1, unit: '1', range: { min: 0, max: 2 } },
    { id: 'b', value: 0.5, unit: '1', range: { min: 0, max: 1 } },
    { id: 'c', value: 1, unit: '1' }
  ],
  states: [],
  derived: [{ id: 'Chl', role: 'chlorophyll', report: true, unit: 'ug/L', expression: 'a' }]
} as unknown as ModelDoc;
const f = (a: number, b: number) => 3 * a + 10 * b * b + a * b;
const days = Array.from({ length: 6 * 365 + 2 }, (_, d) => d);
const runOf = (a: number, b: number) =>
  ({ status: 'ok', start: '2020-01-01', times: days, series: { Chl: days.map(() => f(a, b)) }, units: { Chl: 'ug/L' }, closure: { ok: true, relativeResidual: 0, tolerance: 1e-6 } }) as unknown as RunDoc;

function screen(trajectoryLists: number[][]) {
  const sent: FromWorker[] = [];
  const handle = createEngineHost({
    simulate: () => ({}) as RunDoc,
    post: (m) => sent.push(m),
    ensemble: { sample: () => ({ members: [], sampled: { parameters: [], states: [] } }), prepare: () => ({ ok: true, run: (d) => runOf(d.parameters.a, d.parameters.b) }) }
  });
  trajectoryLists.forEach((trajectories, i) =>
    handle({ v: PROTOCOL_VERSION, type: 'morris', requestId: `m${i}`, model, scenario: { id: 's' } as unknown as ScenarioDoc, indicator: 'chlorophyll.last', r: 6, p: 4, seed: 9, trajectories })
  );
  return sent;
}

describe('Morris through the engine host, joined by morrisRows', () => {
  it('gives the engine morris() measures, also when the trajectories are split over two workers', () => {
    const sent = screen([[0, 2, 4], [1, 3, 5]]);
    const effects = new Map<number, (number | null)[]>();
    for (const m of sent) if (m.type === 'morrisTrajectory') effects.set(m.trajectory, m.effects);
    const result = sent.find((m) => m.type === 'morrisResult' && 'inputs' in m);
    if (!result || result.type !== 'morrisResult' || !('inputs' in result)) throw new Error('no result');
    expect(result.inputs).toEqual([{ kind: 'parameter', id: 'a' }, { kind: 'parameter', id: 'b' }]);
    expect(result.delta).toBeCloseTo(2 / 3, 15);
    const rows = morrisRows(effects, result.inputs);
    // the engine on the unit cube: a = 2x0, b = x1
    const ref = morris((x) => f(2 * x[0], x[1]), 2, { trajectories: 6, levels: 4, seed: 9 });
    rows.forEach((r, i) => {
      expect(r.n).toBe(6);
      expect(r.mu).toBeCloseTo(ref.effects[i].mu, 6);
      expect(r.muStar).toBeCloseTo(ref.effects[i].muStar, 6);
      expect(r.sigma).toBeCloseTo(ref.effects[i].sigma, 6);
    });
    // b (curved, 10b² over [0, 1]) against a (3·2 = 6 per unit, plus the interaction)
    expect(rankRows(rows).map((r) => r.id)).toEqual(ref.effects[0].muStar > ref.effects[1].muStar ? ['a', 'b'] : ['b', 'a']);
  });

  it('leaves out effects whose runs failed, and counts them', () => {
    const rows = morrisRows(new Map([[0, [1, null]], [1, [-3, 2]]]), [{ kind: 'parameter', id: 'a' }, { kind: 'state', id: 'S' }]);
    expect(rows[0]).toMatchObject({ n: 2, mu: -1, muStar: 2 });
    expect(rows[0].sigma).toBeCloseTo(Math.sqrt(8), 12);
    expect(rows[1]).toMatchObject({ n: 1, mu: 2, muStar: 2 });
    expect(rows[1].sigma).toBeNaN();
    expect(morrisRuns(10, 61)).toBe(620);
  });

  it('ranks by μ*, charts the first ones and says the ranking in words', () => {
    const rows = morrisRows(new Map([[0, [1, 5, null]]]), [{ kind: 'parameter', id: 'a' }, { kind: 'parameter', id: 'b' }, { kind: 'state', id: 'S' }]);
    const ranked = rankRows(rows);
    expect(ranked.map((r) => r.id)).toEqual(['b', 'a', 'S']);
    const c = morrisBarConfig(ranked, 'ug/L', 2);
    expect(c.data.labels).toEqual(['b', 'a']);
    expect(c.data.datasets.map((d) => d.data)).toEqual([[5, 1], [0, 0]]);
    expect(c.options?.indexAxis).toBe('y');
    expect(describeMorris(ranked)).toBe('Inputs ranked by μ*: 1. b (μ* 5, σ –), 2. a (μ* 1, σ –).');
  });
});

describe('indicatorChoices, morrisDelta and parseMorris', () => {
  it('offers the roles the model reports, with units, and checks the settings', () => {
    expect(indicatorChoices(model)).toEqual([{ key: 'chlorophyll.last', label: 'Chlorophyll-a, growing-season mean, last 5 years', unit: 'ug/L' }]);
    expect(morrisDelta(4)).toBeCloseTo(2 / 3, 15);
    expect(parseMorris('10', '4', '1')).toEqual({ r: 10, p: 4, seed: 1 });
    expect(parseMorris('1', '4', '1')).toMatch(/Trajectories/);
    expect(parseMorris('10', '5', '1')).toMatch(/even/);
    expect(parseMorris('10', '4', '')).toMatch(/Seed/);
  });
});
