/**
 * A small synthetic lake for the fit tests (invented): one water-column P pool with a
 * constant load and a first-order loss, dP/dt = Lin − k·P, so P(t) = Lin/k + (P0 − Lin/k)·e^(−k t)
 * (hand-solved linear ODE); a second pool Q that no observation sees; chlorophyll 0.3·P.
 */
import type { ModelDoc, ScenarioDoc } from '../../../src/lib/engine/document/types';

export function smallLake(): ModelDoc {
  return {
    format: 'lakeledger.model/1',
    id: 'small_lake',
    timeOrigin: '2027-01-01',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 1e6, unit: 'm^3' },
      { id: 'Lin', value: 1.2, unit: 'mg/m^3/d', range: { min: 0.1, max: 2, distribution: 'uniform' } },
      { id: 'k', value: 0.01, unit: '1/d', range: { min: 0.001, max: 0.02, distribution: 'uniform' } },
      { id: 'kq', value: 0.01, unit: '1/d', range: { min: 0.005, max: 0.015, distribution: 'uniform' } },
      { id: 'yChl', value: 0.3, unit: 'ug/mg' }
    ],
    states: [
      { id: 'P', unit: 'mg/m^3', initial: 20, size: 'V' },
      { id: 'Q', unit: 'mg/m^3', initial: 50, size: 'V' }
    ],
    derived: [{ id: 'Chl', expression: 'yChl * P', unit: 'ug/m^3', report: true, role: 'chlorophyll' }],
    flows: [
      { id: 'load', to: 'P', rate: 'Lin' },
      { id: 'loss', from: 'P', rate: 'k * P' },
      { id: 'lossQ', from: 'Q', rate: 'kq * Q' }
    ]
  } as ModelDoc;
}

export function twoYears(): ScenarioDoc {
  return {
    format: 'lakeledger.scenario/1',
    id: 'two_years',
    model: 'small_lake',
    period: { start: '2027-01-01', end: '2028-12-31', outputStep: 1 }
  } as ScenarioDoc;
}

/** P(t) of the fixture, hand-solved. */
export function pExact(t: number, Lin: number, k: number, P0 = 20): number {
  return Lin / k + (P0 - Lin / k) * Math.exp(-k * t);
}

export function isoDay(d: number): string {
  return new Date(Date.UTC(2027, 0, 1) + d * 86400000).toISOString().slice(0, 10);
}
