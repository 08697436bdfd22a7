/**
 * Chart configurations of the comparison, as pure functions (no DOM): several runs of one
 * quantity over a shared, zoomable time axis with user-set target lines, and a stacked bar
 * chart of a run's annual P budget by group. TimeSeriesChart.svelte draws them.
 *
 * Speed: a 20-year daily run has 7,300 points; eight of them are 58,400. Each series is cut
 * to the visible range and reduced by min–max decimation to at most two points per bucket
 * (about one bucket per pixel column), which keeps every bloom peak and trough that
 * averaging would flatten; with animation off and `parsing: false` Chart.js only draws.
 */
import type { ChartConfiguration, TooltipItem } from 'chart.js';
import { CHART_INK, valueAxis, decimalYear, formatValue, isoDateAt, yearTick, type TimePoint } from '../chart-config';
import type { BudgetLine, RoleBudget } from '$lib/engine/compare/budget-by-role';

/** A time window in calendar years with a fraction (2031.5 is about 2 July 2031). */
export interface TimeRange {
  from: number;
  to: number;
}

export interface CompareSeries {
  runId: string;
  /** The run's series id (for exports). */
  seriesId?: string;
  /** Words for the run in legends and tooltips (its scenario). */
  label: string;
  colour: string;
  dash: readonly number[];
  /** ISO date of day 0. */
  start: string;
  /** Days since `start`. */
  times: ArrayLike<number>;
  values: ArrayLike<number>;
  /** Calendar-year x of each time (from `decimalYears`), computed once per run. */
  xs?: Float64Array;
}

export interface TargetLine {
  value: number;
  /** E.g. "Target 25 ug/L". */
  label: string;
}

export interface CompareChartInput {
  series: CompareSeries[];
  /** The unit of every series (they show one quantity). */
  unit: string;
  /** Visible window; default the whole of every series. */
  range?: TimeRange;
  targets?: TargetLine[];
  /** Buckets across the window (about the chart's width in pixels). Default 800. */
  buckets?: number;
}

/** Points of the target lines: dark grey, long dashes, thicker than the runs. */
export const TARGET_INK = '#3a3a3a';
export const DEFAULT_BUCKETS = 800;

/** The calendar-year x of each time of a run. */
export function decimalYears(start: string, times: ArrayLike<number>): Float64Array {
  const out = new Float64Array(times.length);
  for (let i = 0; i < times.length; i++) out[i] = decimalYear(start, times[i]);
  return out;
}

/** First index with xs[i] >= x (xs ascending). */
function lowerBound(xs: ArrayLike<number>, x: number): number {
  let lo = 0;
  let hi = xs.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (xs[mid] < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Min–max decimation of (xs, ys) over [from, to] into `buckets` equal slices of x: each
 * slice keeps its least and its greatest finite value (in x order), a slice with a
 * non-finite value also keeps one NaN point so the line shows the gap. One point on each
 * side of the window is kept so the line reaches the edges. With few points, all are kept.
 */
export function minMaxDecimate(
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  days: ArrayLike<number>,
  from: number,
  to: number,
  buckets: number
): TimePoint[] {
  const n = xs.length;
  if (n === 0) return [];
  const i0 = Math.max(0, lowerBound(xs, from) - 1);
  const i1 = Math.min(n - 1, lowerBound(xs, to));
  const out: TimePoint[] = [];
  const pt = (i: number): TimePoint => ({ x: xs[i], y: Number.isFinite(ys[i]) ? ys[i] : Number.NaN, day: days[i] });
  if (i1 - i0 + 1 <= 2 * buckets) {
    for (let i = i0; i <= i1; i++) out.push(pt(i));
    return out;
  }
  const width = (to - from) / buckets;
  // a point at `to` belongs to the last bucket; the points beyond the edges to their own
  const bucketOf = (x: number) => (x < from ? -1 : x > to ? buckets : Math.min(buckets - 1, Math.floor((x - from) / width)));
  let i = i0;
  while (i <= i1) {
    const b = bucketOf(xs[i]);
    let lo = -1;
    let hi = -1;
    let gap = -1;
    let j = i;
    for (; j <= i1 && bucketOf(xs[j]) === b; j++) {
      const y = ys[j];
      if (!Number.isFinite(y)) {
        if (gap < 0) gap = j;
        continue;
      }
      if (lo < 0 || y < ys[lo]) lo = j;
      if (hi < 0 || y > ys[hi]) hi = j;
    }
    const keep = [lo, hi, gap].filter((k) => k >= 0).sort((a, b2) => a - b2);
    let last = -1;
    for (const k of keep) {
      if (k !== last) out.push(pt(k));
      last = k;
    }
    i = j;
  }
  return out;
}

/** The whole span of the series, to whole years. */
export function fullRange(series: Pick<CompareSeries, 'start' | 'times' | 'xs'>[]): TimeRange {
  let from = Infinity;
  let to = -Infinity;
  for (const s of series) {
    if (s.times.length === 0) continue;
    const a = s.xs ? s.xs[0] : decimalYear(s.start, s.times[0]);
    const b = s.xs ? s.xs[s.xs.length - 1] : decimalYear(s.start, s.times[s.times.length - 1]);
    from = Math.min(from, a);
    to = Math.max(to, b);
  }
  if (!Number.isFinite(from)) return { from: 0, to: 1 };
  return { from: Math.floor(from), to: Math.max(Math.ceil(to), Math.floor(from) + 1) };
}

/** Smallest window the zoom allows: one month. */
export const MIN_SPAN = 1 / 12;

/** `range` kept inside `full` and at least MIN_SPAN wide (its width kept when it can be). */
export function clampRange(range: TimeRange, full: TimeRange): TimeRange {
  let { from, to } = range;
  if (!(to > from)) [from, to] = [Math.min(from, to), Math.max(from, to)];
  let span = Math.min(Math.max(to - from, MIN_SPAN), full.to - full.from);
  if (from < full.from) from = full.from;
  if (from + span > full.to) from = full.to - span;
  return { from, to: from + span };
}

export type ZoomAction = 'in' | 'out' | 'earlier' | 'later' | 'all';

/** The window after a zoom button: halve or double about the centre, move by half a window, or all. */
export function zoomRange(range: TimeRange, full: TimeRange, action: ZoomAction): TimeRange {
  const span = range.to - range.from;
  const mid = (range.from + range.to) / 2;
  switch (action) {
    case 'in':
      return clampRange({ from: mid - span / 4, to: mid + span / 4 }, full);
    case 'out':
      return clampRange({ from: mid - span, to: mid + span }, full);
    case 'earlier':
      return clampRange({ from: range.from - span / 2, to: range.to - span / 2 }, full);
    case 'later':
      return clampRange({ from: range.from + span / 2, to: range.to + span / 2 }, full);
    case 'all':
      return { ...full };
  }
}

/** A window in words: "2031-01-01 to 2035-07-02". */
export function rangeWords(range: TimeRange): string {
  const iso = (x: number) => {
    const y = Math.floor(x);
    const y0 = Date.UTC(y, 0, 1);
    const ms = y0 + (x - y) * (Date.UTC(y + 1, 0, 1) - y0);
    return new Date(Math.round(ms / 86_400_000) * 86_400_000).toISOString().slice(0, 10);
  };
  return `${iso(range.from)} to ${iso(range.to)}`;
}

/** Several runs of one quantity, with target lines, over the window. */
export function compareChartConfig(input: CompareChartInput): ChartConfiguration<'line', TimePoint[]> {
  const { series, unit } = input;
  const full = fullRange(series);
  const range = input.range ? clampRange(input.range, full) : full;
  const buckets = input.buckets ?? DEFAULT_BUCKETS;
  const runSets = series.map((s) => {
    const xs = s.xs ?? decimalYears(s.start, s.times);
    return {
      label: s.label,
      data: minMaxDecimate(xs, s.values, s.times, range.from, range.to, buckets),
      borderColor: s.colour,
      backgroundColor: s.colour,
      borderDash: [...s.dash],
      borderWidth: 1.6,
      pointRadius: 0,
      pointHitRadius: 4,
      spanGaps: false
    };
  });
  const targetSets = (input.targets ?? []).map((t) => ({
    label: t.label,
    data: [
      { x: range.from, y: t.value, day: Number.NaN },
      { x: range.to, y: t.value, day: Number.NaN }
    ],
    borderColor: TARGET_INK,
    backgroundColor: TARGET_INK,
    borderDash: [14, 5],
    borderWidth: 2.2,
    pointRadius: 0,
    pointHitRadius: 0,
    spanGaps: false
  }));
  // The start of the first run names the tooltip's date (runs of one comparison share a calendar).
  const start0 = series[0]?.start ?? '2027-01-01';
  return {
    type: 'line',
    data: { datasets: [...runSets, ...targetSets] },
    options: {
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      parsing: false,
      normalized: true,
      interaction: { mode: 'nearest', axis: 'x', intersect: false },
      scales: {
        x: {
          type: 'linear',
          min: range.from,
          max: range.to,
          ticks: {
            callback: range.to - range.from > 3 ? yearTick : (v: number | string) => formatYearMonth(Number(v)),
            color: CHART_INK.text,
            maxRotation: 0,
            autoSkipPadding: 12,
            includeBounds: false
          },
          grid: { color: CHART_INK.grid }
        },
        y: valueAxis(unit)
      },
      plugins: {
        decimation: { enabled: false },
        // The screen shows one legend for every chart (the run key); a PNG export draws this one.
        legend: { display: false, labels: { color: CHART_INK.text, boxHeight: 2, boxWidth: 28 } },
        tooltip: {
          filter: (item: TooltipItem<'line'>) => Number.isFinite((item.raw as TimePoint).day),
          callbacks: {
            title: (items: TooltipItem<'line'>[]) => {
              const raw = items.find((i) => Number.isFinite((i.raw as TimePoint).day))?.raw as TimePoint | undefined;
              return raw ? isoDateAt(series[items[0].datasetIndex]?.start ?? start0, raw.day) : '';
            },
            label: (item: TooltipItem<'line'>) => `${item.dataset.label}: ${formatValue((item.raw as TimePoint).y)} ${unit}`
          }
        }
      }
    }
  };
}

/** Tick words inside a short window: "2031-07" at month starts, nothing between. */
export function formatYearMonth(x: number): string {
  const y = Math.floor(x);
  const frac = x - y;
  const m = Math.round(frac * 12);
  if (Math.abs(frac * 12 - m) > 0.02) return '';
  const yy = m === 12 ? y + 1 : y;
  const mm = m === 12 ? 0 : m;
  return `${yy}-${String(mm + 1).padStart(2, '0')}`;
}

// ---------------------------------------------------------------------------------------
// The annual budget by group as stacked bars.

/**
 * Colours of the budget groups: Paul Tol's "muted" scheme (Tol, P. 2021, Colour Schemes,
 * SRON technical note SRON/EPS/TN/09-002), colour-blind safe and apart from the run palette
 * so a group is never read as a run. The table beside the chart says every number in words.
 */
export const BUDGET_INK: Readonly<Record<string, string>> = Object.freeze({
  'import:externalLoad': '#332288',
  'measures:added': '#88CCEE',
  'import:other': '#44AA99',
  'export:outflow': '#CC6677',
  'measures:removed': '#882255',
  'export:other': '#AA4499',
  'sediment:release': '#DDCC77',
  'sediment:netSedimentation': '#117733',
  'sediment:burial': '#999933',
  'measures:moved': '#999999'
});

/** Which lines the bar chart draws, with their sign (+ into the water or the lake) and stack. */
export function barPlacement(l: BudgetLine): { sign: 1 | -1; stack: 'boundary' | 'sediment' } | null {
  if (l.crossing === 'import') return { sign: 1, stack: 'boundary' };
  if (l.crossing === 'export') return { sign: -1, stack: 'boundary' };
  if (l.key === 'sediment:release') return { sign: 1, stack: 'sediment' };
  if (l.key === 'sediment:netSedimentation' || l.key === 'sediment:burial' || l.key === 'measures:moved') return { sign: -1, stack: 'sediment' };
  return null;
}

/** Which way a bar's mass goes, in words. */
function barDirection(l: BudgetLine, sign: 1 | -1): string {
  if (l.crossing === 'import') return 'into the lake';
  if (l.crossing === 'export') return 'out of the lake';
  if (l.key === 'sediment:release') return 'sediment to water';
  if (l.key === 'sediment:netSedimentation') return 'water to sediment';
  if (l.key === 'sediment:burial') return 'mobile to buried sediment';
  return sign > 0 ? 'up' : 'down';
}

function inkOf(l: BudgetLine): string {
  return BUDGET_INK[l.key] ?? (l.crossing === 'import' ? BUDGET_INK['import:other'] : BUDGET_INK['export:other']);
}

/**
 * Two stacks per year: the lake's boundary (imports up, exports down) and the exchange with
 * the sediment (release up; net sedimentation, burial and transfers down), in `unit` per year.
 */
export function budgetBarConfig(budget: RoleBudget): ChartConfiguration<'bar', number[], string> {
  const labels = budget.years.map((y) => String(y.year));
  const unit = `${budget.unit} ${budget.element} per year`;
  const datasets = budget.lines
    .map((l) => ({ l, p: barPlacement(l) }))
    .filter((x): x is { l: BudgetLine; p: NonNullable<ReturnType<typeof barPlacement>> } => x.p !== null)
    .filter(({ l }) => l.perYear.some((v) => v !== 0))
    .map(({ l, p }) => ({
      label: `${l.label} (${barDirection(l, p.sign)})`,
      data: l.perYear.map((v) => p.sign * v),
      stack: p.stack,
      backgroundColor: inkOf(l),
      borderColor: '#ffffff',
      borderWidth: 1
    }));
  return {
    type: 'bar',
    data: { labels, datasets },
    options: {
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      scales: {
        x: { stacked: true, ticks: { color: CHART_INK.text, maxRotation: 0, autoSkipPadding: 8 }, grid: { display: false } },
        y: {
          stacked: true,
          ticks: { color: CHART_INK.text },
          grid: { color: CHART_INK.grid },
          title: { display: true, text: unit, color: CHART_INK.text }
        }
      },
      plugins: {
        legend: { display: true, position: 'bottom', labels: { color: CHART_INK.text, boxWidth: 14 } },
        tooltip: {
          callbacks: {
            label: (item: TooltipItem<'bar'>) => `${item.dataset.label}: ${formatValue(Math.abs(item.raw as number))} ${unit}`
          }
        }
      }
    }
  };
}
