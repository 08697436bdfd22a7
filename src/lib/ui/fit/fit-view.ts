/**
 * What the Fit screen shows, as pure functions: the run it compares with by default, the
 * statistics table, the period a calibration runs over, the note of an accepted fit and
 * the edit that writes fitted values into the draft.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { ObservationSet } from '$lib/engine/fit/observations';
import type { SeasonStatistics, VariableStatistics } from '$lib/engine/fit/statistics';
import type { CalibrationResult, FitWarning } from '$lib/engine/fit/calibrate';
import type { StoredRunSummary } from '$lib/storage/types';
import { formatValue } from '../chart-config';

/** Runs that finished (status ok), newest first; the default is the newest one of a baseline scenario, else the newest. */
export function fitRunChoices(runs: readonly StoredRunSummary[], isBaseline: (scenarioKey: string) => boolean): { choices: StoredRunSummary[]; preferred: string | null } {
  const choices = runs.filter((r) => r.status === 'ok').sort((a, b) => (a.storedAt < b.storedAt ? 1 : a.storedAt > b.storedAt ? -1 : 0));
  const preferred = choices.find((r) => isBaseline(r.scenarioKey)) ?? choices[0];
  return { choices, preferred: preferred?.id ?? null };
}

export type Season = 'all' | 'growing' | 'rest';
/** Short words for table cells; the growing season is April–September (UTC months). */
export const SEASON_WORDS: Record<Season, string> = { all: 'all dates', growing: 'April–September', rest: 'October–March' };

export interface StatisticsRow {
  variable: string;
  unit: string;
  season: Season;
  /** Pairs that entered the sums, of all pairs in the season. */
  n: number;
  pairs: number;
  consistent: number;
  rmse: string;
  bias: string;
  nse: string;
  /** On log10 values (chlorophyll), or null. */
  log: { rmse: string; bias: string; nse: string } | null;
}

const show = (x: number | null | undefined) => (x === null || x === undefined ? '–' : formatValue(x));

/** One row per series and season, in the order of `order` (then any others). */
export function statisticsRows(stats: Record<string, VariableStatistics>, units: Record<string, string>, order: readonly string[] = []): StatisticsRow[] {
  const ids = [...order.filter((id) => stats[id]), ...Object.keys(stats).filter((id) => !order.includes(id))];
  const rows: StatisticsRow[] = [];
  for (const id of ids) {
    for (const season of ['all', 'growing', 'rest'] as const) {
      const s: SeasonStatistics = stats[id][season];
      rows.push({
        variable: id,
        unit: units[id] ?? '',
        season,
        n: s.n,
        pairs: s.pairs,
        consistent: s.consistent,
        rmse: show(s.rmse),
        bias: show(s.bias),
        nse: show(s.nse),
        log: s.log10 ? { rmse: show(s.log10.rmse), bias: show(s.log10.bias), nse: show(s.log10.nse) } : null
      });
    }
  }
  return rows;
}

/** The NSE of a series over all dates, in a few words, for notes. */
export function shortStatistics(stats: Record<string, VariableStatistics>): string {
  return Object.entries(stats)
    .map(([id, s]) => `${id} NSE ${show(s.all.nse)}${s.all.log10 ? ` (log ${show(s.all.log10.nse)})` : ''}`)
    .join(', ');
}

/** ISO date one day after `date`. */
function dayAfter(date: string): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
}

/**
 * The scenario a calibration runs: the run's scenario, its period cut to end on 1 January
 * after the last observation (later years cannot change the fit and would only cost time),
 * starting from the model's initial values.
 */
export function calibrationScenario(scenario: ScenarioDoc, set: ObservationSet): { scenario: ScenarioDoc; note: string | null } {
  const last = set.points.reduce((m, p) => (p.date > m ? p.date : m), '');
  const out: ScenarioDoc = structuredClone(scenario);
  let note: string | null = null;
  if (out.initialState && out.initialState !== 'model') {
    delete out.initialState;
    note = "The run started from another run's end state; the calibration starts from the model's initial values.";
  }
  if (last) {
    const end = `${Number(dayAfter(last).slice(0, 4)) + (dayAfter(last).slice(5) === '01-01' ? 0 : 1)}-01-01`;
    if (end < out.period.end && end > out.period.start) out.period = { ...out.period, end };
  }
  return { scenario: out, note };
}

/** The words of an engine warning, with its kind first. */
export const WARNING_WORDS: Record<FitWarning['code'], string> = {
  at_range_edge: 'At the edge of its range',
  poorly_identifiable: 'Poorly identifiable',
  not_converged: 'Not settled',
  log_nonpositive: 'Values at or below zero',
  outside_period: 'Outside the period'
};

/** A fitted value's place in its range, 0–1 (on the log scale when the search was). */
export function placeInRange(value: number, r: { min: number; max: number; space: 'linear' | 'log' }): number {
  const u = r.space === 'log' ? (Math.log(value) - Math.log(r.min)) / (Math.log(r.max) - Math.log(r.min)) : (value - r.min) / (r.max - r.min);
  return Math.min(1, Math.max(0, u));
}

export interface NoteInput {
  fileName: string;
  /** `sha256:` + hex of the file's text. */
  digest: string;
  /** The stored observation set's id and its station and depth choice in words, when known. */
  setId?: string;
  readAs?: string;
  result: CalibrationResult;
  /** Statistics at the fitted values. */
  after: Record<string, VariableStatistics> | null;
}

/**
 * The revision note of an accepted fit: file and digest (with the stored set and how it was
 * read), values, objective before → after (and whether the fit was cancelled early),
 * statistics in short.
 */
export function calibrationNote(input: NoteInput): string {
  const { result } = input;
  const written = fittedValues(result.parameters);
  const values = Object.entries(written)
    .map(([id, v]) => `${id} ${formatValue(result.initial[id])} → ${formatValue(v)}`)
    .join(', ');
  const about = [input.digest, input.readAs, input.setId ? `set ${input.setId}` : undefined].filter(Boolean).join('; ');
  const parts = [
    `Calibrated to ${input.fileName} (${about})`,
    values,
    `objective ${formatValue(result.objective.before)} → ${formatValue(result.objective.after)} after ${result.iterations} iteration${result.iterations === 1 ? '' : 's'}${result.status === 'cancelled' ? ' (cancelled early: the best point so far)' : ''}`
  ];
  if (input.after) parts.push(shortStatistics(input.after));
  return parts.join('; ');
}

/** The values an accept writes: 6 significant digits. */
export function fittedValues(values: Record<string, number>): Record<string, number> {
  return Object.fromEntries(Object.entries(values).map(([id, v]) => [id, Number(v.toPrecision(6))]));
}

/** The edit that writes fitted values into a model draft (only parameters it has). */
export function applyFitted(values: Record<string, number>): (doc: Record<string, unknown>) => void {
  const written = fittedValues(values);
  return (doc) => {
    const params = (doc as unknown as ModelDoc).parameters;
    if (!Array.isArray(params)) return;
    for (const p of params) if (Object.hasOwn(written, p.id)) p.value = written[p.id];
  };
}

/** Units of a run's series. */
export function unitsOf(run: RunDoc | null): Record<string, string> {
  return run?.units ?? {};
}
