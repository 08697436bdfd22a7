/**
 * `lakeledger morris` and the engine's morrisOfModel on the small synthetic lake of the fit
 * tests (dP/dt = Lin − k·P, a second pool Q with its own loss kq that P never sees):
 * - kq cannot move P: its effects on P are solver noise only (Q's changes move the step sizes;
 *   seen μ* 7e-13 against μ*(Lin) of order 10), so it is ranked last, below 1e-9 of the others;
 * - P's five-year mean rises with Lin and falls with k: μ(Lin) > 0, μ(k) < 0 (the model's
 *   hand-solved P(t) = Lin/k + (P0 − Lin/k)e^(−kt), fixtures.ts);
 * - the same seed gives the same file; a run that fails leaves its effects out and exits 1.
 * Morris (1991); μ* after Campolongo, Cariboni & Saltelli (2007).
 */
import { describe, expect, it } from 'vitest';
import { memoryCli } from './memory-cli';
import { morrisOfModel } from '../../src/lib/engine/uncertainty/morris-model';
import { smallLake, twoYears } from '../engine/fit/fixtures';

const cli = (args: string[], extra: Record<string, string> = {}) =>
  memoryCli({ 'lake.json': JSON.stringify(smallLake()), 'two.json': JSON.stringify(twoYears()), ...extra })(args);

describe('morrisOfModel on the small lake', () => {
  const doc = morrisOfModel(smallLake(), twoYears(), { indicator: 'P', trajectories: 6, levels: 4, seed: 3 });

  it('screens the three ranged parameters with r·(k + 1) runs and names its method and settings', () => {
    expect(doc).toMatchObject({ format: 'lakeledger.morris/1', model: 'small_lake', trajectories: 6, levels: 4, delta: 4 / 6, seed: 3, evaluations: 6 * 4, failedRuns: 0, completed: 6, partial: false });
    expect(doc.method).toMatch(/Morris \(1991\)/);
    expect(doc.inputs.map((i) => i.id).sort()).toEqual(['Lin', 'k', 'kq']);
  });

  it('kq, which P never sees, is ranked last with μ* at the solver\'s noise; Lin raises P and k lowers it', () => {
    const lin = doc.inputs.find((i) => i.id === 'Lin')!;
    const k = doc.inputs.find((i) => i.id === 'k')!;
    expect(doc.inputs.at(-1)).toMatchObject({ id: 'kq', used: 6 });
    expect(doc.inputs.at(-1)!.muStar!).toBeLessThan(1e-9 * Math.min(lin.muStar!, k.muStar!));
    expect(lin.mu!).toBeGreaterThan(0);
    expect(k.mu!).toBeLessThan(0);
    // every effect of one sign: μ* = |μ|
    expect(lin.muStar).toBeCloseTo(Math.abs(lin.mu!), 12);
    expect(k.muStar).toBeCloseTo(Math.abs(k.mu!), 12);
  });
});

describe('lakeledger morris', () => {
  it('writes lakeledger.morris/1, the same for the same seed, and names the top inputs (exit 0)', () => {
    const a = cli(['morris', 'lake.json', 'two.json', '--indicator', 'P', '--trajectories', '4', '--seed', '9', '--out', 'm.json']);
    expect(a.code, a.err).toBe(0);
    const b = cli(['morris', 'lake.json', 'two.json', '--indicator', 'P', '--trajectories', '4', '--seed', '9', '--out', 'm.json']);
    expect(b.files.get('m.json')).toBe(a.files.get('m.json'));
    const doc = JSON.parse(a.files.get('m.json')!);
    expect(doc.trajectories).toBe(4);
    expect(a.err).toMatch(/^ok: 4 trajectories, 16 runs; largest mu\* for P: /m);
  });

  it('refuses an unknown indicator and odd levels (exit 2)', () => {
    const u = cli(['morris', 'lake.json', 'two.json', '--indicator', 'Nope']);
    expect(u.code).toBe(2);
    expect(u.err).toMatch(/'Nope' is not a state or reported series .*\[invalid_morris_settings\]/);
    const odd = cli(['morris', 'lake.json', 'two.json', '--indicator', 'P', '--levels', '3']);
    expect(odd.code).toBe(2);
    expect(odd.err).toMatch(/even/);
    expect(cli(['morris', 'lake.json', 'two.json']).err).toMatch(/needs --indicator/);
  });

  it('runs that fail leave their effects out and are counted (exit 1)', () => {
    // the loss is not finite for k < 0.005: the runs drawn there fail
    const m = smallLake();
    m.flows.find((f) => f.id === 'loss')!.rate = 'sqrt((k - 0.005 * one) * one) * 10 * P';
    m.parameters.push({ id: 'one', value: 1, unit: '1/d' } as never);
    const r = cli(['morris', 'fragile.json', 'two.json', '--indicator', 'P', '--trajectories', '6', '--seed', '2', '--out', 'f.json'], { 'fragile.json': JSON.stringify(m) });
    expect(r.code, r.err).toBe(1);
    const doc = JSON.parse(r.files.get('f.json')!);
    expect(doc.failedRuns).toBeGreaterThan(0);
    expect(doc.inputs.find((i: { id: string }) => i.id === 'k').used).toBeLessThan(6);
    expect(r.err).toMatch(/runs failed or did not close; their elementary effects are left out/);
  });
});
