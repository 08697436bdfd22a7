/**
 * The `near_absolute_tolerance` warning: a state that sank to within 10 × atol of zero and
 * grew again by more than 1,000 × is integrated, at its low point, to an error of its own
 * size, so when it recovers depends on the solver (common practice of ODE error control:
 * an absolute tolerance bounds the error of a component, Hairer, Nørsett & Wanner 1993,
 * Sect. II.4, eq. 4.10). Checked on synthetic columns and on a demo-lake ensemble member
 * whose phytoplankton nearly vanishes (seen: odex and dp54 at atol 1e-9 give final
 * chlorophyll 0.00045 and 4.2, both methods at atol 1e-14 give 4.0).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { nearToleranceWarnings } from '../../../src/lib/engine/solve/integrate';
import { buildSchedule } from '../../../src/lib/engine/solve/schedule';
import { analyzeModel } from '../../../src/lib/engine/document/validate-model';
import { prepareRuns, type ModelDoc, type ScenarioDoc } from '../../../src/lib/engine';
import { sampleModel } from '../../../src/lib/engine/uncertainty/lhs';
import { runMembers, ensembleDocument } from '../../../src/lib/engine/uncertainty/ensemble';
import { relErr } from '../reference/fixtures';

const read = <T>(f: string): T => JSON.parse(readFileSync(new URL(`../../../static/examples/${f}`, import.meta.url), 'utf8')) as T;
const model = read<ModelDoc>('demo-lake.model.json');
const baseline = read<ScenarioDoc>('demo-lake.baseline.scenario.json');
const schedule = buildSchedule(analyzeModel(model).model!, baseline);

describe('nearToleranceWarnings on columns', () => {
  const times = [0, 1, 2, 3, 4];
  it('warns for a state that fell below 10 × atol and grew again by more than 1,000 ×', () => {
    const w = nearToleranceWarnings([Float64Array.of(1, 1e-6, 5e-9, 1e-4, 2)], times, ['PHY'], 1e-9, schedule);
    expect(w).toHaveLength(1);
    expect(w[0]).toMatchObject({ code: 'near_absolute_tolerance', id: 'PHY', time: 2 });
    expect(w[0].message).toContain('atol (e.g. 1e-12)');
  });
  it('is silent for a state that stays low, one that never comes near atol, and one that recovers only a little', () => {
    expect(nearToleranceWarnings([Float64Array.of(1, 1e-6, 5e-9, 5e-9, 4e-9)], times, ['A'], 1e-9, schedule)).toEqual([]);
    expect(nearToleranceWarnings([Float64Array.of(1, 1e-6, 1e-7, 1e-4, 2)], times, ['B'], 1e-9, schedule)).toEqual([]);
    expect(nearToleranceWarnings([Float64Array.of(1, 1e-6, 5e-9, 1e-7, 1e-6)], times, ['C'], 1e-9, schedule)).toEqual([]);
  });
});

describe('on the demo lake', () => {
  const prepared = prepareRuns(model, baseline);
  if (!prepared.ok) throw new Error('demo does not prepare');
  const sets = sampleModel(model, 200, 42).members;

  it('the baseline itself does not warn', () => {
    expect(prepared.runner.run({}, { skipRunId: true }).warnings.map((w) => w.code)).not.toContain('near_absolute_tolerance');
  });

  it('member 110 of the seed-42 sample warns, and a tighter atol moves its final chlorophyll to the tight value', () => {
    const loose = prepared.runner.run(sets[110], { skipRunId: true });
    expect(loose.warnings.find((w) => w.code === 'near_absolute_tolerance')?.id).toBeTruthy();
    const tight = prepareRuns(model, { ...baseline, solver: { ...baseline.solver, rtol: 1e-8, atol: 1e-12, maxSteps: 1_000_000 } });
    if (!tight.ok) throw new Error('tight does not prepare');
    const t = tight.runner.run(sets[110], { skipRunId: true });
    const tighter = prepareRuns(model, { ...baseline, solver: { ...baseline.solver, rtol: 1e-10, atol: 1e-14, maxSteps: 1_000_000 } });
    if (!tighter.ok) throw new Error('tighter does not prepare');
    const tt = tighter.runner.run(sets[110], { skipRunId: true });
    const last = (r: typeof t) => r.series.Chl[r.series.Chl.length - 1];
    // the two tight runs agree (seen 4.003 and 3.998); the loose one is off by far more
    expect(relErr(last(t), last(tt))).toBeLessThan(0.01);
    expect(relErr(last(loose), last(tt))).toBeGreaterThan(0.5);
  });

  it('an ensemble counts such a member but lists its warning, in member order', () => {
    const sample = sampleModel(model, 200, 42);
    const slice = { ...sample, n: 2, members: [sample.members[109], sample.members[110]] };
    const result = runMembers(model, [baseline], slice.members, { offset: 109 });
    const doc = ensembleDocument(model, slice, result);
    expect(doc.scenarios[0].closed).toBe(2);
    expect(doc.scenarios[0].warnings?.map((w) => [w.member, w.code])).toEqual([[110, 'near_absolute_tolerance']]);
  });
});
