import { describe, expect, it } from 'vitest';
import {
  PROTOCOL_VERSION,
  isCancelRequest,
  isErrorMessage,
  isFromWorker,
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
