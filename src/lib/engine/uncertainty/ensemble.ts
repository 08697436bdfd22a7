/**
 * An ensemble: one model under several scenarios with the SAME parameter sets (common
 * random numbers). The sets are drawn once (Latin hypercube, lhs.ts); each scenario is
 * validated and compiled once (`prepareRuns`), and every member runs through the compiled
 * runner without a run id. Every member's closure is checked; members that failed or did
 * not close are counted and listed, never dropped silently, and the summaries are over the
 * members that ran and closed. A member's value for a series is its time mean over the last
 * five years of the period (window.ts); each series is summarised by mean and percentiles
 * (summaries.ts); each scenario after the first also by its paired difference from the
 * first, member by member (paired.ts).
 *
 * Members run member-major (member j under every scenario, then member j + 1), so a
 * cancelled ensemble has the same members in every scenario; it is marked partial.
 * `runMembers` runs any slice of the sets, so a caller may split them across threads and
 * join the slices in order: the document is the same as from one thread.
 */
import type { ModelDoc, ScenarioDoc } from '../document/types';
import { prepareRuns, defaultScenario, type Runner } from '../simulate';
import { digestOf } from '../document/digest';
import { ENGINE_VERSION } from '../version';
import type { CancelSignal } from '../solve/integrate';
import { sampleModel, type MemberDraw, type ModelSample } from './lhs';
import { summarize, type Summary } from './summaries';
import { pairedDifference } from './paired';
import { shareMeeting } from './share';
import { MEMBER_WARNINGS } from './member-run';
export { MEMBER_WARNINGS } from './member-run';
import { windowStartDay, timeMeanFrom, LAST_YEARS } from './window';
import { UncertaintyInputError } from './errors';

export const ENSEMBLE_FORMAT = 'lakeledger.ensemble/1';

/**
 * The explicit method an ensemble member starts with when its scenario's solver method is
 * `auto`: the project's Dormand–Prince 5(4), about twice as fast as odex on the demo lake
 * (shared/design/engine-notes.md; test/engine/solve/dopri5.test.ts holds it against odex).
 * A scenario that names a method (odex, dp54, stiff) gets that method.
 */
export const ENSEMBLE_AUTO_START = 'dp54' as const;

export interface MemberOutcome {
  member: number;
  /** `ok` ran to the end; `failed` (error code and message); `cancelled` never counts. */
  status: 'ok' | 'failed' | 'cancelled';
  closed: boolean;
  relativeResidual: number | null;
  code: string | null;
  message: string | null;
  /** Last-five-year time mean of each series (null unless the run finished). */
  values: Record<string, number> | null;
  /** Warnings of the run that bear on its numbers (MEMBER_WARNINGS); the member still counts. */
  warnings?: { code: string; id?: string; message: string }[];
}


export interface ScenarioOutcomes {
  id: string;
  /** Series ids in order: states, then reported derived quantities. */
  seriesIds: string[];
  outcomes: MemberOutcome[];
}

export interface RunMembersOptions {
  /** Index of the first draw in the whole ensemble (for slices). Default 0. */
  offset?: number;
  signal?: CancelSignal;
  onProgress?: (p: { done: number; total: number }) => void;
}

export interface MembersResult {
  scenarios: ScenarioOutcomes[];
  /** Members finished under every scenario. */
  completed: number;
  partial: boolean;
}

function seriesIdsOf(runner: Runner): string[] {
  const a = runner.compiled.analysis;
  return [...a.states.map((s) => s.id), ...a.derived.filter((d) => d.report).map((d) => d.id)];
}

/** Runs the given sets under each scenario (member-major). */
export function runMembers(model: ModelDoc, scenarios: readonly ScenarioDoc[], draws: readonly MemberDraw[], options: RunMembersOptions = {}): MembersResult {
  const offset = options.offset ?? 0;
  const prepared = scenarios.map((sc) => {
    const p = prepareRuns(model, sc, { now: () => new Date(0), clock: () => 0 });
    return { sc, p, from: windowStartDay(sc), ids: p.ok ? seriesIdsOf(p.runner) : [] };
  });
  const out: ScenarioOutcomes[] = prepared.map(({ sc, ids }) => ({ id: sc.id, seriesIds: ids, outcomes: [] }));
  let completed = 0;
  let partial = false;
  for (let j = 0; j < draws.length; j++) {
    if (options.signal?.aborted) {
      partial = true;
      break;
    }
    const row: MemberOutcome[] = [];
    let cancelled = false;
    for (const { p, from, ids } of prepared) {
      const member = offset + j;
      if (!p.ok) {
        row.push({ member, status: 'failed', closed: false, relativeResidual: null, code: p.run.error?.code ?? 'failed', message: p.run.error?.message ?? 'the scenario could not be prepared', values: null });
        continue;
      }
      const run = p.runner.run(draws[j], { skipRunId: true, signal: options.signal, now: () => new Date(0), clock: () => 0, autoStart: ENSEMBLE_AUTO_START });
      if (run.status === 'cancelled') {
        cancelled = true;
        break;
      }
      let values: Record<string, number> | null = null;
      if (run.status === 'ok') {
        values = {};
        for (const id of ids) values[id] = timeMeanFrom(run.times, run.series[id], from);
      }
      row.push({
        member,
        status: run.status === 'ok' ? 'ok' : 'failed',
        closed: run.status === 'ok' && run.closure.ok,
        relativeResidual: run.status === 'ok' ? run.closure.relativeResidual : null,
        code: run.status === 'ok' ? (run.closure.ok ? null : 'closure_failed') : (run.error?.code ?? 'failed'),
        message: run.status === 'ok' ? (run.closure.ok ? null : `mass closure failed: residual ${run.closure.relativeResidual.toExponential(2)} of throughput exceeds ${run.closure.tolerance}`) : (run.error?.message ?? 'the run failed'),
        values,
        ...memberWarnings(run.warnings)
      });
    }
    if (cancelled) {
      partial = true;
      break;
    }
    row.forEach((o, i) => out[i].outcomes.push(o));
    completed++;
    options.onProgress?.({ done: completed, total: draws.length });
  }
  return { scenarios: out, completed, partial };
}

function memberWarnings(ws: readonly { code: string; id?: string; message: string }[]): { warnings?: MemberOutcome['warnings'] } {
  const kept = (ws ?? []).filter((w) => MEMBER_WARNINGS.has(w.code)).map((w) => ({ code: w.code, ...(w.id ? { id: w.id } : {}), message: w.message }));
  return kept.length ? { warnings: kept } : {};
}

/** Joins slices run separately (in member order) into one result. */
export function joinMembers(parts: readonly MembersResult[]): MembersResult {
  const first = parts[0];
  return {
    scenarios: first.scenarios.map((s, i) => ({ id: s.id, seriesIds: parts.find((p) => p.scenarios[i].seriesIds.length)?.scenarios[i].seriesIds ?? s.seriesIds, outcomes: parts.flatMap((p) => p.scenarios[i].outcomes) })),
    completed: parts.reduce((a, p) => a + p.completed, 0),
    partial: parts.some((p) => p.partial)
  };
}

export interface MemberProblem {
  member: number;
  status: 'failed' | 'not_closed';
  code: string;
  message: string;
}

export interface EnsembleScenario {
  id: string;
  /** Members that ran to the end with the mass closed (the summaries are over these). */
  closed: number;
  /** Members that failed or ran but did not close (listed in `problems`). */
  failed: number;
  series: Record<string, Summary>;
  /** Members that ran but whose closure fell outside tolerance (part of `failed`). */
  notClosed: number;
  problems: MemberProblem[];
  /** Paired difference from the first scenario, member by member (not on the first). */
  versus?: { scenario: string; members: number; series: Record<string, Summary> };
  /**
   * Share of parameter sets meeting each target asked for (`--meet`): members whose value
   * (the series' last-five-year mean) is at most / at least the limit, with the Wilson 95 %
   * interval. A probability only under the assumed ranges.
   */
  /**
   * Members that count but whose runs warned (MEMBER_WARNINGS), in member order: e.g. a state
   * that fell to the absolute tolerance and grew again, whose later values the solver's
   * error decides. Present only when there are some.
   */
  warnings?: { member: number; code: string; id?: string; message: string }[];
  meeting?: Record<string, { limit: number; direction: 'at_most' | 'at_least'; members: number; met: number; share: number | null; low: number | null; high: number | null }>;
}

/** A target on one series: at most (upper limit) or at least (lower limit) `limit`. */
export interface SeriesTarget {
  id: string;
  direction: 'at_most' | 'at_least';
  limit: number;
}

export interface EnsembleDoc {
  format: typeof ENSEMBLE_FORMAT;
  seed: number;
  n: number;
  scenarios: EnsembleScenario[];
  model: string;
  modelDigest: string;
  engine: string;
  /** The explicit method members of an `auto` scenario started with (ENSEMBLE_AUTO_START). */
  autoStart: 'odex' | 'dp54';
  sampling: 'latin hypercube';
  sampled: { parameters: string[]; states: string[] };
  /** The summarised value: a series' time mean over the last years of the period. */
  statistic: { lastYears: number; percentiles: 'Hyndman-Fan type 7' };
  /** Members finished under every scenario; less than n when partial. */
  completed: number;
  partial: boolean;
}

/** The ensemble document from the sample and the members' outcomes. */
export function ensembleDocument(model: ModelDoc, sample: ModelSample, result: MembersResult, targets: readonly SeriesTarget[] = []): EnsembleDoc {
  const good = (o: MemberOutcome) => o.status === 'ok' && o.closed && o.values !== null;
  const scenarios = result.scenarios.map((s, si): EnsembleScenario => {
    const problems: MemberProblem[] = [];
    let notClosed = 0;
    for (const o of s.outcomes) {
      if (o.status === 'failed') problems.push({ member: o.member, status: 'failed', code: o.code ?? 'failed', message: o.message ?? '' });
      else if (!o.closed) {
        notClosed++;
        problems.push({ member: o.member, status: 'not_closed', code: o.code ?? 'closure_failed', message: o.message ?? '' });
      }
    }
    const kept = s.outcomes.filter(good);
    const series: Record<string, Summary> = {};
    for (const id of s.seriesIds) series[id] = summarize(kept.map((o) => o.values![id]));
    const doc: EnsembleScenario = { id: s.id, closed: kept.length, failed: s.outcomes.length - kept.length, series, notClosed, problems };
    const warned = kept.flatMap((o) => (o.warnings ?? []).map((w) => ({ member: o.member, ...w })));
    if (warned.length) doc.warnings = warned;
    if (si > 0) {
      const base = result.scenarios[0];
      const vs: Record<string, Summary> = {};
      let members = 0;
      for (const id of s.seriesIds) {
        if (!base.seriesIds.includes(id)) continue;
        const pd = pairedDifference(
          s.outcomes.map((o) => (good(o) ? o.values![id] : null)),
          base.outcomes.map((o) => (good(o) ? o.values![id] : null))
        );
        vs[id] = pd.summary;
        members = pd.n;
      }
      doc.versus = { scenario: base.id, members, series: vs };
    }
    if (targets.length) {
      doc.meeting = {};
      for (const t of targets) {
        const sh = shareMeeting(kept.map((o) => o.values![t.id]), t.limit, t.direction === 'at_most' ? 'below' : 'above');
        const num = (x: number) => (Number.isFinite(x) ? x : null);
        doc.meeting[t.id] = { limit: t.limit, direction: t.direction, members: sh.n, met: sh.met, share: num(sh.share), low: num(sh.low), high: num(sh.high) };
      }
    }
    return doc;
  });
  return {
    format: ENSEMBLE_FORMAT,
    seed: sample.seed,
    n: sample.n,
    scenarios,
    model: model.id,
    modelDigest: digestOf(model),
    engine: ENGINE_VERSION,
    autoStart: ENSEMBLE_AUTO_START,
    sampling: 'latin hypercube',
    sampled: { parameters: sample.inputs.filter((i) => i.kind === 'parameter').map((i) => i.id), states: sample.inputs.filter((i) => i.kind === 'state').map((i) => i.id) },
    statistic: { lastYears: LAST_YEARS, percentiles: 'Hyndman-Fan type 7' },
    completed: result.completed,
    partial: result.partial
  };
}

export interface EnsembleOptions {
  n: number;
  seed: number;
  signal?: CancelSignal;
  onProgress?: (p: { done: number; total: number }) => void;
}

/** Checks that there is at least one scenario and no id twice. */
export function checkScenarios(scenarios: readonly ScenarioDoc[]): void {
  if (scenarios.length === 0) throw new UncertaintyInputError('no_scenarios', 'an ensemble needs at least one scenario');
  const seen = new Set<string>();
  for (const s of scenarios) {
    if (seen.has(s.id)) throw new UncertaintyInputError('duplicate_scenario', `scenario id '${s.id}' is given twice`, s.id);
    seen.add(s.id);
  }
}

/** The whole ensemble on this thread. Throws UncertaintyInputError for bad n, seed or ranges. */
export function runEnsemble(model: ModelDoc, scenarios: readonly ScenarioDoc[] | undefined, options: EnsembleOptions): EnsembleDoc {
  const list = scenarios && scenarios.length ? scenarios : [defaultScenario(model)];
  checkScenarios(list);
  const sample = sampleModel(model, options.n, options.seed);
  const result = runMembers(model, list, sample.members, { signal: options.signal, onProgress: options.onProgress });
  return ensembleDocument(model, sample, result);
}
