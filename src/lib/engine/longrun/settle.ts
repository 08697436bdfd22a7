/**
 * The long-run state of a model under its seasonal forcing: run cycle after cycle (365
 * days by default, the period of the trade's seasonal forcings) until every state's value
 * one cycle apart changes by less than the tolerance, then report the settled cycle and
 * how many cycles it took — or say that it did not settle (an oscillation or a drift)
 * within the limit.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '../document/types';
import { SCENARIO_FORMAT } from '../document/types';
import { prepareRuns, type SimulateOptions } from '../simulate';
import { isoOfDay } from '../solve/schedule';
import { dayNumber } from '../document/validate-scenario';
import { GROWING_SEASON, type Season } from '../indicators/seasonal';
import { analyzeModel } from '../document/validate-model';
import { symbolsOf } from '../expr/ir';

/**
 * The states that any flow's rate reads, directly or through derived quantities. A state
 * outside this set (a burial pool that only fills) cannot change the dynamics, grows or
 * shrinks for ever, and is left out of the settling test.
 */
export function statesThatDrive(model: ModelDoc): Set<string> {
  const a = analyzeModel(model).model;
  if (!a) return new Set(model.states.map((s) => s.id));
  const derived = new Map(a.derived.map((d) => [d.id, d.ir]));
  const out = new Set<string>();
  const seen = new Set<string>();
  const visit = (name: string) => {
    if (seen.has(name)) return;
    seen.add(name);
    const k = a.kinds.get(name);
    if (k === 'state') out.add(name);
    else if (k === 'derived') symbolsOf(derived.get(name)!).forEach(visit);
  };
  for (const f of a.flows) symbolsOf(f.ir).forEach(visit);
  return out;
}

export interface SettleOptions {
  /** Relative change one cycle apart below which a state counts as settled. Default 1e-6. */
  tolerance?: number;
  /** Absolute floor of the comparison, in each state's unit. Default 1e-9. */
  absTolerance?: number;
  /** Most cycles before giving up. Default 200. */
  maxCycles?: number;
  /** Cycles run per solver call. Default 10. */
  chunkCycles?: number;
  /** Cycle length in days. Default 365. */
  cycleDays?: number;
  /** First day (ISO). Default: the model's timeOrigin or 2027-01-01. */
  start?: string;
  /** Parameter values by id (model units). */
  parameters?: Record<string, number>;
  /** Initial values by state id. */
  initial?: Record<string, number>;
  /** Forcing scale factors by forcing id (applied from the start). */
  forcingScale?: Record<string, number>;
  solver?: ScenarioDoc['solver'];
  signal?: SimulateOptions['signal'];
}

export type SettleOutcome = 'settled' | 'oscillation' | 'drift' | 'failed';

export interface SettleResult {
  outcome: SettleOutcome;
  /** Cycles integrated in all. */
  cycles: number;
  /** Largest relative change over the last cycle (per state: |Δ| / max(|x|, floor)). */
  lastChange: number;
  /** State values at the end (start of the next cycle). */
  state: Record<string, number>;
  /** The last cycle, daily: its run document (times from its own start). */
  cycle: RunDoc | null;
  message: string;
}

const DEFAULTS = { tolerance: 1e-6, absTolerance: 1e-9, maxCycles: 200, chunkCycles: 10, cycleDays: 365 };

export function settle(model: ModelDoc, opts: SettleOptions = {}): SettleResult {
  const o = { ...DEFAULTS, ...opts };
  let startDay = dayNumber(o.start ?? model.timeOrigin ?? '2027-01-01');
  let state: Record<string, number> = Object.fromEntries(model.states.map((s) => [s.id, o.initial?.[s.id] ?? s.initial]));
  let cycles = 0;
  const driving = statesThatDrive(model);
  const compared = model.states.filter((s) => driving.has(s.id));
  const changes: number[] = [];
  const signs: number[] = [];
  let lastCycle: RunDoc | null = null;
  while (cycles < o.maxCycles) {
    const n = Math.min(o.chunkCycles, o.maxCycles - cycles);
    const start = isoOfDay(startDay);
    const end = isoOfDay(startDay + n * o.cycleDays);
    const scenario: ScenarioDoc = {
      format: SCENARIO_FORMAT,
      id: 'long_run',
      model: model.id,
      period: { start, end, outputStep: 1 },
      ...(o.solver ? { solver: o.solver } : {}),
      measures: Object.entries(o.forcingScale ?? {}).map(([target, factor], i) => ({ id: `scale${i + 1}`, kind: 'scale' as const, target, factor, from: start }))
    };
    // the model's time origin stays where the model puts it, so forcings keep their calendar place
    const m: ModelDoc = model.timeOrigin ? model : { ...model, timeOrigin: isoOfDay(dayNumber(o.start ?? '2027-01-01')) };
    const prepared = prepareRuns(m, scenario);
    if (!prepared.ok) return fail(cycles, state, prepared.run);
    const run = prepared.runner.run({ parameters: o.parameters, initial: state }, { skipRunId: true, signal: o.signal });
    if (run.status !== 'ok') return fail(cycles, state, run);
    // year-on-year change at each cycle boundary inside this chunk
    for (let k = 1; k <= n; k++) {
      const a = k * o.cycleDays;
      const b = (k - 1) * o.cycleDays;
      let worst = 0;
      let sign = 0;
      for (const s of compared) {
        const x1 = run.series[s.id][a];
        const x0 = run.series[s.id][b];
        const d = (x1 - x0) / Math.max(Math.abs(x1), o.absTolerance / o.tolerance);
        if (Math.abs(d) > Math.abs(worst)) worst = d;
      }
      sign = Math.sign(worst);
      changes.push(Math.abs(worst));
      signs.push(sign);
      cycles++;
      if (Math.abs(worst) < o.tolerance) {
        lastCycle = sliceCycle(run, b, a, startDay);
        const endState = Object.fromEntries(model.states.map((s) => [s.id, run.series[s.id][a]]));
        return {
          outcome: 'settled',
          cycles,
          lastChange: Math.abs(worst),
          state: endState,
          cycle: lastCycle,
          message: `settled after ${cycles} cycles of ${o.cycleDays} days (largest change over the last cycle ${Math.abs(worst).toExponential(1)}, tolerance ${o.tolerance})${ignoredNote(model, driving)}`
        };
      }
    }
    state = Object.fromEntries(model.states.map((s) => [s.id, run.series[s.id][n * o.cycleDays]]));
    lastCycle = sliceCycle(run, (n - 1) * o.cycleDays, n * o.cycleDays, startDay);
    startDay += n * o.cycleDays;
  }
  // Not settled: alternating signs of the change mean an oscillation, one sign a drift.
  const tail = signs.slice(-10);
  const flips = tail.slice(1).filter((s, i) => s !== 0 && s !== tail[i]).length;
  const outcome: SettleOutcome = flips >= 3 ? 'oscillation' : 'drift';
  const last = changes[changes.length - 1] ?? NaN;
  return {
    outcome,
    cycles,
    lastChange: last,
    state,
    cycle: lastCycle,
    message: `did not settle within ${o.maxCycles} cycles: ${outcome === 'oscillation' ? 'the states still oscillate from cycle to cycle' : 'the states still drift'} (change over the last cycle ${last.toExponential(1)}, tolerance ${o.tolerance})`
  };
}

function ignoredNote(model: ModelDoc, driving: Set<string>): string {
  const left = model.states.filter((s) => !driving.has(s.id)).map((s) => s.id);
  return left.length ? `; ${left.join(', ')} no rate reads, so ${left.length === 1 ? 'it was' : 'they were'} left out of the test` : '';
}

function fail(cycles: number, state: Record<string, number>, run: RunDoc): SettleResult {
  return { outcome: 'failed', cycles, lastChange: NaN, state, cycle: null, message: `a run failed: ${run.error?.message ?? run.status}` };
}

/** The cycle from run day b to a as a run of its own (times from 0). */
function sliceCycle(run: RunDoc, b: number, a: number, startDay: number): RunDoc {
  const series: Record<string, number[]> = {};
  for (const [id, v] of Object.entries(run.series)) series[id] = v.slice(b, a + 1);
  return { ...run, start: isoOfDay(startDay + b), times: run.times.slice(b, a + 1).map((t) => t - b), series, budget: [] };
}

/** Mean of a series over the days of a cycle that fall in `season` (calendar months). */
export function cycleSeasonMean(cycle: RunDoc, id: string, season: Season | null = GROWING_SEASON): number {
  const start = Date.parse(`${cycle.start}T00:00:00Z`);
  let sum = 0;
  let n = 0;
  const v = cycle.series[id];
  // the last point is the next cycle's first: leave it out
  for (let k = 0; k < cycle.times.length - 1; k++) {
    const m = new Date(start + cycle.times[k] * 86400000).getUTCMonth() + 1;
    const inSeason = !season || (season.fromMonth <= season.toMonth ? m >= season.fromMonth && m <= season.toMonth : m >= season.fromMonth || m <= season.toMonth);
    if (!inSeason || !Number.isFinite(v[k])) continue;
    sum += v[k];
    n++;
  }
  return n ? sum / n : NaN;
}
