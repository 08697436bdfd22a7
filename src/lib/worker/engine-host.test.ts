import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import { createEngineHost, thinned, type SimulateFn } from './engine-host';
import { PROTOCOL_VERSION, isFromWorker, type FromWorker } from './protocol';

const model = { format: 'lakeledger.model/1', id: 'tiny' } as unknown as ModelDoc;
const fakeRun = (status: RunDoc['status']) => ({ format: 'lakeledger.run/1', id: 'r', status }) as unknown as RunDoc;

function host(simulate: SimulateFn, clock: () => number = () => 0) {
  const sent: FromWorker[] = [];
  const handle = createEngineHost({ simulate, post: (m) => sent.push(m), now: clock, progressIntervalMs: 100 });
  return { handle, sent };
}

describe('createEngineHost', () => {
  it('answers a run with throttled progress and the result, all well-formed', () => {
    let clock = 0;
    const { handle, sent } = host((_m, _s, { onProgress }) => {
      for (let day = 0; day <= 100; day += 10) {
        clock = day * 5; // 50 ms of engine time per 10 days
        onProgress({ fraction: day / 100, day });
      }
      return fakeRun('ok');
    }, () => clock);

    handle({ v: PROTOCOL_VERSION, type: 'run', requestId: 'q1', model });

    expect(sent.every(isFromWorker)).toBe(true);
    expect(sent.map((m) => (m.type === 'progress' ? m.day : m.type))).toEqual([0, 20, 40, 60, 80, 100, 'result']);
    const last = sent.at(-1)!;
    expect(last.type === 'result' && last.requestId === 'q1' && last.run.status).toBe('ok');
  });

  it('gives the engine an AbortSignal that a cancel for the same id aborts', () => {
    let seen: AbortSignal | undefined;
    const { handle, sent } = host((_m, _s, { signal, onProgress }) => {
      seen = signal;
      // A cancel arriving while the run is on (as an engine that yields would allow).
      onProgress({ fraction: 0.5, day: 1 });
      handle({ v: PROTOCOL_VERSION, type: 'cancel', requestId: 'other' });
      expect(signal.aborted).toBe(false);
      handle({ v: PROTOCOL_VERSION, type: 'cancel', requestId: 'q2' });
      return fakeRun(signal.aborted ? 'cancelled' : 'ok');
    });

    handle({ v: PROTOCOL_VERSION, type: 'run', requestId: 'q2', model });

    expect(seen?.aborted).toBe(true);
    const last = sent.at(-1)!;
    expect(last.type === 'result' && last.run.status).toBe('cancelled');
  });

  it('turns an exception in the engine into an engine_exception error for that request', () => {
    const { handle, sent } = host(() => {
      throw new Error('boom');
    });
    handle({ v: PROTOCOL_VERSION, type: 'run', requestId: 'q3', model });
    expect(sent).toEqual([
      { v: PROTOCOL_VERSION, type: 'error', requestId: 'q3', code: 'engine_exception', message: 'boom' }
    ]);
  });

  it('refuses another protocol version with bad_message naming both versions', () => {
    const { handle, sent } = host(() => fakeRun('ok'));
    handle({ v: 2, type: 'run', requestId: 'q4', model });
    expect(sent).toHaveLength(1);
    const [m] = sent;
    expect(m.type === 'error' && [m.code, m.requestId]).toEqual(['bad_message', 'q4']);
    expect(m.type === 'error' && m.message).toMatch(/version 2 .*supported: 1/);
  });

  it('refuses a malformed message without an id with requestId null', () => {
    const { handle, sent } = host(() => fakeRun('ok'));
    handle('hello');
    expect(sent).toHaveLength(1);
    expect(sent[0].type === 'error' && [sent[0].code, sent[0].requestId]).toEqual(['bad_message', null]);
  });
});

describe('createEngineHost, long runs', () => {
  const settings = { target: 'Pin', from: 100, to: 300, steps: 3, indicator: 'Chl' };
  const cycle = { format: 'lakeledger.run/1', status: 'ok', units: { Chl: 'ug/L' }, series: { Chl: [1, 2], P: [3, 4] } } as unknown as RunDoc;

  it('answers a sweep with one progress message per long run and the document', () => {
    const sent: FromWorker[] = [];
    let signal: unknown;
    const handle = createEngineHost({
      simulate: () => fakeRun('ok'),
      post: (m) => sent.push(m),
      sweep: (_m, o) => {
        signal = o.settle?.signal;
        for (let k = 1; k <= 3; k++) o.onProgress?.({ done: k, total: 3 });
        return { format: 'lakeledger.sweep/1', target: o.target, values: [o.from, o.to] } as never;
      }
    });
    handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's1', model, settings });
    expect(sent.every(isFromWorker)).toBe(true);
    expect(sent.map((m) => (m.type === 'sweepProgress' ? m.done : m.type))).toEqual([1, 2, 3, 'sweepResult']);
    const last = sent.at(-1)!;
    expect(last.type === 'sweepResult' && 'sweep' in last && last.sweep.values).toEqual([100, 300]);
    expect(signal).toBeInstanceOf(AbortSignal);
  });

  it('turns an input error with a code into a sweepResult problem, and any other exception into engine_exception', () => {
    const sent: FromWorker[] = [];
    let fail: Error = Object.assign(new Error("no parameter or forcing 'X'"), { code: 'unknown_target' });
    const handle = createEngineHost({ simulate: () => fakeRun('ok'), post: (m) => sent.push(m), sweep: () => { throw fail; } });
    handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's2', model, settings });
    fail = new Error('boom');
    handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's3', model, settings });
    expect(sent).toEqual([
      { v: PROTOCOL_VERSION, type: 'sweepResult', requestId: 's2', problem: { code: 'unknown_target', message: "no parameter or forcing 'X'" } },
      { v: PROTOCOL_VERSION, type: 'error', requestId: 's3', code: 'engine_exception', message: 'boom' }
    ]);
  });

  it('answers a settle with the outcome and each series\' season mean; refuses long runs it has no engine for', () => {
    const sent: FromWorker[] = [];
    const handle = createEngineHost({
      simulate: () => fakeRun('ok'),
      post: (m) => sent.push(m),
      settle: (_m, o) => ({ outcome: 'settled', cycles: 7, lastChange: 1e-7, state: { P: o.parameters?.Pin ?? 0 }, cycle, message: 'settled after 7 cycles' }),
      cycleMean: (c, id) => c.series[id][1] * 10
    });
    handle({ v: PROTOCOL_VERSION, type: 'settle', requestId: 't1', model, parameters: { Pin: 90 } });
    expect(sent).toEqual([
      {
        v: PROTOCOL_VERSION,
        type: 'settleResult',
        requestId: 't1',
        result: { outcome: 'settled', cycles: 7, lastChange: 1e-7, state: { P: 90 }, message: 'settled after 7 cycles', seasonMeans: { Chl: 20, P: 40 }, units: { Chl: 'ug/L' } }
      }
    ]);
    const bare = host(() => fakeRun('ok'));
    bare.handle({ v: PROTOCOL_VERSION, type: 'sweep', requestId: 's4', model, settings });
    expect(bare.sent[0].type === 'error' && bare.sent[0].code).toBe('bad_message');
  });
});

describe('createEngineHost, ensembles', () => {
  const sc = (id: string) => ({ format: 'lakeledger.scenario/1', id }) as unknown as ScenarioDoc;
  const okRun = (x: number) =>
    ({ format: 'lakeledger.run/1', status: 'ok', start: '2020-01-01', times: [0, 1, 2], series: { Chl: [x, x, x] }, units: { Chl: 'ug/L' }, closure: { ok: x < 100, relativeResidual: x < 100 ? 1e-13 : 1e-3, tolerance: 1e-6 } }) as unknown as RunDoc;

  function ensembleHost(runFor: (scenario: string, draw: { parameters: Record<string, number> }) => RunDoc) {
    const sent: FromWorker[] = [];
    const draws: number[] = [];
    const handle = createEngineHost({
      simulate: () => fakeRun('ok'),
      post: (m) => sent.push(m),
      ensemble: {
        sample: (_m, n, seed) => {
          if (seed === 13) throw Object.assign(new Error('nothing to sample'), { code: 'nothing_to_sample' });
          return { members: Array.from({ length: n }, (_, j) => ({ parameters: { k: 10 * j + seed }, initial: {} })), sampled: { parameters: ['k'], states: [] } };
        },
        prepare: (_m, s) => (s.id === 'bad' ? { ok: false, code: 'invalid_scenario', message: 'no period' } : { ok: true, run: (d) => (draws.push(d.parameters.k), runFor(s.id, d)) })
      }
    });
    return { handle, sent, draws };
  }

  it('runs the asked members of one design under every scenario with the same sets, one message each, then the count', () => {
    const { handle, sent, draws } = ensembleHost((s, d) => okRun(s === 'base' ? d.parameters.k : d.parameters.k / 2));
    handle({ v: PROTOCOL_VERSION, type: 'ensemble', requestId: 'e1', model, scenarios: [sc('base'), sc('opt')], n: 5, seed: 1, members: [3, 1] });
    expect(sent.every(isFromWorker)).toBe(true);
    expect(sent.map((m) => m.type)).toEqual(['ensembleMember', 'ensembleMember', 'ensembleResult']);
    // member 3 under both scenarios, then member 1: common random numbers, member-major
    expect(draws).toEqual([31, 31, 11, 11]);
    const first = sent[0];
    expect(first.type === 'ensembleMember' && [first.member, first.runs.length, first.runs.every((r) => r.status === 'ok' && r.closed)]).toEqual([3, 2, true]);
    expect(sent[2]).toEqual({ v: PROTOCOL_VERSION, type: 'ensembleResult', requestId: 'e1', done: 2, asked: 2, sampled: { parameters: ['k'], states: [] } });
  });

  it('reports failed and not-closed members with their codes; a scenario that cannot be prepared fails every member', () => {
    const { handle, sent } = ensembleHost((_s, d) => (d.parameters.k > 20 ? okRun(500) : fakeRun('failed')));
    handle({ v: PROTOCOL_VERSION, type: 'ensemble', requestId: 'e2', model, scenarios: [sc('base'), sc('bad')], n: 4, seed: 0, members: [0, 3] });
    const members = sent.filter((m) => m.type === 'ensembleMember');
    const codes = members.map((m) => (m.type === 'ensembleMember' ? m.runs.map((r) => r.code) : []));
    expect(codes).toEqual([
      ['failed', 'invalid_scenario'],
      ['closure_failed', 'invalid_scenario']
    ]);
    const m3 = members[1];
    expect(m3.type === 'ensembleMember' && m3.runs[0]).toMatchObject({ status: 'ok', closed: false });
    expect(m3.type === 'ensembleMember' && m3.runs[0].message).toMatch(/mass closure failed/);
  });

  it('an input problem of the design comes back as an ensembleResult problem; a cancelled run stops the request', () => {
    const { handle, sent } = ensembleHost(() => ({ status: 'cancelled' }) as unknown as RunDoc);
    handle({ v: PROTOCOL_VERSION, type: 'ensemble', requestId: 'e3', model, scenarios: [sc('base')], n: 2, seed: 13, members: [0] });
    handle({ v: PROTOCOL_VERSION, type: 'ensemble', requestId: 'e4', model, scenarios: [sc('base')], n: 2, seed: 2, members: [0, 1] });
    expect(sent).toEqual([
      { v: PROTOCOL_VERSION, type: 'ensembleResult', requestId: 'e3', problem: { code: 'nothing_to_sample', message: 'nothing to sample' } },
      { v: PROTOCOL_VERSION, type: 'ensembleResult', requestId: 'e4', done: 0, asked: 2, sampled: { parameters: ['k'], states: [] } }
    ]);
  });

  it('refuses an ensemble when it has no engine for it', () => {
    const bare = host(() => fakeRun('ok'));
    bare.handle({ v: PROTOCOL_VERSION, type: 'ensemble', requestId: 'e5', model, scenarios: [sc('base')], n: 2, seed: 2, members: [0] });
    expect(bare.sent[0].type === 'error' && bare.sent[0].code).toBe('bad_message');
  });
});

describe('thinned(run, id, gridDays)', () => {
  it('takes day 0, g, 2g … of the daily series, interpolating between outputs', () => {
    const run = { start: '2020-01-01', times: [0, 2, 4, 6], series: { X: [0, 20, 40, 60] } } as unknown as RunDoc;
    expect(thinned(run, 'X', 3)).toEqual([0, 30, 60]);
    expect(thinned(run, 'X', 1)).toEqual([0, 10, 20, 30, 40, 50, 60]);
    expect(thinned(run, 'missing', 3)).toEqual([]);
  });
});

describe('an ensemble of the demo lake through the real engine', () => {
  it('returns role series on the grid and the growing-season mean chlorophyll of the last 5 years, the same sets in both scenarios', async () => {
    const { readFileSync } = await import('node:fs');
    const engine = await import('$lib/engine');
    const demo = JSON.parse(readFileSync('static/examples/demo-lake.model.json', 'utf8')) as ModelDoc;
    const shorten = (s: ScenarioDoc): ScenarioDoc => ({ ...s, period: { ...s.period, start: '2027-01-01', end: '2033-01-01' } });
    const base = shorten(JSON.parse(readFileSync('static/examples/demo-lake.baseline.scenario.json', 'utf8')));
    const opt = shorten(JSON.parse(readFileSync('static/examples/demo-lake.load-and-fish.scenario.json', 'utf8')));
    const sent: FromWorker[] = [];
    const handle = createEngineHost({
      simulate: () => fakeRun('ok'),
      post: (m) => sent.push(m),
      ensemble: {
        sample: (m, n, seed) => ({ members: engine.sampleModel(m, n, seed).members, sampled: { parameters: [], states: [] } }),
        prepare: (m, s) => {
          const p = engine.prepareRuns(m, s);
          return p.ok ? { ok: true, run: (d, signal) => p.runner.run(d, { skipRunId: true, signal }) } : { ok: false, code: 'x', message: 'x' };
        }
      }
    });
    handle({ v: PROTOCOL_VERSION, type: 'ensemble', requestId: 'd1', model: demo, scenarios: [base, opt], n: 10, seed: 42, members: [4], gridDays: 30 });
    const m = sent[0];
    if (m.type !== 'ensembleMember') throw new Error(`expected a member, got ${JSON.stringify(m).slice(0, 300)}`);
    expect(m.runs.map((r) => [r.status, r.closed])).toEqual([['ok', true], ['ok', true]]);
    expect(Object.keys(m.roles).sort()).toEqual(['chlorophyll', 'secchi', 'totalP']);
    // 6 years of days (2192) every 30 days: 74 points
    expect(m.runs[0].series!.chlorophyll).toHaveLength(74);
    expect(m.columns.map((c) => c.key)).toContain('chlorophyll.last');
    // the member's value is what the indicators give for the same member run by itself
    const draw = engine.sampleModel(demo, 10, 42).members[4];
    const p = engine.prepareRuns(demo, base);
    if (!p.ok) throw new Error('demo did not prepare');
    const alone = engine.runIndicators(p.runner.run(draw, { skipRunId: true }), demo);
    const roleChl = alone.roles.chlorophyll;
    expect(roleChl.ok && roleChl.seasonLast).toBeCloseTo(m.runs[0].values['chlorophyll.last']!, 12);
    // the option differs from the baseline (its measures act within the period)
    expect(m.runs[1].values['chlorophyll.last']).not.toBeCloseTo(m.runs[0].values['chlorophyll.last']!, 3);
  }, 60000);
});
