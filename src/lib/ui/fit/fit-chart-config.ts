/**
 * Chart configurations of the Fit screen, as pure functions: observations as markers over
 * the simulated series of one variable, and the residuals (simulated − observed) over time.
 * Censored observations are told apart by shape as well as colour: measured values are
 * filled circles, values below a detection limit downward triangles (the true value is at
 * most there), lower bounds such as a Secchi disk seen on the bottom upward triangles.
 */
import type { ChartConfiguration, TooltipItem } from 'chart.js';
import type { Censoring, ObservationPoint } from '$lib/engine/fit/observations';
import type { Pair } from '$lib/engine/fit/match';
import { censoredResidual } from '$lib/engine/fit/statistics';
import { CHART_INK, valueAxis, RUN_PALETTE, decimalYear, formatValue, yearTick } from '../chart-config';

export interface FitPoint {
  x: number;
  y: number;
  /** ISO date, for the tooltip. */
  date: string;
}

export const SIM_COLOUR = RUN_PALETTE[0];
export const OBS_COLOUR = '#000000';
export const CENSORED_COLOUR = RUN_PALETTE[1];

/** Marker and words of each kind of observation. */
export const OBS_KINDS: Record<'measured' | 'below' | 'above', { label: string; pointStyle: 'circle' | 'triangle'; rotation: number; colour: string }> = {
  measured: { label: 'Observed', pointStyle: 'circle', rotation: 0, colour: OBS_COLOUR },
  below: { label: 'Below the detection limit (at most)', pointStyle: 'triangle', rotation: 180, colour: CENSORED_COLOUR },
  above: { label: 'Lower bound (e.g. Secchi on the bottom)', pointStyle: 'triangle', rotation: 0, colour: CENSORED_COLOUR }
};

const kindOf = (c: Censoring): keyof typeof OBS_KINDS => (c === 'below' ? 'below' : c === 'above' ? 'above' : 'measured');

const xOfDate = (date: string) => decimalYear(date, 0);

export interface ObservationChartInput {
  label: string;
  unit: string;
  /** The run: ISO date of day 0, days, values of this series. */
  start: string;
  times: ArrayLike<number>;
  values: ArrayLike<number>;
  points: readonly ObservationPoint[];
  /** Label of the simulated line (the run's scenario or "fitted"). */
  simLabel?: string;
  /** A second simulated line (e.g. the fitted run), dashed. */
  second?: { label: string; start: string; times: ArrayLike<number>; values: ArrayLike<number> };
}

/** The whole calendar years that hold the observations (at least one). */
export function observationWindow(points: readonly { date: string }[]): { min: number; max: number } | null {
  if (!points.length) return null;
  const xs = points.map((p) => xOfDate(p.date));
  const min = Math.floor(Math.min(...xs));
  const max = Math.max(min + 1, Math.ceil(Math.max(...xs)));
  return { min, max };
}

function simulated(start: string, times: ArrayLike<number>, values: ArrayLike<number>, win: { min: number; max: number } | null): FitPoint[] {
  const out: FitPoint[] = [];
  for (let i = 0; i < times.length; i++) {
    const x = decimalYear(start, times[i]);
    if (win && (x < win.min || x > win.max)) continue;
    const y = values[i];
    out.push({ x, y: Number.isFinite(y) ? y : Number.NaN, date: '' });
  }
  return out;
}

export function observationChartConfig(input: ObservationChartInput): ChartConfiguration<'line', FitPoint[]> {
  const win = observationWindow(input.points);
  const line = (label: string, data: FitPoint[], colour: string, dash: number[]) => ({
    label,
    data,
    borderColor: colour,
    backgroundColor: colour,
    borderWidth: 1.5,
    borderDash: dash,
    pointRadius: 0,
    pointHitRadius: 0,
    // the legend shows a line for a line, a marker for markers
    pointStyle: 'line' as 'line' | 'circle' | 'triangle',
    rotation: 0,
    showLine: true,
    spanGaps: false,
    order: 2
  });
  const datasets = [line(input.simLabel ?? 'Simulated', simulated(input.start, input.times, input.values, win), SIM_COLOUR, [])];
  if (input.second) datasets.push(line(input.second.label, simulated(input.second.start, input.second.times, input.second.values, win), RUN_PALETTE[2], [6, 3]));
  for (const kind of ['measured', 'below', 'above'] as const) {
    const pts = input.points.filter((p) => kindOf(p.censored) === kind);
    if (!pts.length && kind !== 'measured') continue;
    const k = OBS_KINDS[kind];
    datasets.push({
      label: k.label,
      data: pts.map((p) => ({ x: xOfDate(p.date), y: p.value, date: p.date })),
      borderColor: k.colour,
      backgroundColor: kind === 'measured' ? k.colour : '#ffffff',
      borderWidth: 1.5,
      borderDash: [],
      showLine: false,
      spanGaps: false,
      order: 1,
      pointRadius: 4,
      pointHitRadius: 6,
      pointStyle: k.pointStyle,
      rotation: k.rotation
    } as (typeof datasets)[number]);
  }
  return {
    type: 'line',
    data: { datasets },
    options: {
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      parsing: false,
      normalized: true,
      interaction: { mode: 'nearest', intersect: true },
      scales: {
        x: { type: 'linear', min: win?.min, max: win?.max, ticks: { callback: yearTick, color: CHART_INK.text, maxRotation: 0, includeBounds: false }, grid: { color: CHART_INK.grid } },
        y: valueAxis(input.unit)
      },
      plugins: {
        legend: { display: true, labels: { color: CHART_INK.text, usePointStyle: true } },
        tooltip: {
          callbacks: {
            title: (items: TooltipItem<'line'>[]) => (items.length ? (items[0].raw as FitPoint).date : ''),
            label: (item: TooltipItem<'line'>) => `${item.dataset.label}: ${formatValue((item.raw as FitPoint).y)} ${input.unit}`
          }
        }
      }
    }
  };
}

/** Residuals e = sim − obs of the pairs that count (censored pairs the simulation agrees with are left out). */
export function residualPoints(pairs: readonly Pair[]): { points: FitPoint[]; censored: FitPoint[]; leftOut: number } {
  const points: FitPoint[] = [];
  const censored: FitPoint[] = [];
  let leftOut = 0;
  for (const p of pairs) {
    const e = censoredResidual(p);
    if (e === null) {
      leftOut++;
      continue;
    }
    (p.censored ? censored : points).push({ x: xOfDate(p.date), y: e, date: p.date });
  }
  return { points, censored, leftOut };
}

export function residualChartConfig(input: { label: string; unit: string; pairs: readonly Pair[] }): ChartConfiguration<'line', FitPoint[]> {
  const { points, censored } = residualPoints(input.pairs);
  const win = observationWindow(input.pairs);
  const dots = (label: string, data: FitPoint[], kind: 'measured' | 'below') => ({
    label,
    data,
    borderColor: OBS_KINDS[kind].colour,
    backgroundColor: kind === 'measured' ? OBS_KINDS[kind].colour : '#ffffff',
    showLine: false,
    pointRadius: 3.5,
    pointHitRadius: 6,
    pointStyle: OBS_KINDS[kind].pointStyle,
    rotation: kind === 'below' ? 180 : 0,
    borderWidth: 1.5
  });
  const datasets = [dots('Simulated − observed', points, 'measured')];
  if (censored.length) datasets.push(dots('Simulated − limit (censored, counted)', censored, 'below'));
  return {
    type: 'line',
    data: { datasets },
    options: {
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      parsing: false,
      scales: {
        x: { type: 'linear', min: win?.min, max: win?.max, ticks: { callback: yearTick, color: CHART_INK.text, maxRotation: 0, includeBounds: false }, grid: { color: CHART_INK.grid } },
        y: {
          type: 'linear',
          ticks: { color: CHART_INK.text },
          // the zero line a little darker: above it the model is too high
          grid: { color: (ctx: { tick?: { value: number } }) => (ctx.tick?.value === 0 ? '#555555' : CHART_INK.grid) },
          title: { display: true, text: `residual [${input.unit}]`, color: CHART_INK.text }
        }
      },
      plugins: {
        legend: { display: true, labels: { color: CHART_INK.text, usePointStyle: true } },
        tooltip: { callbacks: { title: (items: TooltipItem<'line'>[]) => (items.length ? (items[0].raw as FitPoint).date : ''), label: (item: TooltipItem<'line'>) => `${item.dataset.label}: ${formatValue((item.raw as FitPoint).y)} ${input.unit}` } }
      }
    }
  };
}

/** The objective's path: best objective before the first iteration and after each one. */
export function objectivePathConfig(path: readonly number[]): ChartConfiguration<'line', { x: number; y: number }[]> {
  return {
    type: 'line',
    data: { datasets: [{ label: 'Objective (best so far)', data: path.map((y, x) => ({ x, y })), borderColor: SIM_COLOUR, backgroundColor: SIM_COLOUR, pointRadius: 3, pointStyle: 'circle', borderWidth: 1.5 }] },
    options: {
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      parsing: false,
      scales: {
        x: { type: 'linear', min: 0, max: Math.max(1, path.length - 1), ticks: { stepSize: 1, precision: 0, color: CHART_INK.text }, title: { display: true, text: 'iteration', color: CHART_INK.text }, grid: { color: CHART_INK.grid } },
        y: valueAxis('objective')
      },
      plugins: { legend: { display: false } }
    }
  };
}

/** The words a chart frame carries for readers who cannot see it. */
export function describeObservationChart(input: ObservationChartInput): string {
  const below = input.points.filter((p) => p.censored === 'below').length;
  const above = input.points.filter((p) => p.censored === 'above').length;
  const win = observationWindow(input.points);
  return `${input.label} in ${input.unit}: ${input.points.length} observations (${below} below a detection limit, ${above} lower bounds) as markers over the simulated line${win ? `, ${win.min} to ${win.max}` : ''}.`;
}
