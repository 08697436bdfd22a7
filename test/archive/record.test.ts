/**
 * Run record digests (src/lib/archive/record.ts): the inputs of a spin-up run include the
 * end state it started from, so two runs that differ only there have different records.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { recordDigest, runInputs } from '../../src/lib/archive/record';
import { simulate } from '../../src/lib/engine';

const oneBox = JSON.parse(readFileSync('static/examples/one-box.model.json', 'utf8'));
const sc = (initialState?: string) => ({ format: 'lakeledger.scenario/1' as const, id: 's', model: oneBox.id, period: { start: '2027-01-01', end: '2027-06-01' }, ...(initialState ? { initialState } : {}) });

describe('run record digests', () => {
  it('a run from the model start has no initialState among its inputs', () => {
    expect(runInputs(simulate(oneBox, sc()))).not.toHaveProperty('initialState');
  });

  it('spin-up runs from two end states have different records, and the state is among the inputs', () => {
    const id = oneBox.states[0].id;
    const a = simulate(oneBox, sc('run_0123456789abcdef'), { initial: { [id]: 10 } });
    const b = simulate(oneBox, sc('run_0123456789abcdef'), { initial: { [id]: 20 } });
    expect(runInputs(a).initialState).toEqual({ run: 'run_0123456789abcdef', values: { [id]: 10 } });
    expect(recordDigest(a)).not.toBe(recordDigest(b));
  });
});
