import { describe, expect, it } from 'vitest';
import type { ModelDoc, RunDoc } from '$lib/engine/document/types';
import { seriesByRole } from './series-by-role';

const model = {
  derived: [
    { id: 'fT', expression: '1', unit: '1' },
    { id: 'CHLa', label: 'Chlorophyll-a', expression: 'PHY/30', unit: 'ug/L', report: true, role: 'chlorophyll' },
    { id: 'TPold', expression: 'DIP', unit: 'mg/m^3', role: 'totalP' },
    { id: 'TP', expression: 'DIP + PHY', unit: 'mg/m^3', report: true, role: 'totalP' }
  ]
} as unknown as ModelDoc;

const run = {
  units: { CHLa: 'ug/L', TP: 'mg/m^3' },
  series: { CHLa: [1, 2], TP: [40, 41] }
} as unknown as RunDoc;

describe('seriesByRole', () => {
  it('finds the series by role, with the model label and the run unit', () => {
    expect(seriesByRole(model, run, 'chlorophyll')).toEqual({ id: 'CHLa', label: 'Chlorophyll-a', unit: 'ug/L', values: [1, 2] });
  });

  it('skips a derived quantity of that role that the run did not record, and labels by id without a label', () => {
    expect(seriesByRole(model, run, 'totalP')).toEqual({ id: 'TP', label: 'TP', unit: 'mg/m^3', values: [40, 41] });
  });

  it('gives null for a role no recorded series has', () => {
    expect(seriesByRole(model, run, 'secchi')).toBeNull();
    expect(seriesByRole({ ...model, derived: undefined }, run, 'chlorophyll')).toBeNull();
  });
});
