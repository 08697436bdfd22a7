/**
 * A scenario that starts from the end of a stored run (spin-up): the caller passes that
 * run's end state; the run records where it started, so it can be reproduced without the
 * stored run; without the end state the run fails and says why.
 */
import { describe, expect, it } from 'vitest';
import { simulate } from '../../../src/lib/engine';
import type { ModelDoc, ScenarioDoc } from '../../../src/lib/engine';
import oneBox from '../../../static/examples/one-box.model.json';

const model = oneBox as unknown as ModelDoc;

function scenario(start: string, end: string, initialState?: string): ScenarioDoc {
  return { format: 'lakeledger.scenario/1', id: 's', model: model.id, period: { start, end }, ...(initialState ? { initialState } : {}) };
}

describe('simulate() from a stored run\'s end state', () => {
  it('continuing from the end of a 2-year run matches a 4-year run at the end (to the solver tolerance)', () => {
    const whole = simulate(model, scenario('2027-01-01', '2031-01-01'));
    const first = simulate(model, scenario('2027-01-01', '2029-01-01'));
    const state = model.states[0].id;
    const end = first.series[state][first.series[state].length - 1];
    const second = simulate(model, scenario('2029-01-01', '2031-01-01', first.id), { initial: { [state]: end } });
    expect(second.status).toBe('ok');
    expect(second.series[state][0]).toBe(end);
    expect(second.initialState).toEqual({ run: first.id, values: { [state]: end } });
    const a = whole.series[state][whole.series[state].length - 1];
    const b = second.series[state][second.series[state].length - 1];
    expect(Math.abs(a - b) / Math.abs(a)).toBeLessThan(1e-4);
  });

  it('a spin-up scenario without the end state fails with initial_state_missing, naming the run', () => {
    const run = simulate(model, scenario('2029-01-01', '2031-01-01', 'run_0123456789abcdef'));
    expect(run.status).toBe('failed');
    expect(run.error?.code).toBe('invalid_override');
    expect(run.error?.message).toMatch(/run_0123456789abcdef/);
  });

  it('a run from the model\'s initial values records no initialState', () => {
    expect(simulate(model, scenario('2027-01-01', '2028-01-01')).initialState).toBeUndefined();
  });
});
