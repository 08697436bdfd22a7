/** Tiny synthetic runs for the comparison tests: values chosen so that every result can be computed by hand. */
import type { ModelDoc, RunDoc } from '../../../src/lib/engine/document/types';

/** A model with the four indicator roles (any subset), nothing else the indicators read. */
export function roleModel(roles: Record<string, { id: string; unit: string; report?: boolean }>): ModelDoc {
  return {
    format: 'lakeledger.model/1',
    id: 'tiny',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [{ id: 'V', value: 1, unit: 'm^3' }],
    states: [{ id: 'X', unit: 'mg/m^3', initial: 1, size: 'V' }],
    derived: Object.entries(roles).map(([role, d]) => ({ id: d.id, expression: 'X', unit: d.unit, role, report: d.report ?? true })),
    flows: []
  };
}

/** A run from `start` with the given times and series (status ok unless told). */
export function fakeRun(start: string, times: number[], series: Record<string, number[]>, units: Record<string, string>, over: Partial<RunDoc> = {}): RunDoc {
  return {
    format: 'lakeledger.run/1',
    id: 'run_test',
    model: 'tiny',
    scenario: 'baseline',
    modelDigest: 'sha256:0',
    scenarioDigest: 'sha256:0',
    engine: 'test',
    status: 'ok',
    error: null,
    start,
    startedAt: '2027-01-01T00:00:00Z',
    wallMs: 0,
    times,
    units,
    series,
    closure: { unit: 'kg', initialMass: 0, finalMass: 0, imported: 0, exported: 0, maxResidual: 0, relativeResidual: 0, tolerance: 1e-9, ok: true },
    budget: [],
    solver: { method: 'odex', switchedAt: null, rtol: 1e-6, atol: 1e-9, maxStep: 5, steps: 0, rejected: 0, evaluations: 0 },
    warnings: [],
    ...over
  };
}

/** Days 0..n-1 from `start` and a value per day from f(date). */
export function daily(start: string, n: number, f: (d: Date, i: number) => number): { times: number[]; values: number[] } {
  const t0 = Date.parse(`${start}T00:00:00Z`);
  const times = Array.from({ length: n }, (_, i) => i);
  return { times, values: times.map((i) => f(new Date(t0 + i * 86400000), i)) };
}

/** Growing season April–September (months 4–9). */
export const inSeason = (d: Date) => d.getUTCMonth() >= 3 && d.getUTCMonth() <= 8;
