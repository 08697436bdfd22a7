/**
 * What the engine worker does with each message, apart from the worker global so it can
 * be tested in Node: the engine, the way out and the clock come in as arguments.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { SettleOptions, SettleResult } from '$lib/engine/longrun/settle';
import type { SweepDoc, SweepOptions } from '$lib/engine/longrun/sweep';
import type { MemberDraw } from '$lib/engine/uncertainty/lhs';
import { headlines, runIndicators } from '$lib/engine/compare/indicators';
import { toDaily } from '$lib/engine/indicators/daily';
import { uncertainInputs } from '$lib/engine/uncertainty/lhs';
import { quantile } from '$lib/engine/uncertainty/distributions';
import { morrisDesign } from '$lib/engine/uncertainty/morris';
import { mulberry32 } from '$lib/engine/balance/identity';
import { MEMBER_WARNINGS } from '$lib/engine/uncertainty/member-run';
import {
  PROTOCOL_VERSION,
  isCancelRequest,
  isEnsembleRequest,
  isMorrisRequest,
  isRunRequest,
  isSettleRequest,
  isSweepRequest,
  requestIdOf,
  type FromWorker,
  type RunRequest,
  type SettleRequest,
  type SettleSummary,
  type SweepRequest,
  type EnsembleRequest,
  type MorrisRequest,
  type EnsembleColumn,
  type MemberRun
} from './protocol';
import { createProgressThrottle } from './progress-throttle';

/** The part of the engine's `simulate` the worker uses. */
export type SimulateFn = (
  model: ModelDoc,
  scenario: ScenarioDoc | undefined,
  options: {
    signal: AbortSignal;
    onProgress: (p: { fraction: number; day: number }) => void;
    initial?: Record<string, number>;
  }
) => RunDoc;

/** The engine's `settle`, and the mean of a series over a settled cycle's growing season. */
export type SettleFn = (model: ModelDoc, options: SettleOptions) => SettleResult;
export type CycleMeanFn = (cycle: RunDoc, id: string) => number;
/** The engine's `sweep`; it throws an error with a `code` for bad input (SweepInputError). */
export type SweepFn = (model: ModelDoc, options: SweepOptions) => SweepDoc;

/** One scenario made ready for many members (the engine's `prepareRuns`). */
export type PreparedScenario =
  | { ok: true; run: (draw: MemberDraw, signal: AbortSignal) => RunDoc }
  | { ok: false; code: string; message: string };

/** What `ensemble` and `morris` requests need of the engine. */
export interface EnsembleKit {
  /** The whole design of n sets (the engine's `sampleModel`); throws an error with a `code` for bad input. */
  sample: (model: ModelDoc, n: number, seed: number) => { members: MemberDraw[]; sampled: { parameters: string[]; states: string[] } };
  prepare: (model: ModelDoc, scenario: ScenarioDoc) => PreparedScenario;
}

/** The series an ensemble returns, by role: what the Uncertainty screen draws as bands. */
export const ENSEMBLE_ROLES = ['chlorophyll', 'totalP', 'secchi'] as const;
export const DEFAULT_GRID_DAYS = 10;

/** The value columns of a member: the headline values (no day counts, years or indices). */
export function memberColumns(run: RunDoc, model: ModelDoc): { columns: EnsembleColumn[]; values: Record<string, number | null> } {
  const heads = headlines(runIndicators(run, model)).filter((h) => h.kind === 'value');
  const columns = heads.map((h) => ({ key: h.key, role: h.role, label: h.label, unit: h.unit, better: h.better }));
  const values: Record<string, number | null> = {};
  for (const h of heads) values[h.key] = typeof h.value === 'number' && Number.isFinite(h.value) ? h.value : null;
  return { columns, values };
}

/** The role series of the model (the first reported derived quantity with each role). */
export function roleSeriesOf(model: ModelDoc): Record<string, { id: string; label: string; unit: string }> {
  const out: Record<string, { id: string; label: string; unit: string }> = {};
  for (const role of ENSEMBLE_ROLES) {
    const d = (model.derived ?? []).find((x) => x.role === role && x.report !== false);
    if (d) out[role] = { id: d.id, label: d.label ?? d.id, unit: d.unit };
  }
  return out;
}

/** A series on the thinned daily grid: day 0, g, 2g, … (the daily value, linear between outputs). */
export function thinned(run: RunDoc, id: string, gridDays: number): number[] {
  const v = run.series[id];
  if (!v) return [];
  const daily = toDaily(run.start, run.times, v).values;
  const out: number[] = [];
  for (let d = 0; d < daily.length; d += gridDays) out.push(daily[d]);
  return out;
}

/** One member's run under one scenario as the ensemble message carries it. */
export function memberRunOf(
  run: RunDoc,
  model: ModelDoc,
  roles: Record<string, { id: string }>,
  gridDays: number
): { member: MemberRun; columns: EnsembleColumn[] } {
  if (run.status !== 'ok') {
    return {
      member: { status: 'failed', closed: false, relativeResidual: null, code: run.error?.code ?? 'failed', message: run.error?.message ?? 'the run failed', values: {}, series: null },
      columns: []
    };
  }
  const { columns, values } = memberColumns(run, model);
  const series: Record<string, number[]> = {};
  for (const [role, { id }] of Object.entries(roles)) series[role] = thinned(run, id, gridDays);
  const closed = run.closure.ok;
  const warnings = (run.warnings ?? []).filter((w) => MEMBER_WARNINGS.has(w.code)).map((w) => ({ code: w.code, ...(w.id ? { id: w.id } : {}), message: w.message }));
  return {
    member: {
      status: 'ok',
      closed,
      relativeResidual: run.closure.relativeResidual,
      code: closed ? null : 'closure_failed',
      message: closed ? null : `mass closure failed: residual ${run.closure.relativeResidual.toExponential(2)} of throughput exceeds ${run.closure.tolerance}`,
      values,
      series,
      ...(warnings.length ? { warnings } : {})
    },
    columns
  };
}

export interface EngineHostOptions {
  simulate: SimulateFn;
  /** Needed for `settle` requests; without it they are refused as bad messages. */
  settle?: SettleFn;
  cycleMean?: CycleMeanFn;
  /** Needed for `sweep` requests. */
  sweep?: SweepFn;
  /** Needed for `ensemble` requests. */
  ensemble?: EnsembleKit;
  post: (message: FromWorker) => void;
  /** Clock for progress throttling, milliseconds. Default `performance.now`. */
  now?: () => number;
  /** Least time between two progress messages, milliseconds. Default 100. */
  progressIntervalMs?: number;
}

/** Returns the handler for each message the worker receives. */
export function createEngineHost(options: EngineHostOptions): (data: unknown) => void {
  const { simulate, post } = options;
  const running = new Map<string, AbortController>();

  function run(request: RunRequest): void {
    const { requestId } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    const shouldSend = createProgressThrottle({
      minIntervalMs: options.progressIntervalMs,
      now: options.now
    });
    try {
      const result = simulate(request.model, request.scenario, {
        signal: controller.signal,
        ...(request.initial ? { initial: request.initial } : {}),
        onProgress: ({ fraction, day }) => {
          if (shouldSend(fraction)) {
            post({ v: PROTOCOL_VERSION, type: 'progress', requestId, fraction, day });
          }
        }
      });
      post({ v: PROTOCOL_VERSION, type: 'result', requestId, run: result });
    } catch (err) {
      // The engine reports bad models as failed runs; an exception here is a bug in it.
      post({
        v: PROTOCOL_VERSION,
        type: 'error',
        requestId,
        code: 'engine_exception',
        message: err instanceof Error ? err.message : String(err)
      });
    } finally {
      running.delete(requestId);
    }
  }

  function exception(requestId: string, err: unknown): void {
    post({
      v: PROTOCOL_VERSION,
      type: 'error',
      requestId,
      code: 'engine_exception',
      message: err instanceof Error ? err.message : String(err)
    });
  }

  function settleOne(request: SettleRequest, settleFn: SettleFn): void {
    const { requestId } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    try {
      const r = settleFn(request.model, {
        signal: controller.signal,
        ...(request.parameters ? { parameters: request.parameters } : {}),
        ...(request.initial ? { initial: request.initial } : {}),
        ...(request.forcingScale ? { forcingScale: request.forcingScale } : {}),
        ...(request.maxCycles ? { maxCycles: request.maxCycles } : {})
      });
      const seasonMeans: Record<string, number> = {};
      if (r.outcome === 'settled' && r.cycle && options.cycleMean) {
        for (const id of Object.keys(r.cycle.series)) {
          const m = options.cycleMean(r.cycle, id);
          if (Number.isFinite(m)) seasonMeans[id] = m;
        }
      }
      const result: SettleSummary = {
        outcome: r.outcome,
        cycles: r.cycles,
        lastChange: r.lastChange,
        state: r.state,
        message: r.message,
        seasonMeans,
        units: r.cycle ? { ...r.cycle.units } : {}
      };
      post({ v: PROTOCOL_VERSION, type: 'settleResult', requestId, result });
    } catch (err) {
      exception(requestId, err);
    } finally {
      running.delete(requestId);
    }
  }

  function sweepOne(request: SweepRequest, sweepFn: SweepFn): void {
    const { requestId } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    try {
      const doc = sweepFn(request.model, {
        ...request.settings,
        settle: { signal: controller.signal },
        // one message per long run: a sweep has tens of them, each taking a second or more
        onProgress: ({ done, total }) => post({ v: PROTOCOL_VERSION, type: 'sweepProgress', requestId, done, total })
      });
      post({ v: PROTOCOL_VERSION, type: 'sweepResult', requestId, sweep: doc });
    } catch (err) {
      const code = (err as { code?: unknown }).code;
      if (err instanceof Error && typeof code === 'string') {
        // bad input (unknown target, bad range): the user's to fix, not a defect
        post({ v: PROTOCOL_VERSION, type: 'sweepResult', requestId, problem: { code, message: err.message } });
      } else {
        exception(requestId, err);
      }
    } finally {
      running.delete(requestId);
    }
  }

  function ensembleOne(request: EnsembleRequest, kit: EnsembleKit): void {
    const { requestId, model } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    const gridDays = request.gridDays ?? DEFAULT_GRID_DAYS;
    try {
      let design: ReturnType<EnsembleKit['sample']>;
      try {
        design = kit.sample(model, request.n, request.seed);
      } catch (err) {
        const code = (err as { code?: unknown }).code;
        if (err instanceof Error && typeof code === 'string') {
          post({ v: PROTOCOL_VERSION, type: 'ensembleResult', requestId, problem: { code, message: err.message } });
          return;
        }
        throw err;
      }
      const roles = roleSeriesOf(model);
      const prepared = request.scenarios.map((sc) => kit.prepare(model, sc));
      let done = 0;
      let columns: EnsembleColumn[] = [];
      for (const member of request.members) {
        if (controller.signal.aborted) break;
        const runs: MemberRun[] = [];
        let cancelled = false;
        for (const p of prepared) {
          if (!p.ok) {
            runs.push({ status: 'failed', closed: false, relativeResidual: null, code: p.code, message: p.message, values: {}, series: null });
            continue;
          }
          const r = p.run(design.members[member], controller.signal);
          if (r.status === 'cancelled') {
            cancelled = true;
            break;
          }
          const m = memberRunOf(r, model, roles, gridDays);
          if (m.columns.length && !columns.length) columns = m.columns;
          runs.push(m.member);
        }
        if (cancelled) break;
        done++;
        // one message per member: each is a whole run per scenario, seconds of work
        post({ v: PROTOCOL_VERSION, type: 'ensembleMember', requestId, member, runs, columns, roles, gridDays });
      }
      post({ v: PROTOCOL_VERSION, type: 'ensembleResult', requestId, done, asked: request.members.length, sampled: design.sampled });
    } catch (err) {
      exception(requestId, err);
    } finally {
      running.delete(requestId);
    }
  }

  /** The problem of an error that carries a `code` (the engine's input errors), else null. */
  function problemOf(err: unknown): { code: string; message: string } | null {
    const code = (err as { code?: unknown })?.code;
    return err instanceof Error && typeof code === 'string' ? { code, message: err.message } : null;
  }

  function morrisOne(request: MorrisRequest, kit: EnsembleKit): void {
    const { requestId, model } = request;
    const controller = new AbortController();
    running.set(requestId, controller);
    try {
      let inputs: ReturnType<typeof uncertainInputs>;
      try {
        inputs = uncertainInputs(model);
        if (inputs.length === 0) throw Object.assign(new Error(`model '${model.id}' has no parameter with a range and no state with an initialRange: nothing to screen`), { code: 'nothing_to_sample' });
      } catch (err) {
        const problem = problemOf(err);
        if (!problem) throw err;
        post({ v: PROTOCOL_VERSION, type: 'morrisResult', requestId, problem });
        return;
      }
      const k = inputs.length;
      // the whole design from the seed, as the engine's morris() draws it, then our trajectories
      const { design, moved } = morrisDesign(k, request.r, request.p, mulberry32(request.seed));
      const prepared = kit.prepare(model, request.scenario);
      if (!prepared.ok) {
        post({ v: PROTOCOL_VERSION, type: 'morrisResult', requestId, problem: { code: prepared.code, message: prepared.message } });
        return;
      }
      const f = (x: number[]): number | null | 'cancelled' => {
        const draw: MemberDraw = { parameters: {}, initial: {} };
        inputs.forEach((inp, i) => ((inp.kind === 'parameter' ? draw.parameters : draw.initial)[inp.id] = quantile(inp.marginal, x[i])));
        const r = prepared.run(draw, controller.signal);
        if (r.status === 'cancelled') return 'cancelled';
        if (r.status !== 'ok' || !r.closure.ok) return null;
        return memberColumns(r, model).values[request.indicator] ?? null;
      };
      let done = 0;
      outer: for (const t of request.trajectories) {
        if (controller.signal.aborted) break;
        const points = design[t];
        const effects: (number | null)[] = new Array(k).fill(null);
        let failed = 0;
        let prev = f(points[0]);
        if (prev === 'cancelled') break;
        if (prev === null) failed++;
        for (let s = 0; s < moved[t].length; s++) {
          const i = moved[t][s];
          const next = f(points[s + 1]);
          if (next === 'cancelled') break outer;
          if (next === null) failed++;
          effects[i] = prev !== null && next !== null ? (next - prev) / (points[s + 1][i] - points[s][i]) : null;
          prev = next;
        }
        done++;
        post({ v: PROTOCOL_VERSION, type: 'morrisTrajectory', requestId, trajectory: t, effects, failed, evaluations: k + 1 });
      }
      post({ v: PROTOCOL_VERSION, type: 'morrisResult', requestId, done, asked: request.trajectories.length, delta: request.p / (2 * (request.p - 1)), inputs: inputs.map((i) => ({ kind: i.kind, id: i.id })) });
    } catch (err) {
      exception(requestId, err);
    } finally {
      running.delete(requestId);
    }
  }

  return (data) => {
    if (isRunRequest(data)) return run(data);
    if (isMorrisRequest(data) && options.ensemble) return morrisOne(data, options.ensemble);
    if (isEnsembleRequest(data) && options.ensemble) return ensembleOne(data, options.ensemble);
    if (isSettleRequest(data) && options.settle) return settleOne(data, options.settle);
    if (isSweepRequest(data) && options.sweep) return sweepOne(data, options.sweep);
    if (isCancelRequest(data)) {
      running.get(data.requestId)?.abort();
      return;
    }
    const version = typeof data === 'object' && data !== null ? (data as { v?: unknown }).v : undefined;
    post({
      v: PROTOCOL_VERSION,
      type: 'error',
      requestId: requestIdOf(data),
      code: 'bad_message',
      message:
        version !== PROTOCOL_VERSION
          ? `engine worker: unsupported protocol version ${JSON.stringify(version)} (supported: ${PROTOCOL_VERSION})`
          : 'engine worker: message is not a well-formed run, settle, sweep, ensemble, morris or cancel request'
    });
  };
}
