/**
 * Stage 4: integrate a bound model over a scenario's schedule. Segments end at every
 * breakpoint (measures, ramps, 1 January, the period's end); dated events are applied at
 * segment ends and booked; `auto` starts with odex and moves to the stiff method for the
 * rest of the run when odex's steps collapse. Returns raw columns for closure (stage 5).
 */
import type { CompiledModel, BoundModel } from '../compile/compile-model';
import type { RunErrorDoc, RunWarningDoc, SolverSettings } from '../document/types';
import type { Schedule, DatedEvent } from './schedule';
import { isoOfDay } from './schedule';
import { odexSegment, NonFiniteError } from './odex-segment';
import { dopri5Segment } from './dopri5';
import { rosenbrockSegment, StepUnderflowError } from './rosenbrock';
import type { OdeSystem, SegmentOptions, SegmentResult, SegmentSolver } from './types';
import { symbolsOf } from '../expr/ir';

/** How `auto` recognises stiffness: this many accepted steps in a row below maxStep/100. */
export const COLLAPSE_WINDOW = 200;
export const COLLAPSE_FRACTION = 0.01;
/** Absolute tolerance that takes a component out of the error norm. */
export const UNCONTROLLED_ATOL = 1e300;

export interface YearRecord {
  fromDay: number;
  toDay: number;
  /** Mass moved by each flow in the year, conserved unit. */
  flows: Float64Array;
  /** Mass moved by each measure in the year, by measure id. */
  measures: Map<string, number>;
  imported: number;
  exported: number;
  massStart: number;
  massEnd: number;
}

export interface RawRun {
  status: 'ok' | 'failed' | 'cancelled';
  error: RunErrorDoc | null;
  /** Run days recorded (a prefix of the grid when the run stopped early). */
  times: number[];
  /** One column per state: the values at `times`. */
  states: Float64Array[];
  /** Cumulative imports/exports at `times`, events included, conserved unit. */
  imported: Float64Array;
  exported: Float64Array;
  /** Conserved mass before any measure at day 0. */
  initialMass: number;
  years: YearRecord[];
  method: ExplicitMethod | 'stiff';
  /** The explicit method `auto` started with, when it switched (`switchedAt` set). */
  startedWith: ExplicitMethod | null;
  switchedAt: number | null;
  steps: number;
  rejected: number;
  evaluations: number;
  warnings: RunWarningDoc[];
}

/** The part of an AbortSignal the engine reads (no DOM types in the engine). */
export interface CancelSignal {
  readonly aborted: boolean;
}

/** The explicit (non-stiff) methods: odex (the reference) and the project's Dormand–Prince 5(4). */
export type ExplicitMethod = 'odex' | 'dp54';

export interface IntegrateOptions {
  signal?: CancelSignal;
  /** Which explicit method `auto` starts with (default odex; ensembles use dp54 for speed). */
  autoStart?: ExplicitMethod;
  onProgress?: (p: { fraction: number; day: number }) => void;
}

/** Neumaier's compensated sum (Neumaier 1974), for masses over many compartments. */
export function massOf(y: ArrayLike<number>, m: Float64Array, conserved: boolean[]): number {
  let sum = 0;
  let c = 0;
  for (let i = 0; i < m.length; i++) {
    if (!conserved[i]) continue;
    const x = y[i] * m[i];
    const t = sum + x;
    c += Math.abs(sum) >= Math.abs(x) ? sum - t + x : x - t + sum;
    sum = t;
  }
  return sum + c;
}

export function integrate(
  compiled: CompiledModel,
  bound: BoundModel,
  schedule: Schedule,
  y0States: Float64Array,
  settings: SolverSettings,
  options: IntegrateOptions = {}
): RawRun {
  const nS = compiled.nStates;
  const nF = compiled.nFlows;
  const dim = compiled.dim;
  const IMP = compiled.importIndex;
  const EXP = compiled.exportIndex;
  const conserved = compiled.conserved;
  const m = bound.m;
  const off = schedule.offset;
  const grid = schedule.grid;

  const sys: OdeSystem = {
    n: dim,
    rhs: (t, y, dy) => bound.rhs(t + off, y, dy)
  };
  let stiffSys: OdeSystem | null = null;
  const stiffSystem = (): OdeSystem => {
    if (stiffSys) return stiffSys;
    const jf = compiled.jacobianFactory();
    const jac = jf ? jf(bound) : null;
    stiffSys = jac ? { n: dim, rhs: sys.rhs, jacobian: (t, y, J) => jac(t + off, y, J) } : sys;
    return stiffSys;
  };

  // The accumulators are left out of step-size control: they are integrals of the same
  // rates, so their error follows the states'; the closure is a linear invariant that the
  // methods keep to round-off whatever the step; and controlling them made odex follow
  // the stiff noise of a quasi-steady state (36 steps became 38,000 on one test model).
  const atol = new Float64Array(dim);
  for (let i = 0; i < dim; i++) atol[i] = i < nS ? settings.atol : UNCONTROLLED_ATOL;
  const dense: number[] = [];
  for (let i = 0; i < nS; i++) dense.push(i);
  dense.push(IMP, EXP);

  const y = new Float64Array(dim);
  y.set(y0States);
  const initialMass = massOf(y, m, conserved);

  const cap = grid.length;
  const times: number[] = [];
  const cols = Array.from({ length: nS }, () => new Float64Array(cap));
  const impCol = new Float64Array(cap);
  const expCol = new Float64Array(cap);
  let eventImp = 0;
  let eventExp = 0;
  const warnings: RunWarningDoc[] = [];
  const negWarned = new Set<number>();
  const negTol = (i: number, v: number) => v < -(10 * settings.atol + 1e-9 * Math.abs(y0States[i]));

  const record = (t: number, yy: Float64Array) => {
    const k = times.length;
    times.push(t);
    for (let i = 0; i < nS; i++) {
      const v = yy[i];
      cols[i][k] = v;
      if (!negWarned.has(i) && negTol(i, v)) {
        negWarned.add(i);
        warnings.push({
          code: 'negative_state',
          id: compiled.stateIds[i],
          time: t,
          message: `state \`${compiled.stateIds[i]}\` went negative (${v.toPrecision(4)}) on day ${t} (${isoOfDay(schedule.startDay + t)}); check the rates that drain it`
        });
      }
    }
    impCol[k] = yy[IMP] + eventImp;
    expCol[k] = yy[EXP] + eventExp;
  };

  // Year bookkeeping
  const years: YearRecord[] = [];
  let yearStartDay = 0;
  let yearAcc = new Float64Array(nF);
  let yearImp = 0;
  let yearExp = 0;
  let yearMass = initialMass;
  let yearMeasures = new Map<string, number>();
  const closeYear = (day: number) => {
    const flows = new Float64Array(nF);
    for (let k = 0; k < nF; k++) flows[k] = y[nS + k] - yearAcc[k];
    const massEnd = massOf(y, m, conserved);
    years.push({
      fromDay: yearStartDay,
      toDay: day,
      flows,
      measures: yearMeasures,
      imported: y[IMP] + eventImp - yearImp,
      exported: y[EXP] + eventExp - yearExp,
      massStart: yearMass,
      massEnd
    });
    yearStartDay = day;
    yearAcc = Float64Array.from(y.subarray(nS, nS + nF));
    yearImp = y[IMP] + eventImp;
    yearExp = y[EXP] + eventExp;
    yearMass = massEnd;
    yearMeasures = new Map();
  };

  const book = (id: string, mass: number) => yearMeasures.set(id, (yearMeasures.get(id) ?? 0) + mass);
  const applyEvent = (e: DatedEvent) => {
    const i = e.state;
    switch (e.kind) {
      case 'remove': {
        const amount = y[i] * e.fraction;
        y[i] -= amount;
        const mass = amount * m[i];
        if (conserved[i]) eventExp += mass;
        book(e.measureId, mass);
        break;
      }
      case 'add': {
        y[i] += e.amount;
        const mass = e.amount * m[i];
        if (conserved[i]) eventImp += mass;
        book(e.measureId, mass);
        break;
      }
      case 'transfer': {
        const j = e.into!;
        const amount = y[i] * e.fraction;
        const mass = amount * m[i];
        y[i] -= amount;
        y[j] += mass / m[j];
        book(e.measureId, mass);
        break;
      }
    }
  };

  let eventIdx = 0;
  const applyEventsAt = (day: number) => {
    while (eventIdx < schedule.events.length && schedule.events[eventIdx].day <= day) {
      applyEvent(schedule.events[eventIdx]);
      eventIdx++;
    }
  };

  let method: ExplicitMethod | 'stiff' =
    settings.method === 'stiff' ? 'stiff' : settings.method === 'dp54' ? 'dp54' : settings.method === 'odex' ? 'odex' : (options.autoStart ?? 'odex');
  let switchedAt: number | null = null;
  const startedWith: ExplicitMethod | null = method === 'stiff' ? null : method;
  let steps = 0;
  let rejected = 0;
  let evaluations = 0;
  let lastStep = 0;

  const fail = (error: RunErrorDoc): RawRun => result('failed', error);
  const result = (status: RawRun['status'], error: RunErrorDoc | null): RawRun => ({
    status,
    error,
    times,
    states: cols.map((c) => c.subarray(0, times.length)),
    imported: impCol.subarray(0, times.length),
    exported: expCol.subarray(0, times.length),
    initialMass,
    years,
    method,
    startedWith: switchedAt === null ? null : startedWith,
    switchedAt,
    steps,
    rejected,
    evaluations,
    warnings
  });

  applyEventsAt(0);
  record(0, y);
  let gi = 1; // next grid index
  let t = 0;
  const minStep = settings.maxStep * COLLAPSE_FRACTION;
  const startRates = new Float64Array(nF);

  for (const bp of schedule.breakpoints) {
    if (options.signal?.aborted) return result('cancelled', null);
    schedule.setSegment(t, bp);
    // A rate that is not finite where the segment starts cannot be stepped around.
    bound.rates(t + off, y, startRates);
    if (!allFinite(startRates, nF)) return fail(diagnose(compiled, bound, t + off, y, t, schedule, 'non_finite', settings.maxStep));
    // Grid times strictly inside (t, bp); the point at bp is recorded after its events.
    let gEnd = gi;
    while (gEnd < grid.length && grid[gEnd] < bp) gEnd++;
    const outTimes = grid.subarray(gi, gEnd);
    while (t < bp) {
      const remaining = settings.maxSteps - steps - rejected;
      if (remaining <= 0) return fail(maxStepsError(t, schedule, steps + rejected));
      const solver: SegmentSolver = method === 'odex' ? odexSegment : method === 'dp54' ? dopri5Segment : rosenbrockSegment;
      const opts: SegmentOptions = {
        rtol: settings.rtol,
        atol,
        maxStep: settings.maxStep,
        maxSteps: remaining,
        initialStep: lastStep > 0 ? lastStep : undefined,
        denseComponents: dense,
        quadratureFrom: nS,
        collapse: method !== 'stiff' && settings.method === 'auto' ? { minStep, window: COLLAPSE_WINDOW } : undefined
      };
      let r: SegmentResult;
      try {
        r = solver(method !== 'stiff' ? sys : stiffSystem(), t, y, bp, outTimes, (tt, yy) => {
          record(tt, yy);
          gi++;
          if (options.signal?.aborted) return false;
        }, opts);
      } catch (e) {
        if (e instanceof NonFiniteError || e instanceof StepUnderflowError) {
          steps += e.stats.steps;
          rejected += e.stats.rejected;
          evaluations += e.stats.evaluations;
          const at = e.t;
          const yy = e instanceof NonFiniteError ? e.y : y;
          return fail(diagnose(compiled, bound, at + off, yy, at, schedule, e instanceof StepUnderflowError ? 'step_underflow' : 'non_finite', settings.maxStep));
        }
        throw e;
      }
      steps += r.steps;
      rejected += r.rejected;
      evaluations += r.evaluations;
      if (r.lastStep > 0) lastStep = Math.min(r.lastStep, settings.maxStep);
      y.set(r.y);
      t = r.t;
      if (r.status === 'ok') break;
      if (r.status === 'stopped') {
        if (options.signal?.aborted) return result('cancelled', null);
        return fail({ code: 'internal', message: `the solver stopped early on day ${t}` });
      }
      if (r.status === 'maxSteps') {
        const d = diagnose(compiled, bound, t + off, y, t, schedule, 'max_steps', settings.maxStep);
        return fail(d.code === 'non_finite_rate' ? d : maxStepsError(t, schedule, steps + rejected));
      }
      if (r.status === 'collapsed') {
        method = 'stiff';
        switchedAt = t;
        lastStep = 0;
        // Go on from t with the stiff method: solvers skip output times <= their t0,
        // so the outputs already recorded are not repeated.
      }
    }
    t = bp;
    if (schedule.yearEnds.has(bp)) closeYear(bp);
    applyEventsAt(bp);
    if (gi < grid.length && grid[gi] === bp) {
      record(bp, y);
      gi++;
    }
    if (!allFinite(y, nS)) {
      return fail(diagnose(compiled, bound, t + off, y, t, schedule, 'non_finite'));
    }
    options.onProgress?.({ fraction: bp / schedule.endDay, day: bp });
  }
  warnings.push(...nearToleranceWarnings(cols, times, compiled.stateIds, settings.atol, schedule));
  if (steps + rejected > 0.5 * settings.maxSteps) {
    warnings.push({
      code: 'many_steps',
      message: `the solver needed ${steps + rejected} steps of the ${settings.maxSteps} allowed; the model may be stiff (try method 'stiff') or need a larger maxSteps`
    });
  }
  return result('ok', null);
}

/** A state within this many absolute tolerances of zero is held only to about its own size. */
export const NEAR_ATOL_FACTOR = 10;
/** …and one that grows again by this factor after that has a course set by the solver's error there. */
export const REGROWTH_FACTOR = 1000;

/**
 * A state that sank to within NEAR_ATOL_FACTOR × atol of zero and then grew again by more
 * than REGROWTH_FACTOR (a population nearly gone that recovers) is integrated, at its low
 * point, to an error of the order of its own value: when it recovers, and so everything it
 * drives later, depends on that error (seen on the demo lake: a member whose phytoplankton
 * fell to 3.5e-9 mg/m³ recovered to 4.2 or to 0.0004 with two methods at atol 1e-9, and to
 * 4.0 with both at atol 1e-14). One warning per such state; the run is still ok.
 */
export function nearToleranceWarnings(cols: Float64Array[], times: readonly number[], ids: readonly string[], atol: number, schedule: Schedule): RunWarningDoc[] {
  const out: RunWarningDoc[] = [];
  const n = times.length;
  cols.forEach((c, i) => {
    let kMin = -1;
    let min = Infinity;
    for (let k = 0; k < n; k++) if (c[k] >= 0 && c[k] < min) ((min = c[k]), (kMin = k));
    if (kMin < 0 || !(min < NEAR_ATOL_FACTOR * atol)) return;
    let after = 0;
    for (let k = kMin + 1; k < n; k++) after = Math.max(after, c[k]);
    if (!(after > REGROWTH_FACTOR * Math.max(min, atol))) return;
    const t = times[kMin];
    out.push({
      code: 'near_absolute_tolerance',
      id: ids[i],
      time: t,
      message: `state \`${ids[i]}\` fell to ${min.toPrecision(2)} on day ${round(t)} (${isoOfDay(schedule.startDay + Math.floor(t))}), within ${NEAR_ATOL_FACTOR} × the absolute tolerance ${atol}, and grew again to ${after.toPrecision(3)}: its later course depends on the solver's error at that low point; rerun with a smaller atol (e.g. ${atol / 1000}) to check`
    });
  });
  return out;
}

function allFinite(y: Float64Array, n: number): boolean {
  for (let i = 0; i < n; i++) if (!Number.isFinite(y[i])) return false;
  return true;
}

function maxStepsError(t: number, schedule: Schedule, used: number): RunErrorDoc {
  return {
    code: 'max_steps',
    time: t,
    message: `the solver ran out of steps on day ${round(t)} (${isoOfDay(schedule.startDay + Math.floor(t))}) after ${used} steps; try method 'stiff' (the model may be stiff), a larger maxSteps, or look for very fast rates`
  };
}

function round(x: number): number {
  return Math.round(x * 1000) / 1000;
}

/** Names the flow whose rate is not finite at (t, y), with the values it was computed from. */
function diagnose(
  compiled: CompiledModel,
  bound: BoundModel,
  tModel: number,
  y: Float64Array,
  day: number,
  schedule: Schedule,
  why: 'non_finite' | 'step_underflow' | 'max_steps',
  maxStep = 1
): RunErrorDoc {
  const a = compiled.analysis;
  const rates = new Float64Array(compiled.nFlows);
  const derived = new Float64Array(compiled.derivedIds.length);
  const forcings = new Float64Array(compiled.forcingIds.length);
  bound.rates(tModel, y, rates);
  bound.derived(tModel, y, derived);
  bound.forcings(tModel, forcings);
  const date = isoOfDay(schedule.startDay + Math.floor(day));
  const valueOf = (name: string): number | undefined => {
    const k = a.kinds.get(name);
    if (k === 'state') return y[compiled.stateIds.indexOf(name)];
    if (k === 'derived') return derived[compiled.derivedIds.indexOf(name)];
    if (k === 'forcing') return forcings[compiled.forcingIds.indexOf(name)];
    if (k === 'parameter') return a.parameters.find((p) => p.id === name)!.value;
    return undefined;
  };
  const named = (yy: Float64Array, trial: boolean): RunErrorDoc | null => {
    bound.rates(tModel, yy, rates);
    bound.derived(tModel, yy, derived);
    for (const f of a.flows) {
      const r = rates[f.index];
      if (Number.isFinite(r)) continue;
      const values: Record<string, number> = {};
      for (const s of symbolsOf(f.ir)) {
        const k = a.kinds.get(s);
        const v =
          k === 'state' ? yy[compiled.stateIds.indexOf(s)] : k === 'derived' ? derived[compiled.derivedIds.indexOf(s)] : valueOf(s);
        if (v !== undefined) values[s] = v;
      }
      const shown = Object.entries(values)
        .map(([k, v]) => `${k} = ${Number.isFinite(v) ? v.toPrecision(6) : String(v)}`)
        .join(', ');
      return {
        code: 'non_finite_rate',
        time: day,
        flow: f.id,
        values,
        message: trial
          ? `the rate of flow \`${f.id}\` turns ${String(r)} just past day ${round(day)} (${date}): the solver cannot step beyond the point where it is computed from ${shown} (a state driven below zero?)`
          : `the rate of flow \`${f.id}\` is ${String(r)} on day ${round(day)} (${date}), computed from ${shown || 'constants only'}`
      };
    }
    return null;
  };
  const direct = named(y, false);
  if (direct) return direct;
  // Finite here, but the solver could not go on: probe Euler trial steps, which is what
  // the solver's own trials look like, for a flow that turns non-finite just ahead.
  const dy = new Float64Array(compiled.dim);
  bound.rhs(tModel, y, dy);
  const trial = new Float64Array(y);
  for (const h of [1e-9, 1e-6, 1e-3, 1e-1, 1, maxStep]) {
    for (let i = 0; i < compiled.nStates; i++) trial[i] = y[i] + h * dy[i];
    const t = named(trial, true);
    if (t) return t;
  }
  const badState = compiled.stateIds.find((_, i) => !Number.isFinite(y[i]));
  if (badState) {
    return { code: 'non_finite_state', time: day, message: `state \`${badState}\` is not finite on day ${round(day)} (${date})` };
  }
  if (why === 'step_underflow') {
    return { code: 'step_underflow', time: day, message: `the step size fell to round-off on day ${round(day)} (${date}): the rates change too abruptly there (a discontinuity or a singularity)` };
  }
  if (why === 'max_steps') return { code: 'max_steps', time: day, message: `the solver ran out of steps on day ${round(day)} (${date})` };
  return { code: 'non_finite', time: day, message: `the right-hand side is not finite near day ${round(day)} (${date})` };
}
