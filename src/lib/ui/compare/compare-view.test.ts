/** The Compare screen's choices (the project's own rules, see compare-view.ts), with hand-made inputs. */
import { describe, expect, it } from 'vitest';
import type { StoredRunSummary } from '$lib/storage/types';
import {
  closureWords,
  defaultSelection,
  formatChange,
  formatCostPer,
  formatRelapse,
  indicatorRows,
  parseRunSelection,
  pickBaseline,
  selectionParam
} from './compare-view';
import { daily, fakeRun, inSeason, roleModel } from '../../../../test/engine/compare/fixture';

const closure = { unit: 'kg', initialMass: 1, finalMass: 1, imported: 0, exported: 0, maxResidual: 0, relativeResidual: 3e-12, tolerance: 1e-9, ok: true };

describe('parseRunSelection(param)', () => {
  it('keeps well-formed ids once, in order, at most eight', () => {
    expect(parseRunSelection('run_a, run_b,run_a,,bad id,<x>')).toEqual(['run_a', 'run_b']);
    expect(parseRunSelection(Array.from({ length: 10 }, (_, i) => `r${i}`).join(','))).toHaveLength(8);
    expect(parseRunSelection(null)).toEqual([]);
    expect(selectionParam(['a', 'b'])).toBe('a,b');
  });
});

describe('defaultSelection(runs, isBaseline)', () => {
  const s = (id: string, scenarioKey: string, status: StoredRunSummary['status'] = 'ok') => ({ id, scenarioKey, status }) as StoredRunSummary;
  it('takes the newest run of each scenario, the baseline first, and skips cancelled runs', () => {
    const runs = [s('r5', 'fish'), s('r4', 'base'), s('r3', 'fish'), s('r2', 'load', 'cancelled'), s('r1', 'load')];
    expect(defaultSelection(runs, (k) => k === 'base')).toEqual(['r4', 'r5', 'r1']);
  });
});

describe('pickBaseline(selected, chosen)', () => {
  const sel = [
    { id: 'a', status: 'ok' as const, scenario: { measures: [{ kind: 'add' as const, state: 'X', amount: 1, on: '2027-01-01' }] } },
    { id: 'b', status: 'failed' as const, scenario: { measures: [] } },
    { id: 'c', status: 'ok' as const, scenario: { measures: [] } }
  ];
  it('is the finished run without measures unless the user chose another finished run', () => {
    expect(pickBaseline(sel, null)).toBe('c');
    expect(pickBaseline(sel, 'a')).toBe('a');
    expect(pickBaseline(sel, 'b')).toBe('c'); // a failed run cannot be the reference
    expect(pickBaseline([sel[0]], null)).toBe('a');
    expect(pickBaseline([], null)).toBeNull();
  });
});

describe('closureWords(run)', () => {
  it('says closed with the residual, not closed with the tolerance, and failed with the engine message', () => {
    expect(closureWords({ status: 'ok', error: null, closure }).text).toBe('closed, 3e-12 of throughput');
    expect(closureWords({ status: 'ok', error: null, closure: { ...closure, ok: false, relativeResidual: 2e-5 } }).text).toBe(
      'not closed: residual 2e-5 of throughput, above the tolerance 1e-9'
    );
    const f = closureWords({ status: 'failed', error: { code: 'max_steps', message: 'the solver needed more than 100000 steps' }, closure });
    expect(f).toEqual({ ok: false, text: 'failed: the solver needed more than 100000 steps' });
  });
});

describe('formatChange / formatCostPer', () => {
  const c = { key: 'k', label: 'k', unit: 'ug/L', run: 48, baseline: 64, change: -16, percent: -25, improvement: 16 };
  it('words a change with its sign and per cent, and years as earlier or later', () => {
    expect(formatChange(c, 'value')).toBe('−16 ug/L (−25 %)');
    expect(formatChange({ ...c, unit: 'year', change: -3, percent: null }, 'year')).toBe('3 years earlier');
  });
  it('words a cost per unit, or "no improvement"', () => {
    expect(formatCostPer({ currency: 'EUR', cost: 160, improvement: 16, unit: 'ug/L', perUnit: 10 })).toBe('10 EUR per ug/L');
    expect(formatCostPer({ currency: 'EUR', cost: 160, improvement: -1, unit: 'ug/L', perUnit: null, reason: 'no improvement' })).toBe('no improvement');
  });
});

describe('indicatorRows(loaded, baselineId, options)', () => {
  // 2027-01-01 .. 2030-01-01; baseline Chl 40 in season, scenario 30 (cost 150 EUR) → 10 ug/L better, 15 EUR per ug/L.
  const model = roleModel({ chlorophyll: { id: 'Chl', unit: 'ug/L' } });
  const mk = (id: string, v: number) => {
    const d = daily('2027-01-01', 1096, (x) => (inSeason(x) ? v : 1));
    return fakeRun('2027-01-01', d.times, { Chl: d.values }, { Chl: 'ug/L' }, { id });
  };
  const summary = (id: string, title: string) => ({ id, scenarioTitle: title }) as StoredRunSummary;
  const measures = [{ kind: 'scale' as const, target: 'p', factor: 0.5, from: '2027-06-01' }];
  const loaded = [
    { summary: summary('b', 'Baseline'), run: mk('b', 40), model, scenario: { format: 'lakeledger.scenario/1' as const, id: 'b', model: 'tiny', period: { start: '2027-01-01', end: '2030-01-01' } } },
    {
      summary: summary('s', 'Cut'),
      run: mk('s', 30),
      model,
      scenario: { format: 'lakeledger.scenario/1' as const, id: 's', model: 'tiny', period: { start: '2027-01-01', end: '2030-01-01' }, measures, costs: [{ measure: 'm1', amount: 150, currency: 'EUR' }] }
    }
  ];
  const rows = indicatorRows(loaded, 'b', { lastYears: 2 });

  it('marks the baseline, compares the other run with it and sets its cost against the chlorophyll improvement', () => {
    expect(rows[0].isBaseline).toBe(true);
    expect(rows[0].changes).toBeNull();
    const chl = rows[1].changes!.find((c) => c.key === 'chlorophyll.last')!;
    expect(chl.change).toBeCloseTo(-10, 12);
    expect(chl.percent).toBeCloseTo(-25, 12);
    expect(rows[1].costPerChl![0].perUnit).toBeCloseTo(15, 12);
  });
  it('gives the relapse of a run with measures: 30 is never within 10 % of 40, so none to the end', () => {
    expect(rows[1].relapse.value!.relapseYear).toBeNull();
    expect(formatRelapse(rows[1].relapse)).toBe('none to the end of the run');
    expect(formatRelapse(rows[0].relapse)).toBe('reference');
  });
});
