/**
 * The percentile-band chart of the Uncertainty screen, as a pure function: per scenario a
 * shaded 5–95 % band, a darker 25–75 % band and the median as a line in the scenario's
 * colour and dash (run-colours.ts), over calendar years. TimeSeriesChart.svelte draws it.
 *
 * The bands are filled by a small plugin of our own (`bandFill`) that shades between the
 * lower and upper percentile lines of each band, so the chart needs nothing more of
 * Chart.js than lines. The percentile lines themselves are not stroked (width 0): they
 * carry the band's points and the tooltip's words; scenarios are told apart by the
 * median's dash and the key in words, never by the band's colour alone.
 */
import type { ChartConfiguration, Plugin, TooltipItem } from 'chart.js';
import { CHART_INK, valueAxis, decimalYear, formatValue, isoDateAt, yearTick, type TimePoint } from '../chart-config';
import type { Band } from './ensemble-view';

export interface BandSeries {
  /** Words for the scenario. */
  label: string;
  colour: string;
  dash: readonly number[];
  /** ISO date of day 0. */
  start: string;
  band: Band;
}

export interface BandChartInput {
  series: BandSeries[];
  unit: string;
  /** A user-set target, drawn as a dashed grey line. */
  target?: { value: number; label: string } | null;
}

/** `#RRGGBB` with an alpha, as `rgba(…)`. */
export function withAlpha(hex: string, alpha: number): string {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!m) return hex;
  return `rgba(${parseInt(m[1], 16)}, ${parseInt(m[2], 16)}, ${parseInt(m[3], 16)}, ${alpha})`;
}

/** Which dataset pairs to shade: [lower index, upper index, fill colour]. */
export type BandPairs = [number, number, string][];

/** Shades between pairs of line datasets before the lines are drawn. */
export function bandFillPlugin(pairs: BandPairs): Plugin<'line'> {
  return {
    id: 'lakeledgerBandFill',
    beforeDatasetsDraw(chart) {
      const { ctx, chartArea } = chart;
      ctx.save();
      ctx.beginPath();
      ctx.rect(chartArea.left, chartArea.top, chartArea.right - chartArea.left, chartArea.bottom - chartArea.top);
      ctx.clip();
      for (const [lo, hi, colour] of pairs) {
        const a = chart.getDatasetMeta(lo).data;
        const b = chart.getDatasetMeta(hi).data;
        const n = Math.min(a.length, b.length);
        let i = 0;
        while (i < n) {
          // one polygon per run of finite points
          while (i < n && !(Number.isFinite(a[i].y) && Number.isFinite(b[i].y))) i++;
          const from = i;
          while (i < n && Number.isFinite(a[i].y) && Number.isFinite(b[i].y)) i++;
          if (i - from < 2) continue;
          ctx.beginPath();
          ctx.moveTo(b[from].x, b[from].y);
          for (let k = from + 1; k < i; k++) ctx.lineTo(b[k].x, b[k].y);
          for (let k = i - 1; k >= from; k--) ctx.lineTo(a[k].x, a[k].y);
          ctx.closePath();
          ctx.fillStyle = colour;
          ctx.fill();
        }
      }
      ctx.restore();
    }
  };
}

const pts = (start: string, days: number[], ys: number[]): TimePoint[] =>
  days.map((d, i) => ({ x: decimalYear(start, d), y: Number.isFinite(ys[i]) ? ys[i] : Number.NaN, day: d }));

/** Dataset order per scenario: p05, p95, p25, p75, median (the tooltip shows the median only). */
export function bandChartConfig(input: BandChartInput): ChartConfiguration<'line', TimePoint[]> {
  const { series, unit } = input;
  const datasets: ChartConfiguration<'line', TimePoint[]>['data']['datasets'] = [];
  const pairs: BandPairs = [];
  for (const s of series) {
    const edge = (label: string, ys: number[], width: number) => ({
      label: `${s.label}: ${label}`,
      data: pts(s.start, s.band.days, ys),
      borderColor: withAlpha(s.colour, 0.7),
      backgroundColor: withAlpha(s.colour, 0.7),
      borderDash: [1, 3],
      borderWidth: width,
      hidden: false,
      pointRadius: 0,
      pointHitRadius: 0,
      spanGaps: false
    });
    const i = datasets.length;
    datasets.push(edge('5th percentile', s.band.p05, 0), edge('95th percentile', s.band.p95, 0), edge('25th percentile', s.band.p25, 0), edge('75th percentile', s.band.p75, 0));
    pairs.push([i, i + 1, withAlpha(s.colour, 0.14)], [i + 2, i + 3, withAlpha(s.colour, 0.3)]);
    datasets.push({
      label: `${s.label}: median`,
      data: pts(s.start, s.band.days, s.band.p50),
      borderColor: s.colour,
      backgroundColor: s.colour,
      borderDash: [...s.dash],
      borderWidth: 2,
      pointRadius: 0,
      pointHitRadius: 4,
      spanGaps: false
    });
  }
  const xs = datasets.flatMap((d) => (d.data.length ? [d.data[0].x, d.data[d.data.length - 1].x] : []));
  const from = Math.min(...xs);
  const to = Math.max(...xs);
  const spanned = Number.isFinite(from) && Number.isFinite(to);
  if (input.target) {
    if (spanned) {
      datasets.push({
        label: input.target.label,
        data: [
          { x: from, y: input.target.value, day: Number.NaN },
          { x: to, y: input.target.value, day: Number.NaN }
        ],
        borderColor: '#3a3a3a',
        backgroundColor: '#3a3a3a',
        borderDash: [14, 5],
        borderWidth: 2,
        pointRadius: 0,
        pointHitRadius: 0,
        spanGaps: false
      });
    }
  }
  const medians = new Set(series.map((_, k) => k * 5 + 4));
  return {
    type: 'line',
    data: { datasets },
    plugins: [bandFillPlugin(pairs)],
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
          ...(spanned ? { min: from, max: to } : {}),
          ticks: { callback: yearTick, color: CHART_INK.text, maxRotation: 0, autoSkipPadding: 12, includeBounds: false },
          grid: { color: CHART_INK.grid }
        },
        y: valueAxis(unit)
      },
      plugins: {
        decimation: { enabled: false },
        legend: { display: false },
        tooltip: {
          filter: (item: TooltipItem<'line'>) => medians.has(item.datasetIndex),
          callbacks: {
            title: (items: TooltipItem<'line'>[]) => {
              const raw = items[0]?.raw as TimePoint | undefined;
              const s = series[Math.floor((items[0]?.datasetIndex ?? 0) / 5)];
              return raw && s && Number.isFinite(raw.day) ? isoDateAt(s.start, raw.day) : '';
            },
            label: (item: TooltipItem<'line'>) => {
              const s = series[Math.floor(item.datasetIndex / 5)];
              const i = item.dataIndex;
              const b = s.band;
              return `${s.label}: median ${formatValue(b.p50[i])}, 25–75 % ${formatValue(b.p25[i])}–${formatValue(b.p75[i])}, 5–95 % ${formatValue(b.p05[i])}–${formatValue(b.p95[i])} ${unit}`;
            }
          }
        }
      }
    }
  };
}

/** The chart in words, for readers who cannot see it: each scenario's median and 5–95 % at the end. */
export function describeBandChart(title: string, input: BandChartInput): string {
  const parts = input.series.map((s) => {
    const b = s.band;
    const i = b.days.length - 1;
    return i < 0 ? `${s.label}: no members yet` : `${s.label} (${b.members} members) ends with median ${formatValue(b.p50[i])} ${input.unit}, 5–95 % from ${formatValue(b.p05[i])} to ${formatValue(b.p95[i])}`;
  });
  return `${title}, percentile bands over time. ${parts.join('; ')}.`;
}
