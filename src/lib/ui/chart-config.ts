/**
 * Chart configurations as pure functions: data in, a Chart.js configuration out, no DOM.
 * TimeSeriesChart.svelte is the only place that hands one to Chart.js.
 *
 * Time runs along x as calendar years with a fraction (2031.5 is about 2 July 2031),
 * on a linear scale, so no date adapter is needed; tooltips give the ISO date.
 * Non-finite values become gaps in the line, never zeros.
 */
import type { ChartConfiguration, TooltipItem } from 'chart.js';

/**
 * Okabe & Ito's colour-blind-safe palette ("Color Universal Design", 2002), in the order
 * runs take it. Yellow is last: it is hard to see on white.
 */
export const RUN_PALETTE = Object.freeze([
  '#0072B2', // blue
  '#D55E00', // vermillion
  '#009E73', // bluish green
  '#CC79A7', // reddish purple
  '#E69F00', // orange
  '#56B4E9', // sky blue
  '#000000', // black
  '#F0E442' // yellow
]);

/** Text and grid colours, dark enough on white for WCAG AA. */
export const CHART_INK = Object.freeze({ text: '#333333', grid: '#e2e2e2' });

/** The value axis every chart of the app draws: linear from zero, with its title (a unit or a name). */
export function valueAxis(title: string) {
  return {
    type: 'linear' as const,
    beginAtZero: true,
    ticks: { color: CHART_INK.text },
    grid: { color: CHART_INK.grid },
    title: { display: true, text: title, color: CHART_INK.text }
  };
}

const MS_PER_DAY = 86_400_000;

export interface SeriesInput {
  label: string;
  /** As the model writes it (`ug/L`), shown as is. */
  unit: string;
  /** One value per entry of `times`. */
  values: ArrayLike<number>;
}

export interface SeriesChartInput {
  /** Days since `start`. */
  times: ArrayLike<number>;
  /** ISO date of day 0 (UTC midnight). */
  start: string;
  /** Drawn in one chart, so they share one unit. */
  series: SeriesInput[];
  /** First colour taken from RUN_PALETTE. Default 0. */
  paletteOffset?: number;
}

/** A point on the chart: x in calendar years, y the value, `day` since start for the tooltip. */
export interface TimePoint {
  x: number;
  y: number;
  day: number;
}

function startMs(start: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(start);
  if (!m) throw new Error(`invalid start: ${JSON.stringify(start)} (expected an ISO date such as 2027-01-01)`);
  return Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
}

/** `day` days after `start`, as a calendar year with a fraction (UTC). */
export function decimalYear(start: string, day: number): number {
  const ms = startMs(start) + day * MS_PER_DAY;
  const year = new Date(ms).getUTCFullYear();
  const y0 = Date.UTC(year, 0, 1);
  const y1 = Date.UTC(year + 1, 0, 1);
  return year + (ms - y0) / (y1 - y0);
}

/** `day` days after `start`, as an ISO date (whole days, UTC). */
export function isoDateAt(start: string, day: number): string {
  return new Date(startMs(start) + Math.floor(day) * MS_PER_DAY).toISOString().slice(0, 10);
}

/** Three significant digits, no exponent for everyday magnitudes. */
export function formatValue(v: number): string {
  if (!Number.isFinite(v)) return '–';
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(2);
  return Number(v.toPrecision(3)).toString();
}

/** The tick label for a calendar-year axis: whole years only. */
export function yearTick(value: number | string): string {
  const n = typeof value === 'number' ? value : Number(value);
  return Number.isInteger(n) ? String(n) : '';
}

function points(times: ArrayLike<number>, values: ArrayLike<number>, start: string): TimePoint[] {
  if (values.length !== times.length) {
    throw new Error(`series has ${values.length} values for ${times.length} times`);
  }
  const out = new Array<TimePoint>(times.length);
  for (let i = 0; i < times.length; i++) {
    const y = values[i];
    out[i] = { x: decimalYear(start, times[i]), y: Number.isFinite(y) ? y : Number.NaN, day: times[i] };
  }
  return out;
}

/** A line chart of one or more series over time. */
export function seriesChartConfig(input: SeriesChartInput): ChartConfiguration<'line', TimePoint[]> {
  const { times, start, series } = input;
  if (series.length === 0) throw new Error('seriesChartConfig: no series to draw');
  const units = [...new Set(series.map((s) => s.unit))];
  if (units.length > 1) {
    throw new Error(`seriesChartConfig: series have different units (${units.join(', ')}); draw them in separate charts`);
  }
  const unit = units[0];
  const offset = input.paletteOffset ?? 0;
  const first = times.length > 0 ? decimalYear(start, times[0]) : 0;
  const last = times.length > 0 ? decimalYear(start, times[times.length - 1]) : 1;

  return {
    type: 'line',
    data: {
      datasets: series.map((s, i) => ({
        label: s.label,
        data: points(times, s.values, start),
        borderColor: RUN_PALETTE[(offset + i) % RUN_PALETTE.length],
        backgroundColor: RUN_PALETTE[(offset + i) % RUN_PALETTE.length],
        borderWidth: 1.5,
        pointRadius: 0,
        pointHitRadius: 4,
        spanGaps: false
      }))
    },
    options: {
      // Static drawing: faster, steady for screenshots, kind to reduced-motion settings.
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      parsing: false,
      normalized: true,
      interaction: { mode: 'nearest', axis: 'x', intersect: false },
      scales: {
        x: {
          type: 'linear',
          min: Math.floor(first),
          max: Math.ceil(last),
          // No extra ticks at the ends: they crowd the round years ("2045 2047").
          ticks: { callback: yearTick, color: CHART_INK.text, maxRotation: 0, autoSkipPadding: 12, includeBounds: false },
          grid: { color: CHART_INK.grid },
          title: { display: false }
        },
        y: valueAxis(unit)
      },
      plugins: {
        // Min–max keeps every peak (a bloom) that averaging would flatten.
        decimation: { enabled: true, algorithm: 'min-max' },
        legend: { display: series.length > 1, labels: { color: CHART_INK.text } },
        tooltip: {
          callbacks: {
            title: (items: TooltipItem<'line'>[]) =>
              items.length ? isoDateAt(start, (items[0].raw as TimePoint).day) : '',
            label: (item: TooltipItem<'line'>) =>
              `${item.dataset.label}: ${formatValue((item.raw as TimePoint).y)} ${unit}`
          }
        }
      }
    }
  };
}

export interface SeriesSummary {
  min: number;
  max: number;
  mean: number;
  /** Finite values counted. */
  count: number;
}

/** Least, greatest and mean of the finite values (NaN for all three when there are none). */
export function summariseSeries(values: ArrayLike<number>): SeriesSummary {
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  let count = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    if (v < min) min = v;
    if (v > max) max = v;
    sum += v;
    count += 1;
  }
  if (count === 0) return { min: Number.NaN, max: Number.NaN, mean: Number.NaN, count };
  return { min, max, mean: sum / count, count };
}

/** A sentence that says what a chart shows, for readers who cannot see it. */
export function describeSeriesChart(input: SeriesChartInput): string {
  const { times, start } = input;
  if (times.length === 0) return 'No values.';
  const span = `${isoDateAt(start, times[0])} to ${isoDateAt(start, times[times.length - 1])}`;
  const parts = input.series.map((s) => {
    const { min, max, mean } = summariseSeries(s.values);
    return `${s.label} from ${formatValue(min)} to ${formatValue(max)} ${s.unit}, mean ${formatValue(mean)} ${s.unit}`;
  });
  return `${parts.join('; ')}, ${span}.`;
}
