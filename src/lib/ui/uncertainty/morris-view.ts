/**
 * Morris screening on the Uncertainty screen: the trajectories come back one by one from
 * the workers (engine-host.ts), each with one elementary effect per input; this joins them
 * into Morris's measures per input, as the engine's morris() defines them (μ, μ* = mean |EE|
 * after Campolongo, Cariboni & Saltelli 2007, σ with divisor r − 1), over the trajectories
 * whose effect for that input exists, and ranks the inputs by μ*. The bar chart of μ* with σ
 * is a pure configuration for TimeSeriesChart.svelte.
 */
import type { ChartConfiguration, TooltipItem } from 'chart.js';
import { CHART_INK, formatValue } from '../chart-config';
import type { ModelDoc } from '$lib/engine/document/types';
import { INDICATOR_ROLES, ROLE_SPECS } from '$lib/engine/compare/indicators';

export const DEFAULT_MORRIS = Object.freeze({ r: 10, p: 4, seed: 1 });

export interface MorrisRow {
  index: number;
  id: string;
  kind: 'parameter' | 'state';
  /** Effects counted (trajectories where both runs gave a value). */
  n: number;
  mu: number;
  muStar: number;
  sigma: number;
}

/** Measures per input from the effects of each trajectory (trajectory → effect per input). */
export function morrisRows(effects: ReadonlyMap<number, readonly (number | null)[]>, inputs: readonly { kind: 'parameter' | 'state'; id: string }[]): MorrisRow[] {
  return inputs.map((inp, i) => {
    const e: number[] = [];
    for (const t of [...effects.keys()].sort((a, b) => a - b)) {
      const v = effects.get(t)![i];
      if (typeof v === 'number' && Number.isFinite(v)) e.push(v);
    }
    const n = e.length;
    const mu = n ? e.reduce((a, b) => a + b, 0) / n : NaN;
    const muStar = n ? e.reduce((a, b) => a + Math.abs(b), 0) / n : NaN;
    const sigma = n > 1 ? Math.sqrt(e.reduce((a, b) => a + (b - mu) ** 2, 0) / (n - 1)) : NaN;
    return { index: i, id: inp.id, kind: inp.kind, n, mu, muStar, sigma };
  });
}

/** By μ* from the largest; inputs without a value last, then by model order. */
export function rankRows(rows: readonly MorrisRow[]): MorrisRow[] {
  const key = (r: MorrisRow) => (Number.isFinite(r.muStar) ? r.muStar : -Infinity);
  return [...rows].sort((a, b) => key(b) - key(a) || a.index - b.index);
}

/** Runs of a design: r trajectories of k + 1 points. */
export const morrisRuns = (r: number, k: number) => r * (k + 1);

export const MU_STAR_INK = '#0072B2';
export const SIGMA_INK = '#E69F00';

/** Horizontal bars of μ* and σ of the `top` first inputs of `ranked`. */
export function morrisBarConfig(ranked: readonly MorrisRow[], unit: string, top = 15): ChartConfiguration<'bar', number[], string> {
  const shown = ranked.slice(0, top);
  return {
    type: 'bar',
    data: {
      labels: shown.map((r) => `${r.id}${r.kind === 'state' ? ' (start)' : ''}`),
      datasets: [
        { label: 'μ* (mean absolute elementary effect)', data: shown.map((r) => (Number.isFinite(r.muStar) ? r.muStar : 0)), backgroundColor: MU_STAR_INK, borderColor: '#ffffff', borderWidth: 1 },
        { label: 'σ (spread of the effects: curvature or interactions)', data: shown.map((r) => (Number.isFinite(r.sigma) ? r.sigma : 0)), backgroundColor: SIGMA_INK, borderColor: '#333333', borderWidth: 1 }
      ]
    },
    options: {
      indexAxis: 'y',
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      scales: {
        x: { beginAtZero: true, ticks: { color: CHART_INK.text }, grid: { color: CHART_INK.grid }, title: { display: true, text: `${unit} per unit of the input's scaled range`, color: CHART_INK.text } },
        y: { ticks: { color: CHART_INK.text, autoSkip: false }, grid: { display: false } }
      },
      plugins: {
        legend: { display: true, position: 'bottom', labels: { color: CHART_INK.text, boxWidth: 14 } },
        tooltip: { callbacks: { label: (item: TooltipItem<'bar'>) => `${item.dataset.label}: ${formatValue(item.raw as number)} ${unit}` } }
      }
    }
  };
}

/** The ranking in words, for readers who cannot see the chart. */
export function describeMorris(ranked: readonly MorrisRow[], top = 5): string {
  const first = ranked.slice(0, top).filter((r) => Number.isFinite(r.muStar));
  if (!first.length) return 'No elementary effects yet.';
  return `Inputs ranked by μ*: ${first.map((r, i) => `${i + 1}. ${r.id} (μ* ${formatValue(r.muStar)}, σ ${formatValue(r.sigma)})`).join(', ')}.`;
}

export interface IndicatorChoice {
  key: string;
  label: string;
  unit: string;
}

/** The indicators a model has (by the roles of its reported derived quantities), as ensemble column keys. */
export function indicatorChoices(model: ModelDoc): IndicatorChoice[] {
  const out: IndicatorChoice[] = [];
  for (const role of INDICATOR_ROLES) {
    const d = (model.derived ?? []).find((x) => x.role === role && x.report !== false);
    if (!d) continue;
    const spec = ROLE_SPECS[role];
    out.push({ key: `${role}.last`, label: `${spec.name}, ${spec.window === 'season' ? 'growing-season mean' : 'annual mean'}, last 5 years`, unit: d.unit });
  }
  return out;
}

/** Δ of a p-level grid: p / (2(p − 1)). */
export const morrisDelta = (p: number) => p / (2 * (p - 1));

/** Parses r (2 … 200) and p (even, 2 … 20). */
export function parseMorris(rText: string, pText: string, seedText: string): { r: number; p: number; seed: number } | string {
  const r = Number(String(rText).trim());
  const p = Number(String(pText).trim());
  const seed = Number(String(seedText).trim());
  if (!Number.isInteger(r) || r < 2 || r > 200) return 'Trajectories (r): a whole number from 2 to 200.';
  if (!Number.isInteger(p) || p < 2 || p > 20 || p % 2) return 'Levels (p): an even whole number from 2 to 20.';
  if (String(seedText).trim() === '' || !Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) return 'Seed: a whole number from 0 to 4294967295.';
  return { r, p, seed };
}
