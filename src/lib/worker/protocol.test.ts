import { describe, expect, it } from 'vitest';
import {
  PROTOCOL_VERSION,
  isCancelRequest,
  isEnsembleMemberMessage,
  isEnsembleRequest,
  isEnsembleResultMessage,
  isErrorMessage,
  isFromWorker,
  isMorrisRequest,
  isMorrisResultMessage,
  isMorrisTrajectoryMessage,
  isProgressMessage,
  isResultMessage,
  isRunRequest,
  isSettleRequest,
  isSettleResultMessage,
  isSweepProgressMessage,
  isSweepRequest,
  isSweepResultMessage,
  isToWorker,
  requestIdOf
} from './protocol';

const model = { format: 'lakeledger.model/1', id: 'm' };
const scenario = { format: 'lakeledger.scenario/1', id: 's', model: 'm' };
const run = { format: 'lakeledger.run/1', id: 'r', status: 'ok' };

const v = PROTOCOL_VERSION;

// [name, message, guard that accepts it]
const valid: Array<[string, unknown, (x: unknown) => boolean]> = [
  ['run with scenario', { v, type: 'run', requestId: 'a', model, scenario }, isRunRequest],
  ['run without scenario', { v, type: 'run', requestId: 'a', model }, isRunRequest],
  ['cancel', { v, type: 'cancel', requestId: 'a' }, isCancelRequest],
  ['progress', { v, type: 'progress', requestId: 'a', fraction: 0.5, day: 3650 }, isProgressMessage],
  ['progress at 0', { v, type: 'progress', requestId: 'a', fraction: 0, day: 0 }, isProgressMessage],
  ['progress at 1', { v, type: 'progress', requestId: 'a', fraction: 1, day: 7305 }, isProgressMessage],
  ['result', { v, type: 'result', requestId: 'a', run }, isResultMessage],
  ['error', { v, type: 'error', requestId: 'a', code: 'engine_exception', message: 'x' }, isErrorMessage],
  ['error without id', { v, type: 'error', requestId: null, code: 'bad_message', message: 'x' }, isErrorMessage]
];

const guards = [isRunRequest, isCancelRequest, isProgressMessage, isResultMessage, isErrorMessage];

describe('protocol guards', () => {
  it.each(valid)('%s: accepted by its own guard only', (_name, message, guard) => {
    for (const g of guards) expect(g(message), g.name).toBe(g === guard);
  });

  it('isToWorker(x) accepts run and cancel, refuses worker messages', () => {
    const directions = valid.map(([, message]) => [isToWorker(message), isFromWorker(message)]);
    expect(directions).toEqual([
      [true, false],
      [true, false],
      [true, false],
      [false, true],
      [false, true],
      [false, true],
      [false, true],
      [false, true],
      [false, true]
    ]);
  });

  it.each<[string, unknown]>([
    ['another version', { v: 2, type: 'run', requestId: 'a', model }],
    ['no version', { type: 'run', requestId: 'a', model }],
    ['version as string', { v: '1', type: 'cancel', requestId: 'a' }],
    ['unknown type', { v, type: 'pause', requestId: 'a' }],
    ['empty request id', { v, type: 'cancel', requestId: '' }],
    ['numeric request id', { v, type: 'cancel', requestId: 7 }],
    ['run without model', { v, type: 'run', requestId: 'a' }],
    ['run with model array', { v, type: 'run', requestId: 'a', model: [] }],
    ['run with scenario string', { v, type: 'run', requestId: 'a', model, scenario: 's' }],
    ['progress above 1', { v, type: 'progress', requestId: 'a', fraction: 1.5, day: 1 }],
    ['progress NaN', { v, type: 'progress', requestId: 'a', fraction: Number.NaN, day: 1 }],
    ['progress without day', { v, type: 'progress', requestId: 'a', fraction: 0.1 }],
    ['result without run', { v, type: 'result', requestId: 'a' }],
    ['result with run lacking status', { v, type: 'result', requestId: 'a', run: { id: 'r' } }],
    ['error with unknown code', { v, type: 'error', requestId: 'a', code: 'oops', message: 'x' }],
    ['error without message', { v, type: 'error', requestId: 'a', code: 'bad_message' }],
    ['null', null],
    ['a string', 'run'],
    ['an array', [v, 'run']]
  ])('%s: refused by every guard', (_name, message) => {
    expect(isToWorker(message)).toBe(false);
    expect(isFromWorker(message)).toBe(false);
  });

  it('requestIdOf(x) reads the id of a malformed message, else null', () => {
    expect(requestIdOf({ v: 9, requestId: 'abc' })).toBe('abc');
    expect(requestIdOf({ requestId: '' })).toBeNull();
    expect(requestIdOf('abc')).toBeNull();
    expect(requestIdOf(null)).toBeNull();
  });
});

describe('protocol guards for the long-run messages', () => {
  const settings = { target: 'Pin', from: 100, to: 300, steps: 3, indicator: 'Chl' };
  const sweepDoc = { format: 'lakeledger.sweep/1', values: [1, 2], low: [1, 1], high: [2, 2] };
  const summary = { outcome: 'settled', cycles: 12, lastChange: 1e-7, state: { P: 1 }, message: 'settled', seasonMeans: { Chl: 20 }, units: {} };
  const newGuards = [isSettleRequest, isSweepRequest, isSettleResultMessage, isSweepProgressMessage, isSweepResultMessage];
  const all = [...guards, ...newGuards];

  const newValid: Array<[string, unknown, (x: unknown) => boolean, 'to' | 'from']> = [
    ['settle', { v, type: 'settle', requestId: 'a', model }, isSettleRequest, 'to'],
    ['settle with overrides', { v, type: 'settle', requestId: 'a', model, parameters: { Pin: 90 }, initial: { P: 1 }, forcingScale: { Q: 1.5 }, maxCycles: 50 }, isSettleRequest, 'to'],
    ['sweep', { v, type: 'sweep', requestId: 'a', model, settings }, isSweepRequest, 'to'],
    ['sweep with starts and refine', { v, type: 'sweep', requestId: 'a', model, settings: { ...settings, startLow: { P: 0 }, startHigh: { P: 3 }, refine: 3, season: null } }, isSweepRequest, 'to'],
    ['settle result', { v, type: 'settleResult', requestId: 'a', result: summary }, isSettleResultMessage, 'from'],
    ['sweep progress', { v, type: 'sweepProgress', requestId: 'a', done: 3, total: 8 }, isSweepProgressMessage, 'from'],
    ['sweep result', { v, type: 'sweepResult', requestId: 'a', sweep: sweepDoc }, isSweepResultMessage, 'from'],
    ['sweep refused', { v, type: 'sweepResult', requestId: 'a', problem: { code: 'unknown_target', message: 'no' } }, isSweepResultMessage, 'from']
  ];

  it.each(newValid)('%s: accepted by its own guard only, in its direction', (_name, message, guard, direction) => {
    for (const g of all) expect(g(message), g.name).toBe(g === guard);
    expect(isToWorker(message)).toBe(direction === 'to');
    expect(isFromWorker(message)).toBe(direction === 'from');
  });

  it.each<[string, unknown]>([
    ['sweep of another version', { v: 2, type: 'sweep', requestId: 'a', model, settings }],
    ['sweep without settings', { v, type: 'sweep', requestId: 'a', model }],
    ['sweep with steps as text', { v, type: 'sweep', requestId: 'a', model, settings: { ...settings, steps: '3' } }],
    ['sweep with from NaN', { v, type: 'sweep', requestId: 'a', model, settings: { ...settings, from: Number.NaN } }],
    ['sweep with a start value as text', { v, type: 'sweep', requestId: 'a', model, settings: { ...settings, startLow: { P: 'x' } } }],
    ['sweep with negative refine', { v, type: 'sweep', requestId: 'a', model, settings: { ...settings, refine: -1 } }],
    ['settle with fractional maxCycles', { v, type: 'settle', requestId: 'a', model, maxCycles: 2.5 }],
    ['settle with an infinite parameter', { v, type: 'settle', requestId: 'a', model, parameters: { Pin: Infinity } }],
    ['settle result without seasonMeans', { v, type: 'settleResult', requestId: 'a', result: { ...summary, seasonMeans: undefined } }],
    ['sweep progress beyond its total', { v, type: 'sweepProgress', requestId: 'a', done: 9, total: 8 }],
    ['sweep progress as fraction', { v, type: 'sweepProgress', requestId: 'a', done: 0.5, total: 8 }],
    ['sweep result with another format', { v, type: 'sweepResult', requestId: 'a', sweep: { ...sweepDoc, format: 'x' } }],
    ['sweep result with both a sweep and a problem', { v, type: 'sweepResult', requestId: 'a', sweep: sweepDoc, problem: { code: 'c', message: 'm' } }],
    ['sweep result with neither', { v, type: 'sweepResult', requestId: 'a' }]
  ])('%s: refused by every guard', (_name, message) => {
    expect(isToWorker(message)).toBe(false);
    expect(isFromWorker(message)).toBe(false);
  });
});

describe('ensemble messages', () => {
  const ens = { v, type: 'ensemble', requestId: 'e', model, scenarios: [scenario], n: 20, seed: 7, members: [0, 2, 19] };
  const memberRun = { status: 'ok', closed: true, relativeResidual: 1e-12, code: null, message: null, values: { 'chlorophyll.last': 30, 'secchi.last': null }, series: { chlorophyll: [1, 2] } };
  const failedRun = { status: 'failed', closed: false, relativeResidual: null, code: 'solver_failed', message: 'x', values: {}, series: null };
  const member = { v, type: 'ensembleMember', requestId: 'e', member: 2, runs: [memberRun, failedRun], columns: [], roles: {}, gridDays: 10 };

  it('accepts a well-formed ensemble request, member and result', () => {
    expect(isEnsembleRequest(ens)).toBe(true);
    expect(isToWorker(ens)).toBe(true);
    expect(isEnsembleRequest({ ...ens, gridDays: 5 })).toBe(true);
    expect(isEnsembleMemberMessage(member)).toBe(true);
    expect(isFromWorker(member)).toBe(true);
    const done = { v, type: 'ensembleResult', requestId: 'e', done: 3, asked: 3, sampled: { parameters: ['a'], states: [] } };
    expect(isEnsembleResultMessage(done)).toBe(true);
    expect(isEnsembleResultMessage({ v, type: 'ensembleResult', requestId: 'e', problem: { code: 'nothing_to_sample', message: 'm' } })).toBe(true);
    expect(isFromWorker(done)).toBe(true);
  });

  it.each([
    ['no scenarios', { ...ens, scenarios: [] }],
    ['n of 0', { ...ens, n: 0 }],
    ['n not whole', { ...ens, n: 2.5 }],
    ['seed below 0', { ...ens, seed: -1 }],
    ['seed above 32 bits', { ...ens, seed: 2 ** 32 }],
    ['a member outside the design', { ...ens, members: [0, 20] }],
    ['a member twice', { ...ens, members: [1, 1] }],
    ['grid of 0 days', { ...ens, gridDays: 0 }],
    ['another version', { ...ens, v: 2 }]
  ])('refuses an ensemble request with %s', (_name, msg) => {
    expect(isEnsembleRequest(msg)).toBe(false);
    expect(isToWorker(msg)).toBe(false);
  });

  it('refuses malformed member and result messages', () => {
    expect(isEnsembleMemberMessage({ ...member, runs: [] })).toBe(false);
    expect(isEnsembleMemberMessage({ ...member, runs: [{ ...memberRun, status: 'cancelled' }] })).toBe(false);
    expect(isEnsembleMemberMessage({ ...member, runs: [{ ...memberRun, values: { a: 'x' } }] })).toBe(false);
    expect(isEnsembleMemberMessage({ ...member, member: -1 })).toBe(false);
    expect(isEnsembleMemberMessage({ ...member, gridDays: 0 })).toBe(false);
    expect(isEnsembleResultMessage({ v, type: 'ensembleResult', requestId: 'e', done: 4, asked: 3, sampled: {} })).toBe(false);
    // both a count and a problem, or neither
    expect(isEnsembleResultMessage({ v, type: 'ensembleResult', requestId: 'e', done: 1, asked: 3, sampled: {}, problem: { code: 'c', message: 'm' } })).toBe(false);
    expect(isEnsembleResultMessage({ v, type: 'ensembleResult', requestId: 'e' })).toBe(false);
  });
});

describe('morris messages', () => {
  const req = { v, type: 'morris', requestId: 'm', model, scenario, indicator: 'chlorophyll.last', r: 10, p: 4, seed: 1, trajectories: [0, 9] };
  it('accepts a well-formed request, trajectory and result', () => {
    expect(isMorrisRequest(req)).toBe(true);
    expect(isToWorker(req)).toBe(true);
    const t = { v, type: 'morrisTrajectory', requestId: 'm', trajectory: 3, effects: [1.5, null], failed: 1, evaluations: 3 };
    expect(isMorrisTrajectoryMessage(t)).toBe(true);
    expect(isFromWorker(t)).toBe(true);
    expect(isMorrisResultMessage({ v, type: 'morrisResult', requestId: 'm', done: 2, asked: 2, delta: 2 / 3, inputs: [{ kind: 'parameter', id: 'a' }] })).toBe(true);
    expect(isMorrisResultMessage({ v, type: 'morrisResult', requestId: 'm', problem: { code: 'nothing_to_sample', message: 'x' } })).toBe(true);
  });
  it.each([
    ['odd levels', { ...req, p: 3 }],
    ['one trajectory', { ...req, r: 1 }],
    ['a trajectory outside the design', { ...req, trajectories: [10] }],
    ['a trajectory twice', { ...req, trajectories: [1, 1] }],
    ['no indicator', { ...req, indicator: '' }],
    ['no scenario', { ...req, scenario: undefined }]
  ])('refuses a morris request with %s', (_n, msg) => {
    expect(isMorrisRequest(msg)).toBe(false);
    expect(isToWorker(msg)).toBe(false);
  });
  it('refuses malformed trajectories and results', () => {
    expect(isMorrisTrajectoryMessage({ v, type: 'morrisTrajectory', requestId: 'm', trajectory: 0, effects: ['x'], failed: 0, evaluations: 3 })).toBe(false);
    expect(isMorrisResultMessage({ v, type: 'morrisResult', requestId: 'm', done: 1, asked: 1, delta: 0.5, inputs: [{ kind: 'forcing', id: 'a' }] })).toBe(false);
  });
});
