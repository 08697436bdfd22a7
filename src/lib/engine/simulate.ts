/**
 * simulate(): the engine's entry point, a table of contents of its stages.
 *   1 validate   document/validate-model.ts, validate-scenario.ts
 *   2 compile    compile/compile-model.ts (generated right-hand side)
 *   3 assemble   solve/schedule.ts (measures, breakpoints) + bind parameters
 *   4 solve      solve/integrate.ts (odex, Rosenbrock, auto switching, events)
 *   5 close      closure/closure.ts (closure, per-year budget)
 *   6 summarise  the run document (lakeledger.run/1)
 * The engine does no I/O and reads no globals: clock, progress and cancellation come in
 * as options. It never throws for bad input: a run with status `failed` says what is wrong.
 */
import {
  DEFAULT_OUTPUT_STEP,
  DEFAULT_SOLVER,
  RUN_FORMAT,
  SCENARIO_FORMAT,
  type ModelDoc,
  type Problem,
  type RunDoc,
  type ScenarioDoc,
  type SolverSettings
} from './document/types';
import { analyzeModel } from './document/validate-model';
import { validateScenario } from './document/validate-scenario';
import { formatProblem, hasErrors } from './document/problems';
import { digestOf } from './document/digest';
import { compileModel, type CompiledModel } from './compile/compile-model';
import { buildSchedule } from './solve/schedule';
import { integrate, type CancelSignal, type RawRun } from './solve/integrate';
import { closureOf, budgetOf, DEFAULT_CLOSURE_TOLERANCE } from './closure/closure';
import { ENGINE_VERSION } from './version';

export interface SimulateOptions {
  /** Wall clock for `startedAt` (default: the system clock). */
  now?: () => Date;
  /** Monotonic milliseconds for `wallMs` (default: Date.now). */
  clock?: () => number;
  signal?: CancelSignal;
  onProgress?: (p: { fraction: number; day: number }) => void;
  /** Overrides the recorded engine version (tests). */
  engineVersion?: string;
  /** Parameter values by id in the model's units, replacing the document's (ensembles). */
  parameters?: Record<string, number>;
  /** Initial values by state id in the states' units, replacing the document's. */
  initial?: Record<string, number>;
  /** Relative closure tolerance (default 1e-9). */
  closureTolerance?: number;
  /** Leave `id` empty instead of digesting the run (ensemble members that are not archived). */
  skipRunId?: boolean;
  /** The explicit method that method `auto` starts with (default odex; ensembles: dp54). */
  autoStart?: 'odex' | 'dp54';
}

/** Default horizon of a run without a scenario, in years. */
export const DEFAULT_RUN_YEARS = 20;
export const DEFAULT_ORIGIN = '2027-01-01';

/** The scenario a model runs without one: a baseline of 20 years from its time origin. */
export function defaultScenario(model: ModelDoc): ScenarioDoc {
  const start = typeof model.timeOrigin === 'string' ? model.timeOrigin : DEFAULT_ORIGIN;
  const end = `${Number(start.slice(0, 4)) + DEFAULT_RUN_YEARS}${start.slice(4)}`;
  return {
    format: SCENARIO_FORMAT,
    id: 'baseline',
    title: 'Baseline (no measures)',
    model: model.id,
    period: { start, end, outputStep: DEFAULT_OUTPUT_STEP }
  };
}

export function solverSettings(scenario: ScenarioDoc): SolverSettings {
  return { ...DEFAULT_SOLVER, ...(scenario.solver ?? {}) };
}

export function simulate(model: ModelDoc, scenario?: ScenarioDoc, options: SimulateOptions = {}): RunDoc {
  try {
    return simulateStages(model, scenario, options);
  } catch (e) {
    // Nothing reaches the user as a bare stack trace: an unexpected failure is a failed run.
    const run = emptyRun(model, scenario, { ...DEFAULT_SOLVER }, (options.now ?? (() => new Date()))().toISOString(), options);
    const refused = e instanceof EvalError || /unsafe-eval|Content Security Policy/i.test(String((e as Error)?.message));
    run.error = refused
      ? { code: 'codegen_refused', message: "this page's security policy refuses generated code; the engine needs 'unsafe-eval' where it runs (the Web Worker); see DEVELOPERS.md, decisions" }
      : { code: 'internal', message: `internal error: ${(e as Error)?.message ?? String(e)} (please report)` };
    run.id = runId(run);
    return run;
  }
}

/** A model and scenario validated and compiled once, ready to run many times (ensembles). */
export interface Runner {
  readonly compiled: CompiledModel;
  /** One run; an ensemble member passes its own parameter and initial values. */
  run(member?: { parameters?: Record<string, number>; initial?: Record<string, number> }, options?: SimulateOptions): RunDoc;
}

export type Prepared = { ok: true; runner: Runner } | { ok: false; run: RunDoc };

/** Stages 1–3 once: validate, schedule the measures, compile. */
export function prepareRuns(model: ModelDoc, scenario?: ScenarioDoc, options: SimulateOptions = {}): Prepared {
  const clock = options.clock ?? (() => Date.now());
  const began = clock();
  const startedAt = (options.now ?? (() => new Date()))().toISOString();
  const sc = scenario ?? (model && typeof model === 'object' ? defaultScenario(model) : (undefined as never));
  const settings = sc && typeof sc === 'object' ? solverSettings(sc) : { ...DEFAULT_SOLVER };
  const shell = (): RunDoc => emptyRun(model, sc, settings, startedAt, options);

  // 1 validate
  const analysis = analyzeModel(model);
  if (!analysis.model) return { ok: false, run: failed(shell(), 'invalid_model', analysis.problems, clock() - began) };
  const scenarioProblems = validateScenario(sc, model);
  if (hasErrors(scenarioProblems)) return { ok: false, run: failed(shell(), 'invalid_scenario', scenarioProblems, clock() - began) };

  // the schedule names what measures change, which compile needs
  const schedule = buildSchedule(analysis.model, sc);
  // 2 compile
  const compiled = compileModel(analysis.model, { dynamic: schedule.dynamic });
  const am = analysis.model;
  const modelDigest = digestOf(model);
  const scenarioDigest = digestOf(sc);

  const run = (member: { parameters?: Record<string, number>; initial?: Record<string, number> } = {}, opts: SimulateOptions = options): RunDoc => {
    const clk = opts.clock ?? clock;
    const t0 = clk();
    const started = opts.now ? opts.now().toISOString() : startedAt;
    const base = (): RunDoc => ({ ...emptyRun(model, sc, settings, started, opts, { modelDigest, scenarioDigest }) });
    const overrideProblems = checkOverrides(model, member);
    // A spin-up scenario starts from a stored run's end state, which only the caller has.
    const spinUp = typeof sc.initialState === 'string' && sc.initialState !== 'model' ? sc.initialState : null;
    if (spinUp && !member.initial) {
      overrideProblems.push({
        severity: 'error',
        code: 'initial_state_missing',
        path: 'initialState',
        message: `the scenario starts from the end of run ${spinUp}, but that run's end state was not given (is the run stored?)`
      });
    }
    if (overrideProblems.length) return failed(base(), 'invalid_override', overrideProblems, clk() - t0);

    // 3 assemble
    const bound = compiled.bind(member.parameters ?? {}, schedule.modulators);
    const y0 = new Float64Array(compiled.nStates);
    for (const s of am.states) y0[s.index] = member.initial?.[s.id] ?? s.initial;

    // 4 solve
    const raw = integrate(compiled, bound, schedule, y0, settings, { signal: opts.signal, onProgress: opts.onProgress, autoStart: opts.autoStart });

    // 5 close
    const closure = closureOf(raw, bound.m, compiled.conserved, am.conserved.text, opts.closureTolerance ?? DEFAULT_CLOSURE_TOLERANCE);
    const budget = budgetOf(raw, compiled.flowIds, schedule.measureIds, schedule.startDay);

    // 6 summarise
    const doc = base();
    const { series, units } = seriesOf(raw, compiled, bound, schedule.offset);
    if (spinUp && member.initial) doc.initialState = { run: spinUp, values: { ...member.initial } };
    doc.status = raw.status;
    doc.error = raw.error;
    doc.times = raw.times;
    doc.series = series;
    doc.units = units;
    doc.closure = closure;
    doc.budget = budget;
    doc.solver = {
      method: raw.method,
      switchedAt: raw.switchedAt,
      ...(raw.startedWith ? { startedWith: raw.startedWith } : {}),
      rtol: settings.rtol,
      atol: settings.atol,
      maxStep: settings.maxStep,
      maxSteps: settings.maxSteps,
      steps: raw.steps,
      rejected: raw.rejected,
      evaluations: raw.evaluations
    };
    doc.warnings = [
      ...analysis.problems.filter((p) => p.severity === 'warning').map((p) => ({ code: p.code, message: `model ${p.path}: ${p.message}`, id: p.id })),
      ...scenarioProblems.filter((p) => p.severity === 'warning').map((p) => ({ code: p.code, message: `scenario ${p.path}: ${p.message}`, id: p.id })),
      ...schedule.warnings.filter((w) => !scenarioProblems.some((p) => p.code === w.code && p.id === w.id)),
      ...raw.warnings
    ];
    if (raw.switchedAt !== null) {
      doc.warnings.push({ code: 'switched_to_stiff', time: raw.switchedAt, message: `${raw.startedWith === 'dp54' ? 'the Dormand–Prince' : "odex's"} steps collapsed on day ${Math.round(raw.switchedAt * 1000) / 1000}; the run went on with the stiff method (Rosenbrock RODAS4)` });
    }
    if (doc.status === 'ok' && !closure.ok) {
      doc.warnings.push({ code: 'closure_failed', message: `mass closure failed: residual ${closure.relativeResidual.toExponential(2)} of throughput exceeds ${closure.tolerance}` });
    }
    doc.wallMs = Math.max(0, clk() - t0);
    doc.id = opts.skipRunId ? '' : runId(doc);
    return doc;
  };
  return { ok: true, runner: { compiled, run } };
}

function simulateStages(model: ModelDoc, scenario: ScenarioDoc | undefined, options: SimulateOptions): RunDoc {
  const prepared = prepareRuns(model, scenario, options);
  if (!prepared.ok) return prepared.run;
  return prepared.runner.run({ parameters: options.parameters, initial: options.initial }, options);
}

function checkOverrides(model: ModelDoc, options: { parameters?: Record<string, number>; initial?: Record<string, number> }): Problem[] {
  const out: Problem[] = [];
  const params = new Set(model.parameters.map((p) => p.id));
  const states = new Set(model.states.map((s) => s.id));
  for (const [k, v] of Object.entries(options.parameters ?? {})) {
    if (!params.has(k)) out.push({ severity: 'error', code: 'unknown_parameter', path: `parameters.${k}`, message: `no parameter '${k}' to override` });
    else if (!Number.isFinite(v)) out.push({ severity: 'error', code: 'not_a_number', path: `parameters.${k}`, message: `override of '${k}' must be a finite number` });
  }
  for (const [k, v] of Object.entries(options.initial ?? {})) {
    if (!states.has(k)) out.push({ severity: 'error', code: 'unknown_state', path: `initial.${k}`, message: `no state '${k}' to start from` });
    else if (!Number.isFinite(v)) out.push({ severity: 'error', code: 'not_a_number', path: `initial.${k}`, message: `initial value of '${k}' must be a finite number` });
  }
  return out;
}

function seriesOf(raw: RawRun, compiled: ReturnType<typeof compileModel>, bound: ReturnType<ReturnType<typeof compileModel>['bind']>, offset: number) {
  const a = compiled.analysis;
  const series: Record<string, number[]> = {};
  const units: Record<string, string> = {};
  a.states.forEach((s, i) => {
    series[s.id] = Array.from(raw.states[i]);
    units[s.id] = s.unit.text;
  });
  const reported = a.derived.filter((d) => d.report);
  if (reported.length) {
    const cols = reported.map(() => new Array<number>(raw.times.length));
    const y = new Float64Array(compiled.dim);
    const out = new Float64Array(a.derived.length);
    for (let k = 0; k < raw.times.length; k++) {
      for (let i = 0; i < compiled.nStates; i++) y[i] = raw.states[i][k];
      bound.derived(raw.times[k] + offset, y, out);
      reported.forEach((d, j) => (cols[j][k] = out[d.index]));
    }
    reported.forEach((d, j) => {
      series[d.id] = cols[j];
      units[d.id] = d.unit.text;
    });
  }
  return { series, units };
}

function emptyRun(
  model: ModelDoc,
  scenario: ScenarioDoc | undefined,
  settings: SolverSettings,
  startedAt: string,
  options: SimulateOptions,
  digests?: { modelDigest: string; scenarioDigest: string }
): RunDoc {
  const safeDigest = (d: unknown) => {
    try {
      return digestOf(d);
    } catch {
      return 'sha256:unavailable';
    }
  };
  const m = (model ?? {}) as Partial<ModelDoc>;
  const s = (scenario ?? {}) as Partial<ScenarioDoc>;
  return {
    format: RUN_FORMAT,
    id: '',
    model: typeof m.id === 'string' ? m.id : '',
    scenario: typeof s.id === 'string' ? s.id : '',
    modelDigest: digests?.modelDigest ?? safeDigest(model ?? null),
    scenarioDigest: digests?.scenarioDigest ?? safeDigest(scenario ?? null),
    engine: options.engineVersion ?? ENGINE_VERSION,
    status: 'failed',
    error: null,
    start: typeof s.period?.start === 'string' ? s.period.start : '',
    startedAt,
    wallMs: 0,
    times: [],
    units: {},
    series: {},
    closure: { unit: typeof m.conserved?.unit === 'string' ? m.conserved.unit : '', initialMass: 0, finalMass: 0, imported: 0, exported: 0, maxResidual: 0, relativeResidual: 0, tolerance: options.closureTolerance ?? DEFAULT_CLOSURE_TOLERANCE, ok: false },
    budget: [],
    solver: { method: settings.method, switchedAt: null, rtol: settings.rtol, atol: settings.atol, maxStep: settings.maxStep, maxSteps: settings.maxSteps, steps: 0, rejected: 0, evaluations: 0 },
    warnings: []
  };
}

function failed(run: RunDoc, code: string, problems: Problem[], wallMs: number): RunDoc {
  const errors = problems.filter((p) => p.severity === 'error');
  run.status = 'failed';
  run.error = {
    code,
    message: `${code === 'invalid_model' ? 'the model' : code === 'invalid_scenario' ? 'the scenario' : 'the run options'} ${errors.length === 1 ? 'has an error' : `has ${errors.length} errors`}:\n${errors.map((p) => formatProblem(p)).join('\n')}`
  };
  (run as RunDoc & { problems?: Problem[] }).problems = problems;
  run.wallMs = wallMs;
  run.id = runId(run);
  return run;
}

/** Digest of a run's inputs and results (never startedAt or wallMs). */
export function runDigest(run: RunDoc): string {
  const { id: _id, startedAt: _s, wallMs: _w, ...rest } = run;
  return digestOf(rest);
}

function runId(run: RunDoc): string {
  return `run_${runDigest(run).slice('sha256:'.length, 'sha256:'.length + 16)}`;
}
