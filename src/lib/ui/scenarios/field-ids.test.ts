import { describe, expect, it } from 'vitest';
import both from '../../../../static/examples/demo-lake.load-and-fish.scenario.json';
import { pathId, placeWords, problemFieldId, problemsByField } from './field-ids';

describe('field ids of scenario problems', () => {
  it.each([
    ['period.start', 'sc-period-start'],
    ['measures[1].repeat.count', 'sc-measures-1-repeat-count'],
    ['measures[0]', 'sc-measures-0'],
    ['', 'sc-doc']
  ])('pathId(%s) = %s', (path, id) => expect(pathId(path)).toBe(id));

  it.each([
    ['costs[1].amount', 'sc-measures-1-cost-amount'],
    ['costs[0].currency', 'sc-measures-0-cost-currency'],
    ['costs[1].measure', 'sc-measures-1-cost-amount'],
    ['costs[7].amount', 'sc-costs-7-amount']
  ])('problemFieldId(%s) goes to the cost fields of its measure: %s', (path, id) => {
    expect(problemFieldId(path, both)).toBe(id);
  });

  it.each([
    ['measures[1].fraction', 'measure fishOut (2), fraction'],
    ['measures[1].repeat.count', 'measure fishOut (2), repeat count'],
    ['costs[0].currency', 'cost of loadCut, currency'],
    ['period.end', 'period end'],
    ['solver.rtol', 'relative tolerance']
  ])('placeWords(%s) = %s', (path, words) => expect(placeWords(path, both)).toBe(words));

  it('problemsByField groups problems by control', () => {
    const m = problemsByField(
      [
        { severity: 'error', code: 'a', path: 'measures[0].factor', message: 'x' },
        { severity: 'warning', code: 'b', path: 'measures[0].factor', message: 'y' },
        { severity: 'error', code: 'c', path: 'id', message: 'z' }
      ],
      both
    );
    expect([...m.keys()]).toEqual(['sc-measures-0-factor', 'sc-id']);
    expect(m.get('sc-measures-0-factor')!.map((p) => p.code)).toEqual(['a', 'b']);
  });
});
