/**
 * The documents of shared/design/documents.md as TypeScript types: the contract
 * between engine, app, CLI, storage and tests. Field meanings, units and defaults
 * are given beside each field; the validator (document/validate-*.ts) enforces them.
 */

export const MODEL_FORMAT = 'lakeledger.model/1';
export const SCENARIO_FORMAT = 'lakeledger.scenario/1';
export const RUN_FORMAT = 'lakeledger.run/1';

/** A problem found in a document. `path` is a JSON path such as `flows[3].rate`. */
export interface Problem {
  severity: 'error' | 'warning';
  /** Stable machine code (see DEVELOPERS.md, error codes). */
  code: string;
  /** JSON path inside the document. */
  path: string;
  /** Id of the item the problem belongs to, when it has one. */
  id?: string;
  /** Which document: `model` or `scenario`. */
  document?: 'model' | 'scenario';
  /** Words a modeller understands. */
  message: string;
  /** Character span inside an expression, when the problem sits in one. */
  span?: { start: number; end: number };
}

export type Distribution = 'uniform' | 'triangular' | 'loguniform';

export interface Range {
  min: number;
  max: number;
  /** Default `uniform`. `triangular` has its mode at the item's value. */
  distribution?: Distribution;
}

export interface ParameterDoc {
  id: string;
  value: number;
  /** Unit in the expression library's syntax; `1` is dimensionless. */
  unit: string;
  label?: string;
  range?: Range;
  /** Where the value comes from. */
  source?: string;
}

export interface ForcingTable {
  /** Days since the model's time origin, strictly increasing. */
  t: number[];
  /** Values in the forcing's unit, same length as `t`. */
  v: number[];
}

export interface ForcingDoc {
  id: string;
  unit: string;
  label?: string;
  /** Either a table ... */
  table?: ForcingTable;
  /** `linear` (default) or `step` (value held until the next time). */
  interpolation?: 'linear' | 'step';
  /** Repeat the table every `period` days. */
  period?: number;
  /** ... or an expression in `t` and parameters. */
  expression?: string;
  source?: string;
}

export interface StateDoc {
  id: string;
  unit: string;
  initial: number;
  /** Expression of parameters: the compartment's extent (volume or area). */
  size: string;
  label?: string;
  /** `water`, `sediment`, `biota` or the user's own word. */
  zone?: string;
  initialRange?: Range;
  /** Default true; false keeps the state out of the mass inventory. */
  conserved?: boolean;
}

export interface DerivedDoc {
  id: string;
  expression: string;
  unit: string;
  label?: string;
  /** Record it in runs. Default false. */
  report?: boolean;
  /** `chlorophyll`, `totalP`, `dissolvedP`, `secchi` or the user's own. */
  role?: string;
}

export interface FlowDoc {
  id: string;
  /** State the flow leaves; absent = import from outside. */
  from?: string;
  /** State the flow enters; absent = export. */
  to?: string;
  /** In the unit of the basis state (`from`, else `to`) per day. */
  rate: string;
  label?: string;
  /** `externalLoad`, `outflow`, `sedimentation`, `release`, `burial`, `uptake`, ... */
  role?: string;
}

export interface ModelDoc {
  format: typeof MODEL_FORMAT;
  id: string;
  title?: string;
  description?: string;
  /** ISO date, UTC midnight; default: the scenario's start date. */
  timeOrigin?: string;
  conserved: { element: string; unit: string };
  parameters: ParameterDoc[];
  forcings?: ForcingDoc[];
  states: StateDoc[];
  derived?: DerivedDoc[];
  flows: FlowDoc[];
}

/** `dp54`: the project's own Dormand–Prince 5(4) (solve/dopri5.ts), an explicit method like odex. */
export type SolverMethod = 'auto' | 'odex' | 'stiff' | 'dp54';

export interface SolverSettings {
  /** `auto` (default): odex, switching to the stiff method when its steps collapse. */
  method: SolverMethod;
  /** Relative tolerance. Default 1e-6. */
  rtol: number;
  /** Absolute tolerance, in each state's unit. Default 1e-9. */
  atol: number;
  /** Largest step in days. Default 5. */
  maxStep: number;
  /** Most steps per run. Default 100000. */
  maxSteps: number;
}

export const DEFAULT_SOLVER: Readonly<SolverSettings> = Object.freeze({
  method: 'auto',
  rtol: 1e-6,
  atol: 1e-9,
  maxStep: 5,
  maxSteps: 100000
});

/** Default output step, days. */
export const DEFAULT_OUTPUT_STEP = 1;

export interface RepeatDoc {
  /** Total applications, the first included. */
  count: number;
  everyYears?: number;
  everyDays?: number;
}

interface MeasureBase {
  id?: string;
  label?: string;
}

export interface ScaleMeasure extends MeasureBase {
  kind: 'scale';
  target: string;
  factor: number;
  from: string;
  until?: string;
  rampDays?: number;
}
export interface OffsetMeasure extends MeasureBase {
  kind: 'offset';
  target: string;
  amount: number;
  from: string;
  until?: string;
  rampDays?: number;
}
export interface SetMeasure extends MeasureBase {
  kind: 'set';
  target: string;
  value: number;
  from: string;
  until?: string;
}
export interface RemoveMeasure extends MeasureBase {
  kind: 'remove';
  state: string;
  fraction: number;
  on: string;
  repeat?: RepeatDoc;
}
export interface AddMeasure extends MeasureBase {
  kind: 'add';
  state: string;
  /** In the state's unit. */
  amount: number;
  on: string;
  repeat?: RepeatDoc;
}
export interface TransferMeasure extends MeasureBase {
  kind: 'transfer';
  state: string;
  into: string;
  fraction: number;
  on: string;
  repeat?: RepeatDoc;
}

export type MeasureDoc =
  | ScaleMeasure
  | OffsetMeasure
  | SetMeasure
  | RemoveMeasure
  | AddMeasure
  | TransferMeasure;

export interface CostDoc {
  measure: string;
  amount: number;
  currency: string;
  note?: string;
}

export interface ScenarioDoc {
  format: typeof SCENARIO_FORMAT;
  id: string;
  title?: string;
  model: string;
  period: { start: string; end: string; outputStep?: number };
  /** `model` (default), `settled`, or the id of a stored run. */
  initialState?: string;
  solver?: Partial<SolverSettings>;
  measures?: MeasureDoc[];
  costs?: CostDoc[];
  notes?: string;
}

export interface ClosureDoc {
  unit: string;
  initialMass: number;
  finalMass: number;
  imported: number;
  exported: number;
  maxResidual: number;
  relativeResidual: number;
  tolerance: number;
  ok: boolean;
}

export interface BudgetYearDoc {
  year: number;
  from: string;
  to: string;
  /** Mass moved by each flow in that year, conserved unit. */
  flows: Record<string, number>;
  /** Mass moved by each measure in that year, conserved unit. */
  measures: Record<string, number>;
  imported: number;
  exported: number;
  storageChange: number;
  residual: number;
}

export interface RunSolverDoc {
  method: SolverMethod;
  /** Day (since start) at which auto moved from odex to the stiff method, or null. */
  switchedAt: number | null;
  /** When auto switched: the explicit method it started with (absent means odex). */
  startedWith?: 'odex' | 'dp54';
  rtol: number;
  atol: number;
  maxStep: number;
  maxSteps?: number;
  steps: number;
  rejected: number;
  evaluations: number;
}

export interface RunErrorDoc {
  code: string;
  message: string;
  /** Day reached (since start). */
  time?: number;
  flow?: string;
  values?: Record<string, number>;
}

export interface RunWarningDoc {
  code: string;
  message: string;
  time?: number;
  id?: string;
}

export interface RunDoc {
  format: typeof RUN_FORMAT;
  id: string;
  model: string;
  scenario: string;
  modelDigest: string;
  scenarioDigest: string;
  engine: string;
  status: 'ok' | 'failed' | 'cancelled';
  error: RunErrorDoc | null;
  /** ISO date of day 0. */
  start: string;
  startedAt: string;
  wallMs: number;
  /** Days since `start`. */
  times: number[];
  units: Record<string, string>;
  series: Record<string, number[]>;
  closure: ClosureDoc;
  budget: BudgetYearDoc[];
  solver: RunSolverDoc;
  warnings: RunWarningDoc[];
  /**
   * Only for a scenario that starts from a stored run (spin-up): that run's id and the end
   * state taken from it, in the states' units, so the run can be reproduced without it.
   */
  initialState?: { run: string; values: Record<string, number> };
}
