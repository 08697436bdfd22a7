/**
 * Fixture documents for the engine's reference tests: small models with known answers,
 * built in code so that each test states its parameters beside its check values.
 *
 * Unit factors used below (derived by hand, independent of the engine's unit library):
 *   mg/m^3 × m^3 = mg = 1e-6 kg;   g/m^2 × m^2 = g = 1e-3 kg;   g/m^2 × ha = 1e4 g = 10 kg.
 * Time: 1 yr = 365.25 d (the engine's `yr`); all run times are days since the period start.
 */
import { readFileSync } from 'node:fs';
import type {
  FlowDoc,
  MeasureDoc,
  ModelDoc,
  ParameterDoc,
  RunDoc,
  ScenarioDoc,
  SolverSettings,
  StateDoc,
  DerivedDoc
} from '../../../src/lib/engine/document/types';

export const START = '2027-01-01';
export const DAYS_PER_YEAR = 365.25;
/** mg/m^3 × m^3 → kg. */
export const MG_TO_KG = 1e-6;
/** g/m^2 × m^2 → kg. */
export const G_TO_KG = 1e-3;

const DAY_MS = 86_400_000;

/** ISO date `days` days after `date` (UTC). */
export function addDays(date: string, days: number): string {
  return new Date(Date.parse(date + 'T00:00:00Z') + days * DAY_MS).toISOString().slice(0, 10);
}

/** Whole days from `a` to `b` (ISO dates, UTC). */
export function daysBetween(a: string, b: string): number {
  return Math.round((Date.parse(b + 'T00:00:00Z') - Date.parse(a + 'T00:00:00Z')) / DAY_MS);
}

export function param(id: string, value: number, unit: string, source?: string): ParameterDoc {
  return source === undefined ? { id, value, unit } : { id, value, unit, source };
}

export function state(id: string, unit: string, initial: number, size: string, zone?: string): StateDoc {
  return zone === undefined ? { id, unit, initial, size } : { id, unit, initial, size, zone };
}

export function flow(id: string, rate: string, ends: { from?: string; to?: string }, role?: string): FlowDoc {
  const f: FlowDoc = { id, rate };
  if (ends.from !== undefined) f.from = ends.from;
  if (ends.to !== undefined) f.to = ends.to;
  if (role !== undefined) f.role = role;
  return f;
}

export function model(
  id: string,
  parts: { parameters: ParameterDoc[]; states: StateDoc[]; flows: FlowDoc[]; derived?: DerivedDoc[] }
): ModelDoc {
  const doc: ModelDoc = {
    format: 'lakeledger.model/1',
    id,
    title: id,
    timeOrigin: START,
    conserved: { element: 'P', unit: 'kg' },
    parameters: parts.parameters,
    states: parts.states,
    flows: parts.flows
  };
  if (parts.derived) doc.derived = parts.derived;
  return doc;
}

export interface ScenarioOptions {
  start?: string;
  /** Period end: an ISO date, or a number of days after the start. */
  end: string | number;
  outputStep?: number;
  solver?: Partial<SolverSettings>;
  measures?: MeasureDoc[];
  id?: string;
}

export function scenario(m: ModelDoc, o: ScenarioOptions): ScenarioDoc {
  const start = o.start ?? START;
  const end = typeof o.end === 'number' ? addDays(start, o.end) : o.end;
  const doc: ScenarioDoc = {
    format: 'lakeledger.scenario/1',
    id: o.id ?? `${m.id}_test`,
    model: m.id,
    period: { start, end, outputStep: o.outputStep ?? 1 }
  };
  if (o.solver) doc.solver = o.solver;
  if (o.measures) doc.measures = o.measures;
  return doc;
}

/** Tight settings for comparisons with closed forms. */
export const TIGHT: Partial<SolverSettings> = { rtol: 1e-10, atol: 1e-12, maxStep: 5, maxSteps: 1_000_000 };

/** Index of time `t` (days) in `run.times`; fails loudly when the grid does not hold it. */
export function indexOf(run: RunDoc, t: number): number {
  const i = run.times.findIndex((x) => Math.abs(x - t) <= 1e-9 * Math.max(1, Math.abs(t)));
  if (i < 0) throw new Error(`time ${t} d is not on the output grid (${run.times.length} points)`);
  return i;
}

/** Value of series `id` at day `t`. */
export function at(run: RunDoc, id: string, t: number): number {
  const s = run.series[id];
  if (!s) throw new Error(`run has no series '${id}' (series: ${Object.keys(run.series).join(', ')})`);
  return s[indexOf(run, t)];
}

export function relErr(got: number, want: number): number {
  return Math.abs(got - want) / Math.abs(want);
}

/** A readable status line for assertion messages. */
export function why(run: RunDoc): string {
  return `status ${run.status}${run.error ? `: ${run.error.code} ${run.error.message}` : ''}`;
}

/** Reads an example document from static/examples. */
export function loadExample(file: string): ModelDoc {
  const url = new URL(`../../../static/examples/${file}`, import.meta.url);
  return JSON.parse(readFileSync(url, 'utf8')) as ModelDoc;
}

// ---------------------------------------------------------------------------------------
// One-box lake (Vollenweider 1976; OECD 1982): V dP/dt = Q Pin − Q P − σ V P, σ = 1/√τ_w.

export interface OneBoxOptions {
  Pin: number;
  /** Hydraulic residence time, years. */
  tauYears: number;
  /** Volume, m^3 (default 1e7, check-values 1.2 budget case). */
  V?: number;
  P0?: number;
  /** Unit of Q: per year (default) or per day, to exercise the engine's time conversion. */
  qUnit?: 'm^3/yr' | 'm^3/d';
}

export function oneBox(o: OneBoxOptions): ModelDoc {
  const V = o.V ?? 1e7;
  const qPerYear = V / o.tauYears;
  const Q = o.qUnit === 'm^3/d' ? qPerYear / DAYS_PER_YEAR : qPerYear;
  return model('one_box', {
    parameters: [
      param('V', V, 'm^3'),
      param('Q', Q, o.qUnit ?? 'm^3/yr'),
      param('Pin', o.Pin, 'mg/m^3'),
      param('sigma', 1 / Math.sqrt(o.tauYears), '1/yr', 'Vollenweider 1976; OECD 1982: sigma = 1/sqrt(tau_w)')
    ],
    states: [state('TP', 'mg/m^3', o.P0 ?? 0, 'V', 'water')],
    flows: [
      flow('load', 'Q/V * Pin', { to: 'TP' }, 'externalLoad'),
      flow('outflow', 'Q/V * TP', { from: 'TP' }, 'outflow'),
      flow('settling', 'sigma * TP', { from: 'TP' }, 'sedimentation')
    ]
  });
}

// ---------------------------------------------------------------------------------------
// Linear chain A → B → C (Bateman 1910); C a pure sink unless kC is given (then an export).

export const CHAIN_VOLUME = 2.5e6; // m^3: 1 mg/m^3 in a box is 2.5 kg

export function chain(kA: number, kB: number, kC?: number): ModelDoc {
  const parameters = [param('V', CHAIN_VOLUME, 'm^3'), param('kA', kA, '1/d'), param('kB', kB, '1/d')];
  const flows = [flow('decayA', 'kA * A', { from: 'A', to: 'B' }), flow('decayB', 'kB * B', { from: 'B', to: 'C' })];
  if (kC !== undefined) {
    parameters.push(param('kC', kC, '1/d'));
    flows.push(flow('lossC', 'kC * C', { from: 'C' }, 'burial'));
  }
  return model('bateman_chain', {
    parameters,
    states: [state('A', 'mg/m^3', 1, 'V'), state('B', 'mg/m^3', 0, 'V'), state('C', 'mg/m^3', 0, 'V')],
    flows
  });
}

// ---------------------------------------------------------------------------------------
// Logistic growth as an import (Verhulst 1838).

export const LOGISTIC_VOLUME = 4e6; // m^3

export function logistic(r: number, K: number, N0: number): ModelDoc {
  return model('logistic', {
    parameters: [param('V', LOGISTIC_VOLUME, 'm^3'), param('r', r, '1/d'), param('K', K, 'mg/m^3')],
    states: [state('N', 'mg/m^3', N0, 'V')],
    flows: [flow('growth', 'r * N * (1 - N/K)', { to: 'N' }, 'growth')]
  });
}

// ---------------------------------------------------------------------------------------
// Two-box water–sediment model of check-values section 7 (derived two-box test):
// dMw/dt = L − (ρ + s) Mw + r Ms;  dMs/dt = s Mw − (r + b) Ms  (per year, kg).
// Water W in mg/m^3 over V; sediment S in g/m^2 over A, so the engine must convert.

export const WS = {
  L: 1000, // kg/yr
  rho: 2, // 1/yr
  s: 1.5, // 1/yr
  r: 0.1, // 1/yr
  b: 0.05, // 1/yr
  V: 1e7, // m^3
  A: 1e6 // m^2
} as const;

/** kg in the water for W in mg/m^3, kg in the sediment for S in g/m^2. */
export const waterMass = (W: number) => W * WS.V * MG_TO_KG;
export const sedimentMass = (S: number) => S * WS.A * G_TO_KG;

export function waterSediment(W0 = 0, S0 = 0): ModelDoc {
  return model('water_sediment', {
    parameters: [
      param('V', WS.V, 'm^3'),
      param('A', WS.A, 'm^2'),
      param('Lw', WS.L, 'kg/yr'),
      param('rho', WS.rho, '1/yr'),
      param('ks', WS.s, '1/yr'),
      param('kr', WS.r, '1/yr'),
      param('kb', WS.b, '1/yr')
    ],
    states: [state('W', 'mg/m^3', W0, 'V', 'water'), state('S', 'g/m^2', S0, 'A', 'sediment')],
    flows: [
      flow('load', 'Lw / V', { to: 'W' }, 'externalLoad'),
      flow('outflow', 'rho * W', { from: 'W' }, 'outflow'),
      flow('settling', 'ks * W', { from: 'W', to: 'S' }, 'sedimentation'),
      flow('release', 'kr * S', { from: 'S', to: 'W' }, 'release'),
      flow('burial', 'kb * S', { from: 'S' }, 'burial')
    ]
  });
}

// ---------------------------------------------------------------------------------------
// Robertson (1966) kinetics as a closed three-box model, states in mg/m^3.

export const ROBERTSON_VOLUME = 1e6; // m^3: 1 mg/m^3 is 1 kg

export function robertson(): ModelDoc {
  return model('robertson', {
    parameters: [
      param('V', ROBERTSON_VOLUME, 'm^3'),
      param('k1', 0.04, '1/d'),
      param('k2', 3e7, 'm^3/mg/d'),
      param('k3', 1e4, 'm^3/mg/d')
    ],
    states: [state('y1', 'mg/m^3', 1, 'V'), state('y2', 'mg/m^3', 0, 'V'), state('y3', 'mg/m^3', 0, 'V')],
    flows: [
      flow('r1', 'k1 * y1', { from: 'y1', to: 'y2' }),
      flow('r2', 'k2 * y2^2', { from: 'y2', to: 'y3' }),
      flow('r3', 'k3 * y2 * y3', { from: 'y2', to: 'y1' })
    ]
  });
}

// ---------------------------------------------------------------------------------------
// A lake with a fish compartment for removal measures: DIP in mg/m^3 over V, FISH in g/m^2
// over an area in ha (1 g/m^2 over 1 ha = 10 kg).

export const FISH = { V: 3e6, A: 40, kgPerUnit: 10 } as const;

export function fishLake(): ModelDoc {
  return model('fish_lake', {
    parameters: [
      param('V', FISH.V, 'm^3'),
      param('A', FISH.A, 'ha'),
      param('Lin', 0.2, 'mg/m^3/d'),
      param('q', 0.005, '1/d'),
      param('kF', 0.002, '1/d'),
      param('kE', 0.003, '1/d')
    ],
    states: [state('DIP', 'mg/m^3', 30, 'V', 'water'), state('FISH', 'g/m^2', 0.5, 'A', 'biota')],
    flows: [
      flow('load', 'Lin', { to: 'DIP' }, 'externalLoad'),
      flow('flush', 'q * DIP', { from: 'DIP' }, 'outflow'),
      flow('feeding', 'kF * DIP', { from: 'DIP', to: 'FISH' }, 'uptake'),
      flow('fishExcretion', 'kE * FISH', { from: 'FISH', to: 'DIP' }, 'excretion')
    ]
  });
}

/** Total P in the fish lake, kg, from the two series at index i. */
export function fishLakeMass(run: RunDoc, i: number): number {
  return run.series.DIP[i] * FISH.V * MG_TO_KG + run.series.FISH[i] * FISH.A * FISH.kgPerUnit;
}

// ---------------------------------------------------------------------------------------
// Square-root kinetics X' = L − k √(Xref·X): the rate is NaN for X < 0, so a trial step
// that overshoots zero yields a non-finite derivative.

export function sqrtDrain(opts: { load: number; k: number; X0: number }): ModelDoc {
  const parameters = [param('V', 1e6, 'm^3'), param('k', opts.k, '1/d'), param('Xref', 1, 'mg/m^3')];
  const flows = [flow('drain', 'k * sqrt(Xref * X)', { from: 'X' }, 'outflow')];
  if (opts.load > 0) {
    parameters.push(param('Lx', opts.load, 'mg/m^3/d'));
    flows.unshift(flow('load', 'Lx', { to: 'X' }, 'externalLoad'));
  }
  return model('sqrt_drain', { parameters, states: [state('X', 'mg/m^3', opts.X0, 'V')], flows });
}
