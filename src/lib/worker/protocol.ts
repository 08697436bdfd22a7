/**
 * The messages between the page and the engine worker: versioned discriminated unions.
 *
 * Page → worker: `run`, `settle`, `sweep`, `ensemble`, `morris`, `cancel`. Worker → page:
 * `progress`, `result`, `settleResult`, `sweepProgress`, `sweepResult`, `ensembleMember`,
 * `ensembleResult`, `morrisTrajectory`, `morrisResult`, `error`. The long-run and ensemble messages were added to version 1
 * without changing any earlier message, so the version stays 1; it changes
 * only when an existing message changes its meaning.
 * Every message carries `v` (the protocol version) and the `requestId` of the run it
 * belongs to, so that a late message of an earlier run is never taken for the current one.
 * A message with another `v` is refused by the guards below, not half-understood.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { SettleOutcome } from '$lib/engine/longrun/settle';
import type { SweepDoc } from '$lib/engine/longrun/sweep';
import type { Season } from '$lib/engine/indicators/seasonal';

export const PROTOCOL_VERSION = 1;

/** Ask the worker to simulate `model` under `scenario` (the engine's default period when absent). */
export interface RunRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'run';
  requestId: string;
  model: ModelDoc;
  scenario?: ScenarioDoc;
  /** Start values by state id (a spin-up from a stored run's end state). */
  initial?: Record<string, number>;
}

/**
 * Ask the worker to stop the run `requestId`. The worker aborts the signal it gave the
 * engine; a run that sees it comes back as a `result` with status `cancelled`. The engine
 * runs synchronously, so a worker busy in a run reads this only once the run is over:
 * the client therefore also terminates the worker (client.ts).
 */
export interface CancelRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'cancel';
  requestId: string;
}

/**
 * Ask for the long-run state of `model` under its seasonal forcing (the engine's `settle`):
 * cycle after cycle of 365 days until the annual cycle repeats.
 */
export interface SettleRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'settle';
  requestId: string;
  model: ModelDoc;
  /** Parameter values by id (model units). */
  parameters?: Record<string, number>;
  /** Start values by state id. */
  initial?: Record<string, number>;
  /** Forcing scale factors by forcing id. */
  forcingScale?: Record<string, number>;
  /** Most cycles before giving up. Default: the engine's (200). */
  maxCycles?: number;
}

/** What a sweep is asked to do: the engine's SweepOptions without the callbacks. */
export interface SweepSettings {
  target: string;
  from: number;
  to: number;
  /** Number of values, both ends included (≥ 2). */
  steps: number;
  /** Series id of the indicator (a state or a reported derived quantity). */
  indicator: string;
  /** Null: the whole cycle. Absent: April–September. */
  season?: Season | null;
  startLow?: Record<string, number>;
  startHigh?: Record<string, number>;
  separation?: number;
  /** Bisection steps per switch point. Default 8. */
  refine?: number;
}

/** Ask for a sweep (`lakeledger.sweep/1`): long-run states over a range, from two starts. */
export interface SweepRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'sweep';
  requestId: string;
  model: ModelDoc;
  settings: SweepSettings;
}

/**
 * Ask for members of an ensemble (Latin hypercube over the model's ranges, seeded): the
 * worker draws the whole design of `n` sets from `seed` and runs the sets numbered in
 * `members` (0-based, each < n) under every scenario, member by member, so every scenario
 * gets the SAME parameter sets (common random numbers). Several workers may share one
 * design by taking different `members`; a resumed ensemble asks for the ones still missing.
 */
export interface EnsembleRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'ensemble';
  requestId: string;
  model: ModelDoc;
  /** The scenarios, the baseline first. */
  scenarios: ScenarioDoc[];
  n: number;
  seed: number;
  members: number[];
  /** Days between the points of the returned series (a thinned daily grid). Default 10. */
  gridDays?: number;
}

/**
 * Ask for Morris elementary effects of one indicator under one scenario: the design of `r`
 * trajectories on a `p`-level grid is drawn from `seed` (the engine's morrisDesign over the
 * model's ranged inputs, in model order); the worker runs the trajectories numbered in
 * `trajectories`, so several workers may share one design.
 */
export interface MorrisRequest {
  v: typeof PROTOCOL_VERSION;
  type: 'morris';
  requestId: string;
  model: ModelDoc;
  scenario: ScenarioDoc;
  /** Column key of the indicator (e.g. `chlorophyll.last`; see EnsembleColumn). */
  indicator: string;
  r: number;
  p: number;
  seed: number;
  trajectories: number[];
}

export type ToWorker = RunRequest | SettleRequest | SweepRequest | EnsembleRequest | MorrisRequest | CancelRequest;

/** How far the run has come. Throttled by the worker (see progress-throttle.ts). */
export interface ProgressMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'progress';
  requestId: string;
  /** Share of the period done, 0 to 1. */
  fraction: number;
  /** Day reached, since the scenario's start. */
  day: number;
}

/**
 * The run document. A model the engine could not run still comes back here,
 * as a run with status `failed` and its `error`.
 */
export interface ResultMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'result';
  requestId: string;
  run: RunDoc;
}

/** The worker itself could not do what was asked (a malformed request, an exception). */
export interface ErrorMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'error';
  /** Null when the request was too malformed to carry an id. */
  requestId: string | null;
  /** Stable code: `bad_message`, `engine_exception`. */
  code: WorkerErrorCode;
  message: string;
}

export type WorkerErrorCode = 'bad_message' | 'engine_exception';

/** A settle's outcome: everything of the engine's SettleResult but the cycle's run. */
export interface SettleSummary {
  outcome: SettleOutcome;
  cycles: number;
  lastChange: number;
  /** State values at the end (the start of the next cycle). */
  state: Record<string, number>;
  message: string;
  /** Each series' mean over the settled cycle's growing season (April–September); empty when not settled. */
  seasonMeans: Record<string, number>;
  /** Units of the series, by id. */
  units: Record<string, string>;
}

export interface SettleResultMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'settleResult';
  requestId: string;
  result: SettleSummary;
}

/** One more long run of a sweep is done (sent after each; a sweep has few and slow ones). */
export interface SweepProgressMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'sweepProgress';
  requestId: string;
  /** Long runs done and in all (both starts over every value, plus default starts). */
  done: number;
  total: number;
}

/** The sweep's document, or the input problem that stopped it (codes as the engine's SweepInputError). */
export type SweepResultMessage = {
  v: typeof PROTOCOL_VERSION;
  type: 'sweepResult';
  requestId: string;
} & ({ sweep: SweepDoc } | { problem: { code: string; message: string } });

/** The indicator value columns of a member (headline keys such as `chlorophyll.last`). */
export interface EnsembleColumn {
  key: string;
  role: string;
  label: string;
  unit: string;
  better: 'lower' | 'higher' | 'earlier';
}

/** One member under one scenario (the engine's type, shared with ensemble records). */
export type { MemberRun } from '$lib/engine/uncertainty/member-run';
import type { MemberRun } from '$lib/engine/uncertainty/member-run';

/** One member of an ensemble is done under every scenario (sent after each). */
export interface EnsembleMemberMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'ensembleMember';
  requestId: string;
  /** The member's number in the design (0-based). */
  member: number;
  /** One per scenario, in the request's order. */
  runs: MemberRun[];
  columns: EnsembleColumn[];
  /** The series' units and labels by role (from the model's derived quantities). */
  roles: Record<string, { id: string; label: string; unit: string }>;
  gridDays: number;
}

/**
 * The end of an ensemble request: members done of those asked, or the input problem that
 * stopped it (the engine's UncertaintyInputError codes, e.g. `nothing_to_sample`).
 */
export type EnsembleResultMessage = {
  v: typeof PROTOCOL_VERSION;
  type: 'ensembleResult';
  requestId: string;
} & (
  | { done: number; asked: number; sampled: { parameters: string[]; states: string[] } }
  | { problem: { code: string; message: string } }
);

/** One Morris trajectory is done: one elementary effect per input (null where a run failed). */
export interface MorrisTrajectoryMessage {
  v: typeof PROTOCOL_VERSION;
  type: 'morrisTrajectory';
  requestId: string;
  trajectory: number;
  /** By input, in the order of `inputs` of the result. */
  effects: (number | null)[];
  /** Runs of this trajectory that failed, did not close or gave no value. */
  failed: number;
  evaluations: number;
}

export type MorrisResultMessage = {
  v: typeof PROTOCOL_VERSION;
  type: 'morrisResult';
  requestId: string;
} & (
  | { done: number; asked: number; delta: number; inputs: { kind: 'parameter' | 'state'; id: string }[] }
  | { problem: { code: string; message: string } }
);

export type FromWorker =
  | ProgressMessage
  | ResultMessage
  | SettleResultMessage
  | SweepProgressMessage
  | SweepResultMessage
  | EnsembleMemberMessage
  | EnsembleResultMessage
  | MorrisTrajectoryMessage
  | MorrisResultMessage
  | ErrorMessage;

type Loose = Record<string, unknown>;

function isRecord(x: unknown): x is Loose {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

function hasEnvelope(x: unknown): x is Loose {
  return isRecord(x) && x.v === PROTOCOL_VERSION && typeof x.type === 'string';
}

function isRequestId(x: unknown): x is string {
  return typeof x === 'string' && x.length > 0;
}

function isFraction(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x >= 0 && x <= 1;
}

/**
 * The guards check the envelope and the shape of each field, not the documents inside:
 * the engine validates models and scenarios itself and reports every problem.
 */
export function isRunRequest(x: unknown): x is RunRequest {
  return (
    hasEnvelope(x) &&
    x.type === 'run' &&
    isRequestId(x.requestId) &&
    isRecord(x.model) &&
    (x.scenario === undefined || isRecord(x.scenario)) &&
    (x.initial === undefined || isRecord(x.initial))
  );
}

function isNumberRecord(x: unknown): x is Record<string, number> {
  return isRecord(x) && Object.values(x).every((v) => typeof v === 'number' && Number.isFinite(v));
}

function isFiniteNumber(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

export function isSettleRequest(x: unknown): x is SettleRequest {
  return (
    hasEnvelope(x) &&
    x.type === 'settle' &&
    isRequestId(x.requestId) &&
    isRecord(x.model) &&
    (x.parameters === undefined || isNumberRecord(x.parameters)) &&
    (x.initial === undefined || isNumberRecord(x.initial)) &&
    (x.forcingScale === undefined || isNumberRecord(x.forcingScale)) &&
    (x.maxCycles === undefined || (Number.isInteger(x.maxCycles) && (x.maxCycles as number) > 0))
  );
}

/** The shape of the settings; the engine checks their meaning (target, range, indicator). */
export function isSweepSettings(x: unknown): x is SweepSettings {
  return (
    isRecord(x) &&
    typeof x.target === 'string' &&
    typeof x.indicator === 'string' &&
    isFiniteNumber(x.from) &&
    isFiniteNumber(x.to) &&
    Number.isInteger(x.steps) &&
    (x.season === undefined || x.season === null || isRecord(x.season)) &&
    (x.startLow === undefined || isNumberRecord(x.startLow)) &&
    (x.startHigh === undefined || isNumberRecord(x.startHigh)) &&
    (x.separation === undefined || isFiniteNumber(x.separation)) &&
    (x.refine === undefined || (Number.isInteger(x.refine) && (x.refine as number) >= 0))
  );
}

export function isSweepRequest(x: unknown): x is SweepRequest {
  return hasEnvelope(x) && x.type === 'sweep' && isRequestId(x.requestId) && isRecord(x.model) && isSweepSettings(x.settings);
}

/** Largest ensemble the screen and the worker accept (as the command line's). */
export const MAX_ENSEMBLE = 100000;

export function isEnsembleRequest(x: unknown): x is EnsembleRequest {
  if (!(hasEnvelope(x) && x.type === 'ensemble' && isRequestId(x.requestId) && isRecord(x.model))) return false;
  const n = x.n;
  if (!(Number.isInteger(n) && (n as number) >= 1 && (n as number) <= MAX_ENSEMBLE)) return false;
  if (!(Number.isInteger(x.seed) && (x.seed as number) >= 0 && (x.seed as number) <= 0xffffffff)) return false;
  if (!(Array.isArray(x.scenarios) && x.scenarios.length > 0 && x.scenarios.every(isRecord))) return false;
  if (!(Array.isArray(x.members) && x.members.every((m) => Number.isInteger(m) && m >= 0 && m < (n as number)))) return false;
  if (new Set(x.members).size !== x.members.length) return false;
  return x.gridDays === undefined || (Number.isInteger(x.gridDays) && (x.gridDays as number) >= 1);
}

export function isMorrisRequest(x: unknown): x is MorrisRequest {
  if (!(hasEnvelope(x) && x.type === 'morris' && isRequestId(x.requestId) && isRecord(x.model) && isRecord(x.scenario))) return false;
  if (typeof x.indicator !== 'string' || !x.indicator) return false;
  const r = x.r;
  const p = x.p;
  if (!(Number.isInteger(r) && (r as number) >= 2 && (r as number) <= 1000)) return false;
  if (!(Number.isInteger(p) && (p as number) >= 2 && (p as number) % 2 === 0)) return false;
  if (!(Number.isInteger(x.seed) && (x.seed as number) >= 0 && (x.seed as number) <= 0xffffffff)) return false;
  if (!(Array.isArray(x.trajectories) && x.trajectories.every((t) => Number.isInteger(t) && t >= 0 && t < (r as number)))) return false;
  return new Set(x.trajectories).size === x.trajectories.length;
}

export function isCancelRequest(x: unknown): x is CancelRequest {
  return hasEnvelope(x) && x.type === 'cancel' && isRequestId(x.requestId);
}

export function isToWorker(x: unknown): x is ToWorker {
  return isRunRequest(x) || isSettleRequest(x) || isSweepRequest(x) || isEnsembleRequest(x) || isMorrisRequest(x) || isCancelRequest(x);
}

export function isProgressMessage(x: unknown): x is ProgressMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'progress' &&
    isRequestId(x.requestId) &&
    isFraction(x.fraction) &&
    typeof x.day === 'number' &&
    Number.isFinite(x.day)
  );
}

export function isResultMessage(x: unknown): x is ResultMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'result' &&
    isRequestId(x.requestId) &&
    isRecord(x.run) &&
    typeof x.run.status === 'string'
  );
}

export function isSettleResultMessage(x: unknown): x is SettleResultMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'settleResult' &&
    isRequestId(x.requestId) &&
    isRecord(x.result) &&
    typeof x.result.outcome === 'string' &&
    typeof x.result.cycles === 'number' &&
    isRecord(x.result.state) &&
    typeof x.result.message === 'string' &&
    isRecord(x.result.seasonMeans)
  );
}

export function isSweepProgressMessage(x: unknown): x is SweepProgressMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'sweepProgress' &&
    isRequestId(x.requestId) &&
    Number.isInteger(x.done) &&
    Number.isInteger(x.total) &&
    (x.done as number) >= 0 &&
    (x.done as number) <= (x.total as number)
  );
}

export function isSweepResultMessage(x: unknown): x is SweepResultMessage {
  if (!(hasEnvelope(x) && x.type === 'sweepResult' && isRequestId(x.requestId))) return false;
  const hasSweep = isRecord(x.sweep) && x.sweep.format === 'lakeledger.sweep/1' && Array.isArray(x.sweep.values);
  const hasProblem = isRecord(x.problem) && typeof x.problem.code === 'string' && typeof x.problem.message === 'string';
  return hasSweep !== hasProblem;
}

function isMemberRun(x: unknown): boolean {
  return (
    isRecord(x) &&
    (x.status === 'ok' || x.status === 'failed') &&
    typeof x.closed === 'boolean' &&
    (x.code === null || typeof x.code === 'string') &&
    (x.message === null || typeof x.message === 'string') &&
    isRecord(x.values) &&
    Object.values(x.values).every((v) => v === null || typeof v === 'number') &&
    (x.series === null || (isRecord(x.series) && Object.values(x.series).every(Array.isArray)))
  );
}

export function isEnsembleMemberMessage(x: unknown): x is EnsembleMemberMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'ensembleMember' &&
    isRequestId(x.requestId) &&
    Number.isInteger(x.member) &&
    (x.member as number) >= 0 &&
    Array.isArray(x.runs) &&
    x.runs.length > 0 &&
    x.runs.every(isMemberRun) &&
    Array.isArray(x.columns) &&
    isRecord(x.roles) &&
    Number.isInteger(x.gridDays) &&
    (x.gridDays as number) >= 1
  );
}

export function isEnsembleResultMessage(x: unknown): x is EnsembleResultMessage {
  if (!(hasEnvelope(x) && x.type === 'ensembleResult' && isRequestId(x.requestId))) return false;
  const hasDone = Number.isInteger(x.done) && Number.isInteger(x.asked) && (x.done as number) >= 0 && (x.done as number) <= (x.asked as number) && isRecord(x.sampled);
  const hasProblem = isRecord(x.problem) && typeof x.problem.code === 'string' && typeof x.problem.message === 'string';
  return hasDone !== hasProblem;
}

export function isMorrisTrajectoryMessage(x: unknown): x is MorrisTrajectoryMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'morrisTrajectory' &&
    isRequestId(x.requestId) &&
    Number.isInteger(x.trajectory) &&
    (x.trajectory as number) >= 0 &&
    Array.isArray(x.effects) &&
    x.effects.every((e) => e === null || typeof e === 'number') &&
    Number.isInteger(x.failed) &&
    Number.isInteger(x.evaluations)
  );
}

export function isMorrisResultMessage(x: unknown): x is MorrisResultMessage {
  if (!(hasEnvelope(x) && x.type === 'morrisResult' && isRequestId(x.requestId))) return false;
  const hasDone =
    Number.isInteger(x.done) &&
    Number.isInteger(x.asked) &&
    (x.done as number) >= 0 &&
    (x.done as number) <= (x.asked as number) &&
    isFiniteNumber(x.delta) &&
    Array.isArray(x.inputs) &&
    x.inputs.every((i) => isRecord(i) && (i.kind === 'parameter' || i.kind === 'state') && typeof i.id === 'string');
  const hasProblem = isRecord(x.problem) && typeof x.problem.code === 'string' && typeof x.problem.message === 'string';
  return hasDone !== hasProblem;
}

export function isErrorMessage(x: unknown): x is ErrorMessage {
  return (
    hasEnvelope(x) &&
    x.type === 'error' &&
    (x.requestId === null || isRequestId(x.requestId)) &&
    (x.code === 'bad_message' || x.code === 'engine_exception') &&
    typeof x.message === 'string'
  );
}

export function isFromWorker(x: unknown): x is FromWorker {
  return (
    isProgressMessage(x) ||
    isResultMessage(x) ||
    isSettleResultMessage(x) ||
    isSweepProgressMessage(x) ||
    isSweepResultMessage(x) ||
    isEnsembleMemberMessage(x) ||
    isEnsembleResultMessage(x) ||
    isMorrisTrajectoryMessage(x) ||
    isMorrisResultMessage(x) ||
    isErrorMessage(x)
  );
}

/** The request id of anything that looks like a message, for replying to a malformed one. */
export function requestIdOf(x: unknown): string | null {
  return isRecord(x) && isRequestId(x.requestId) ? x.requestId : null;
}
