/**
 * Explore the demo lake with the hand-written right-hand side and odex, without
 * the engine: per scenario the yearly summer (June-August) means of chlorophyll,
 * total P, Secchi depth, plants and fish, the odex step counts, the mass closure,
 * a clear-start test of bistability, and the wall time of a 20-year baseline run.
 *
 *   npx tsx test/bench/demo-explore.ts                 all four scenarios + clear start
 *   npx tsx test/bench/demo-explore.ts fish_removal    one scenario
 *   npx tsx test/bench/demo-explore.ts --time          only the timing of the baseline
 *
 * Measures are emulated by hand, as the engine defines them: `scale` multiplies a
 * parameter from its date, ramped linearly over `rampDays` (the parameter is set
 * inside the right-hand side while the ramp runs); `remove` takes a fraction of a
 * state at its date (an export; the series hold the value after the measure).
 * The run is integrated piecewise between measure dates.
 */
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Solver, type OutputFunction } from 'odex';
import type { ModelDoc, ScenarioDoc, MeasureDoc } from '../../src/lib/engine/document/types';
import { makeDemoHandRhs, type DemoHandRhs } from './demo-hand';

const EXAMPLES = new URL('../../static/examples/', import.meta.url);
const readJson = <T>(name: string): T => JSON.parse(readFileSync(new URL(name, EXAMPLES), 'utf8')) as T;

export const SCENARIO_FILES: Record<string, string> = {
  baseline: 'demo-lake.baseline.scenario.json',
  half_load: 'demo-lake.half-load.scenario.json',
  fish_removal: 'demo-lake.fish-removal.scenario.json',
  load_and_fish: 'demo-lake.load-and-fish.scenario.json'
};

const DAY_MS = 86400000;
const dayOf = (iso: string, origin: string): number => Math.round((Date.parse(iso + 'T00:00:00Z') - Date.parse(origin + 'T00:00:00Z')) / DAY_MS);

/** Dates of a dated measure with its repeats, in days since the origin. */
function measureDays(m: MeasureDoc & { on: string; repeat?: { count: number; everyYears?: number; everyDays?: number } }, origin: string): number[] {
  const out: number[] = [];
  const count = m.repeat?.count ?? 1;
  const first = new Date(m.on + 'T00:00:00Z');
  for (let k = 0; k < count; k++) {
    if (m.repeat?.everyDays) out.push(dayOf(m.on, origin) + k * m.repeat.everyDays);
    else {
      const d = new Date(Date.UTC(first.getUTCFullYear() + k * (m.repeat?.everyYears ?? 1), first.getUTCMonth(), first.getUTCDate()));
      out.push(Math.round((d.getTime() - Date.parse(origin + 'T00:00:00Z')) / DAY_MS));
    }
  }
  return out;
}

/** Output on a regular grid from odex's dense output (as odex's own `grid`, states only). */
function gridObserver(dt: number, ns: number, out: (t: number, y: number[]) => void): OutputFunction {
  let next = 0;
  return (nr, _xOld, x, y, dense) => {
    if (nr === 1) {
      out(x, y.slice(0, ns));
      next = x + dt;
      return;
    }
    while (next <= x && dense) {
      const yy: number[] = [];
      for (let i = 0; i < ns; i++) yy.push(dense(i, next));
      out(next, yy);
      next += dt;
    }
  };
}

export interface ExploreRun {
  times: number[];
  /** Daily states (9 per day, flattened). */
  states: Float64Array[];
  finalY: number[];
  steps: number;
  rejected: number;
  evaluations: number;
  removedKg: number;
  closureResidualKg: number;
  closureRelative: number;
  wallMs: number;
  hand: DemoHandRhs;
}

export function runScenario(model: ModelDoc, scenario: ScenarioDoc, init: Record<string, number> = {}, dense = true): ExploreRun {
  const t0 = performance.now();
  const origin = model.timeOrigin ?? scenario.period.start;
  const start = dayOf(scenario.period.start, origin);
  const end = dayOf(scenario.period.end, origin);
  const hand = makeDemoHandRhs(model);
  const base = hand.params;
  const ns = model.states.length;
  const idx: Record<string, number> = Object.create(null);
  model.states.forEach((s, i) => (idx[s.id] = i));

  // scale measures as time functions of their parameter; removal events
  const scales: { target: string; factor: number; from: number; until: number; ramp: number }[] = [];
  const removals: { day: number; state: number; fraction: number }[] = [];
  const breaks = new Set<number>([start, end]);
  for (const m of scenario.measures ?? []) {
    if (m.kind === 'scale') {
      const from = dayOf(m.from, origin);
      const until = m.until ? dayOf(m.until, origin) : Infinity;
      scales.push({ target: m.target, factor: m.factor, from, until, ramp: m.rampDays ?? 0 });
      breaks.add(from);
      if (m.rampDays) breaks.add(from + m.rampDays);
      if (Number.isFinite(until)) breaks.add(until);
    } else if (m.kind === 'remove') {
      for (const d of measureDays(m, origin)) {
        removals.push({ day: d, state: idx[m.state], fraction: m.fraction });
        breaks.add(d);
      }
    } else {
      throw new Error(`demo-explore: measure kind ${m.kind} is not emulated`);
    }
  }
  const factorAt = (s: (typeof scales)[number], t: number): number => {
    if (t < s.from || t >= s.until) return 1;
    if (s.ramp > 0 && t < s.from + s.ramp) return 1 + (s.factor - 1) * ((t - s.from) / s.ramp);
    return s.factor;
  };
  const paramsAt = (t: number): Record<string, number> => {
    const out: Record<string, number> = {};
    for (const s of scales) out[s.target] = (out[s.target] ?? base[s.target]) * factorAt(s, t);
    return out;
  };

  const pts = [...breaks].filter((d) => d >= start && d <= end).sort((a, b) => a - b);
  let y = [...model.states.map((s) => (s.id in init ? init[s.id] : s.initial)), ...model.flows.map(() => 0)];
  const m0 = y.slice(0, ns).reduce((s, v, i) => s + v * hand.mass[i], 0);
  const dy = new Float64Array(hand.n);
  const times: number[] = [];
  const states: Float64Array[] = [];
  let steps = 0, rejected = 0, evaluations = 0, removedKg = 0;

  const record = (t: number, yy: number[]): void => {
    const row = Float64Array.from(yy.slice(0, ns));
    if (times.length && times[times.length - 1] === t) states[states.length - 1] = row;
    else {
      times.push(t);
      states.push(row);
    }
  };

  for (let k = 0; k + 1 < pts.length; k++) {
    const a = pts[k], b = pts[k + 1];
    for (const r of removals) {
      if (r.day === a) {
        const taken = y[r.state] * r.fraction;
        removedKg += taken * hand.mass[r.state];
        y[r.state] -= taken;
      }
    }
    // a ramp (or step) that changes inside [a, b) is evaluated inside the RHS
    const ramping = scales.some((s) => s.ramp > 0 && a >= s.from && a < s.from + s.ramp && a < s.until);
    hand.setParams({ ...base, ...paramsAt(a) });
    const f = ramping
      ? (t: number, yy: number[]): number[] => {
          hand.setParams(paramsAt(t));
          hand.rhs(t, yy, dy);
          return Array.from(dy);
        }
      : (t: number, yy: number[]): number[] => {
          hand.rhs(t, yy, dy);
          return Array.from(dy);
        };
    const s = new Solver(hand.n);
    s.maxStepSize = scenario.solver?.maxStep ?? 5;
    s.maxSteps = scenario.solver?.maxSteps ?? 1e5;
    s.relativeTolerance = scenario.solver?.rtol ?? 1e-6;
    s.absoluteTolerance = scenario.solver?.atol ?? 1e-9;
    s.denseOutput = dense;
    let res;
    if (dense) {
      // dense output of the states only; the accumulators are read at segment ends
      s.denseComponents = model.states.map((_, i) => i);
      res = s.solve(f, a, y, b, gridObserver(scenario.period.outputStep ?? 1, ns, record));
    } else res = s.solve(f, a, y, b);
    if (res.outcome !== 0) throw new Error(`odex outcome ${res.outcome} in segment ${a}-${b} at t=${res.xEnd}`);
    steps += res.nStep;
    rejected += res.nReject;
    evaluations += res.nEval;
    y = res.y;
    if (!dense) record(b, y);
  }
  record(end, y);
  // closure: M(end) - M(0) - (imports - exports) with removals as exports
  const mEnd = y.slice(0, ns).reduce((s, v, i) => s + v * hand.mass[i], 0);
  const acc = (id: string): number => y[ns + model.flows.findIndex((f) => f.id === id)];
  let imported = 0, exported = 0;
  model.flows.forEach((fl) => {
    if (!fl.from) imported += acc(fl.id);
    if (!fl.to) exported += acc(fl.id);
  });
  exported += removedKg;
  const residual = mEnd - m0 - (imported - exported);
  return {
    times,
    states,
    finalY: y,
    steps,
    rejected,
    evaluations,
    removedKg,
    closureResidualKg: residual,
    closureRelative: Math.abs(residual) / Math.max(m0, mEnd, imported, exported),
    wallMs: performance.now() - t0,
    hand
  };
}

export interface SummerRow {
  year: number;
  Chl: number;
  TP: number;
  Secchi: number;
  VEG: number;
  BFI: number;
  PFI: number;
  SED: number;
}

/** June-August means per calendar year. */
export function summerMeans(model: ModelDoc, run: ExploreRun, origin: string): SummerRow[] {
  const o = Date.parse(origin + 'T00:00:00Z');
  const first = new Date(o).getUTCFullYear();
  const last = new Date(o + run.times[run.times.length - 1] * DAY_MS).getUTCFullYear();
  const ix = (id: string) => model.states.findIndex((s) => s.id === id);
  const [iV, iB, iP, iS] = [ix('VEG'), ix('BFI'), ix('PFI'), ix('SED')];
  const rows: SummerRow[] = [];
  for (let yr = first; yr <= last; yr++) {
    const a = (Date.UTC(yr, 5, 1) - o) / DAY_MS, b = (Date.UTC(yr, 8, 1) - o) / DAY_MS;
    const acc = { Chl: 0, TP: 0, Secchi: 0, VEG: 0, BFI: 0, PFI: 0, SED: 0 };
    let n = 0;
    run.times.forEach((t, k) => {
      if (t < a || t >= b) return;
      const y = run.states[k];
      const r = run.hand.report(t, y);
      acc.Chl += r.Chl; acc.TP += r.TP; acc.Secchi += r.Secchi;
      acc.VEG += y[iV]; acc.BFI += y[iB]; acc.PFI += y[iP]; acc.SED += y[iS];
      n++;
    });
    if (n === 0) continue;
    rows.push({ year: yr, Chl: acc.Chl / n, TP: acc.TP / n, Secchi: acc.Secchi / n, VEG: acc.VEG / n, BFI: acc.BFI / n, PFI: acc.PFI / n, SED: acc.SED / n });
  }
  return rows;
}

/** A clear start: abundant plants, few benthivores, established piscivores, clear water. */
export const CLEAR_START: Record<string, number> = { DIP: 10, PHY: 8, ZOO: 10, DET: 8, BFI: 40, PFI: 30, VEG: 0.8 };

function printRows(label: string, run: ExploreRun, rows: SummerRow[]): void {
  console.log(`\n== ${label}: ${run.steps} steps (${run.rejected} rejected, ${run.evaluations} evaluations), ${run.wallMs.toFixed(0)} ms, removed ${run.removedKg.toFixed(1)} kg P, closure residual ${run.closureResidualKg.toExponential(2)} kg (relative ${run.closureRelative.toExponential(2)})`);
  console.log('year  Chl ug/L  TP mg/m3  Secchi m  VEG g/m2  BFI mg/m2  PFI mg/m2  SED g/m2');
  for (const r of rows) {
    console.log(`${r.year}  ${r.Chl.toFixed(1).padStart(8)}  ${r.TP.toFixed(0).padStart(8)}  ${r.Secchi.toFixed(2).padStart(8)}  ${r.VEG.toFixed(3).padStart(8)}  ${r.BFI.toFixed(0).padStart(9)}  ${r.PFI.toFixed(1).padStart(9)}  ${r.SED.toFixed(2).padStart(8)}`);
  }
}

function minimum(run: ExploreRun, model: ModelDoc): string {
  return model.states.map((s, i) => `${s.id} ${Math.min(...run.states.map((y) => y[i])).toPrecision(3)}`).join(', ');
}

function timeBaseline(model: ModelDoc, scenario: ScenarioDoc): void {
  const ms: number[] = [];
  for (let k = 0; k < 7; k++) ms.push(runScenario(model, scenario).wallMs);
  ms.sort((a, b) => a - b);
  const bare: number[] = [];
  for (let k = 0; k < 7; k++) bare.push(runScenario(model, scenario, {}, false).wallMs);
  bare.sort((a, b) => a - b);
  console.log(`\nbaseline 20 years, hand RHS + odex: median ${ms[3].toFixed(0)} ms with daily dense output (min ${ms[0].toFixed(0)}), ${bare[3].toFixed(0)} ms without output (min ${bare[0].toFixed(0)})`);
}

function main(): void {
  const args = process.argv.slice(2);
  const model = readJson<ModelDoc>('demo-lake.model.json');
  const origin = model.timeOrigin ?? '2027-01-01';
  const scenarios = Object.fromEntries(Object.entries(SCENARIO_FILES).map(([id, f]) => [id, readJson<ScenarioDoc>(f)]));
  if (args.includes('--time')) {
    timeBaseline(model, scenarios.baseline);
    return;
  }
  const which = args.filter((a) => !a.startsWith('--'));
  const ids = which.length ? which : Object.keys(scenarios);
  for (const id of ids) {
    const sc = scenarios[id];
    if (!sc) throw new Error(`unknown scenario ${id}`);
    const run = runScenario(model, sc);
    printRows(`${id} (${sc.title})`, run, summerMeans(model, run, origin));
    console.log('minimum of each state:', minimum(run, model));
  }
  if (!which.length) {
    const clear = runScenario(model, scenarios.baseline, CLEAR_START);
    printRows(`clear start at baseline load (${JSON.stringify(CLEAR_START)})`, clear, summerMeans(model, clear, origin));
    timeBaseline(model, scenarios.baseline);
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) main();
