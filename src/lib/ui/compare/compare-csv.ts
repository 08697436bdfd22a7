/**
 * The comparison's CSV exports, as pure functions (papaparse's `unparse`, no DOM):
 * - the indicator table: one row per run and indicator (long form, easy to filter and
 *   pivot), with the change against the baseline and the cost rows;
 * - the series: one row per date, one column per run and series.
 * Both start with comment lines (`# …`) that name the model, every run's scenario, the
 * revision numbers and digests of the model and scenario each run used, the units and the
 * closure, so a file says where its numbers come from. Read them back with
 * `Papa.parse(text, { header: true, comments: '#' })`. Numbers are written in full
 * precision with a dot; a missing value is an empty field and its reason is in `note`.
 */
import Papa from 'papaparse';

export interface CsvRun {
  runId: string;
  scenarioId: string;
  scenarioTitle: string;
  scenarioRevision: number;
  scenarioDigest: string;
  modelRevision: number;
  modelDigest: string;
  /** `ok`, `failed`, `cancelled`. */
  status: string;
  /** The closure in words ("closed, residual 3e-12 of throughput"), or the engine's error. */
  closure: string;
  /** True for the reference run. */
  baseline: boolean;
}

export interface CsvContext {
  modelId: string;
  modelTitle: string;
  engine: string;
  /** ISO timestamp of the export. */
  exportedAt: string;
  runs: CsvRun[];
  /** Further lines, e.g. the season and the TSI variant. */
  notes?: string[];
}

/** Comment lines (each starting with `# `) naming the model and every run. */
export function headerLines(ctx: CsvContext, what: string): string[] {
  const clean = (s: string) => s.replace(/[\r\n]+/g, ' ');
  const lines = [
    `Lake Ledger: ${what}`,
    `model: ${ctx.modelTitle} (id ${ctx.modelId})`,
    `engine: ${ctx.engine}; exported ${ctx.exportedAt}`,
    ...ctx.runs.map(
      (r) =>
        `run ${r.runId}${r.baseline ? ' (baseline)' : ''}: scenario ${r.scenarioTitle} (id ${r.scenarioId}) revision ${r.scenarioRevision} ${r.scenarioDigest}; ` +
        `model revision ${r.modelRevision} ${r.modelDigest}; status ${r.status}; ${r.closure}`
    ),
    ...(ctx.notes ?? [])
  ];
  return lines.map((l) => `# ${clean(l)}`);
}

const num = (v: number | null | undefined): string => (typeof v === 'number' && Number.isFinite(v) ? String(v) : '');

export interface IndicatorCsvRow {
  runId: string;
  scenario: string;
  key: string;
  label: string;
  unit: string;
  value: number | null;
  /** Change against the baseline in `unit` (empty for the baseline itself). */
  change?: number | null;
  /** Change in per cent of the baseline. */
  percent?: number | null;
  note?: string;
}

export const INDICATOR_FIELDS = ['run', 'scenario', 'indicator', 'label', 'unit', 'value', 'change_vs_baseline', 'change_percent', 'note'] as const;

export function indicatorCsv(ctx: CsvContext, rows: IndicatorCsvRow[]): string {
  const body = Papa.unparse(
    {
      fields: [...INDICATOR_FIELDS],
      data: rows.map((r) => [r.runId, r.scenario, r.key, r.label, r.unit, num(r.value), num(r.change), num(r.percent), r.note ?? ''])
    },
    { newline: '\n' }
  );
  return `${headerLines(ctx, 'indicators of a comparison').join('\n')}\n${body}\n`;
}

export interface SeriesCsvColumn {
  runId: string;
  seriesId: string;
  unit: string;
  /** ISO date of day 0. */
  start: string;
  times: ArrayLike<number>;
  values: ArrayLike<number>;
}

/** The column name of a run's series: `Chl [ug/L] run_0123…`. */
export function seriesColumnName(c: Pick<SeriesCsvColumn, 'runId' | 'seriesId' | 'unit'>): string {
  return `${c.seriesId} [${c.unit}] ${c.runId}`;
}

const MS_PER_DAY = 86_400_000;

/**
 * One row per time found in any column (whole days as ISO dates, others as ISO date-times),
 * in time order; a run without a value at that time leaves its field empty.
 */
export function seriesCsv(ctx: CsvContext, columns: SeriesCsvColumn[]): string {
  const rows = new Map<number, string[]>();
  columns.forEach((c, k) => {
    const t0 = Date.parse(`${c.start}T00:00:00Z`);
    for (let i = 0; i < c.times.length; i++) {
      const ms = Math.round(t0 + c.times[i] * MS_PER_DAY);
      let row = rows.get(ms);
      if (!row) {
        row = new Array<string>(columns.length).fill('');
        rows.set(ms, row);
      }
      row[k] = num(c.values[i]);
    }
  });
  const dateOf = (ms: number) => {
    const iso = new Date(ms).toISOString();
    return ms % MS_PER_DAY === 0 ? iso.slice(0, 10) : iso;
  };
  const data = [...rows.entries()].sort(([a], [b]) => a - b).map(([ms, vals]) => [dateOf(ms), ...vals]);
  const body = Papa.unparse({ fields: ['date', ...columns.map(seriesColumnName)], data }, { newline: '\n' });
  const units = `units: ${[...new Map(columns.map((c) => [c.seriesId, c.unit])).entries()].map(([id, u]) => `${id} in ${u}`).join(', ')}`;
  return `${[...headerLines(ctx, 'series of a comparison'), `# ${units}`].join('\n')}\n${body}\n`;
}

/** A file name without characters that file systems refuse. */
export function csvFileName(modelId: string, what: string): string {
  return `${modelId}-${what}.csv`.replace(/[^A-Za-z0-9_.-]+/g, '_');
}
