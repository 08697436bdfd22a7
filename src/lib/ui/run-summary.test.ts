import { describe, expect, it } from 'vitest';
import type { ClosureDoc, RunSolverDoc } from '$lib/engine/document/types';
import {
  closureAtAGlance,
  daysBetween,
  describeClosure,
  describeRunError,
  describeSolverMethod,
  describeSolverSteps,
  formatDuration,
  formatRatio
} from './run-summary';

const closure: ClosureDoc = {
  unit: 'kg',
  initialMass: 1234.4,
  finalMass: 1100,
  imported: 8000,
  exported: 8134.4,
  maxResidual: 2.4e-8,
  relativeResidual: 3e-12,
  tolerance: 1e-6,
  ok: true
};

const solver: RunSolverDoc = {
  method: 'odex',
  switchedAt: null,
  rtol: 1e-6,
  atol: 1e-9,
  maxStep: 5,
  steps: 2412,
  rejected: 31,
  evaluations: 30120
};

describe('run-summary', () => {
  it.each<[number, string]>([
    [3e-12, '3e-12'],
    [2.54e-7, '2.5e-7'],
    [0, '0'],
    [0.012, '1.2e-2'],
    [Number.NaN, '–']
  ])('formatRatio(%d) = %s', (x, s) => {
    expect(formatRatio(x)).toBe(s);
  });

  it('describeClosure(closed) says closed in words with the residual and the books', () => {
    expect(describeClosure(closure, 'P')).toEqual({
      closed: true,
      word: 'closed',
      text: 'Mass balance closed: residual 3e-12 of throughput',
      detail: 'kg P: initial 1,234, final 1,100, imported 8,000, exported 8,134'
    });
  });

  it('describeClosure(not ok) says not closed and names the tolerance', () => {
    const words = describeClosure({ ...closure, relativeResidual: 0.0116, ok: false });
    expect([words.closed, words.word]).toEqual([false, 'not closed']);
    expect(words.text).toBe('Mass balance not closed: residual 1.2e-2 of throughput, above the tolerance 1e-6');
    expect(describeClosure({ ...closure, initialMass: 0.5123, finalMass: 0.5 }).detail).toMatch(/^kg: initial 0\.5123, final 0\.5,/);
  });

  it('describeSolverMethod names the method and a switch to the stiff one', () => {
    expect(describeSolverMethod(solver)).toBe('odex (explicit extrapolation)');
    expect(describeSolverMethod({ ...solver, method: 'auto', switchedAt: 135 })).toBe(
      'odex, then the stiff method from day 135'
    );
  });

  it('describeSolverSteps counts steps, rejections and evaluations', () => {
    expect(describeSolverSteps(solver)).toBe('2,412 steps (31 rejected), 30,120 evaluations');
  });

  it.each<[number, string]>([
    [41.4, '41 ms'],
    [999.4, '999 ms'],
    [1234, '1.2 s'],
    [-1, '–']
  ])('formatDuration(%d) = %s', (ms, s) => {
    expect(formatDuration(ms)).toBe(s);
  });

  it('describeRunError adds day, date and flow when the run names them', () => {
    expect(describeRunError({ code: 'solver_max_steps', message: 'odex ran out of steps', time: 135, flow: 'uptake' }, '2027-01-01')).toBe(
      'odex ran out of steps (day 135, 2027-05-16, flow uptake)'
    );
    expect(describeRunError({ code: 'invalid_model', message: 'unknown state SEDx' })).toBe('unknown state SEDx');
  });
});

describe('daysBetween', () => {
  it('counts whole UTC days between ISO dates, leap days included', () => {
    expect(daysBetween('2027-01-01', '2047-01-01')).toBe(7305);
    expect(daysBetween('2028-02-28', '2028-03-01')).toBe(2);
    expect(daysBetween('2027-01-01', 'soon')).toBeNaN();
  });
});

describe('closureAtAGlance', () => {
  it('says closed or not closed in words, with the residual', () => {
    expect(closureAtAGlance({ ...closure, ok: true, relativeResidual: 3e-12 })).toBe('closed, 3e-12 of throughput');
    expect(closureAtAGlance({ ...closure, ok: false, relativeResidual: 0.0021 })).toBe('not closed, 2.1e-3 of throughput');
    expect(closureAtAGlance(closure, 'failed')).toBe('run failed: no closure');
    expect(closureAtAGlance(null)).toBe('–');
  });
});
