/**
 * `sweep` on the command line: the lakeledger.sweep/1 fields the sweep issue names, exit
 * codes 0 and 2. The model is the recycling lake of Carpenter, Ludwig & Brock (1999,
 * Ecological Applications 9: 751–771; form from memory, parameters our own), whose
 * folds test/engine/longrun/sweep.test.ts computes independently.
 */
import { describe, expect, it } from 'vitest';
import { memoryCli } from './memory-cli';

const model = {
  format: 'lakeledger.model/1',
  id: 'recycling_lake',
  timeOrigin: '2027-01-01',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [
    { id: 'V', value: 1e6, unit: 'm^3' },
    { id: 'l', value: 0.01, unit: 'mg/m^3/d' },
    { id: 's', value: 0.02, unit: '1/d' },
    { id: 'r', value: 0.02, unit: 'mg/m^3/d' },
    { id: 'm', value: 1, unit: 'mg/m^3' },
    { id: 'q', value: 8, unit: '1' }
  ],
  states: [{ id: 'P', unit: 'mg/m^3', initial: 0.1, size: 'V' }],
  flows: [
    { id: 'load', to: 'P', rate: 'l' },
    { id: 'loss', from: 'P', rate: 's * P' },
    { id: 'recycling', to: 'P', rate: 'r * hill(P, m, q)' }
  ]
};

/** A fresh set of files per call, as before. */
const cli = (args: string[]) => memoryCli({ 'lake.json': JSON.stringify(model) })(args);

describe('lakeledger sweep', () => {
  it('writes values, low, high, bistable and switchPoints, --steps N values with both ends (exit 0)', () => {
    const r = cli(['sweep', 'lake.json', '--target', 'l', '--from', '0.004', '--to', '0.016', '--steps', '5', '--indicator', 'P', '--start-low', 'P=0', '--start-high', 'P=3', '--out', 'sweep.json']);
    expect(r.code, r.err).toBe(0);
    const doc = JSON.parse(r.files.get('sweep.json')!);
    expect(doc.format).toBe('lakeledger.sweep/1');
    [0.004, 0.007, 0.01, 0.013, 0.016].forEach((v, i) => expect(doc.values[i]).toBeCloseTo(v, 15));
    expect(doc.values).toHaveLength(5);
    expect(doc.low).toHaveLength(5);
    expect(doc.high).toHaveLength(5);
    expect(doc.bistable).toHaveLength(1);
    expect(doc.bistable[0][0]).toBeCloseTo(0.01, 15);
    expect(doc.bistable[0][1]).toBeCloseTo(0.013, 15);
    expect(doc.switchPoints).toHaveLength(2);
  });

  it.each([
    [['--target', 'nope', '--from', '1', '--to', '2', '--steps', '3', '--indicator', 'P'], 'nope'],
    [['--target', 'l', '--from', '1', '--to', 'x', '--steps', '3', '--indicator', 'P'], '--to'],
    [['--target', 'l', '--from', '1', '--to', '2', '--steps', '3'], '--indicator'],
    [['--target', 'l', '--from', '1', '--to', '2', '--steps', '3', '--indicator', 'P', '--start-low', 'P:0'], 'ID=VALUE'],
    [['--target', 'l', '--from', '1', '--to', '2', '--steps', '3', '--indicator', 'P', '--start-low', 'Q=1'], 'not a state']
  ])('refuses bad options with exit 2 and a message naming the item (%j)', (opts, word) => {
    const r = cli(['sweep', 'lake.json', ...(opts as string[])]);
    expect(r.code).toBe(2);
    expect(r.err).toContain(word as string);
    expect(r.err).not.toMatch(/\n\s+at /);
  });
});
