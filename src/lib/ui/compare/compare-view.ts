/**
 * The Compare screen's decisions as pure functions: which runs are selected (kept in the
 * address as `?runs=id1,id2`), which run is the baseline, what a run's closure says in
 * words, and the rows of the indicator table.
 */
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { StoredRunSummary } from '$lib/storage/types';
import { headlines, runIndicators, type Headline, type IndicatorOptions, type RunIndicators } from '$lib/engine/compare/indicators';
import { costPerImprovement, scenarioCost, versusBaseline, type Cost, type CostPerImprovement, type IndicatorChange } from '$lib/engine/compare/versus-baseline';
import { relapseOf, type Relapse } from '$lib/engine/indicators/relapse';
import { findRoleSeries } from '$lib/engine/compare/indicators';
import { formatRatio } from '../run-summary';

export const MIN_RUNS = 2;
export const MAX_RUNS = 8;

const RUN_ID = /^[A-Za-z0-9_-]{1,80}$/;

/** The run ids of `?runs=…`: well-formed ids, each once, at most MAX_RUNS, in order. */
export function parseRunSelection(param: string | null | undefined): string[] {
  if (!param) return [];
  const out: string[] = [];
  for (const raw of param.split(',')) {
    const id = raw.trim();
    if (RUN_ID.test(id) && !out.includes(id)) out.push(id);
    if (out.length === MAX_RUNS) break;
  }
  return out;
}

export function selectionParam(ids: readonly string[]): string {
  return ids.join(',');
}

/**
 * The selection when the address names none: the newest finished run of each scenario
 * (newest first as the store lists them), a baseline first when there is one, at most
 * MAX_RUNS.
 */
export function defaultSelection(runs: readonly StoredRunSummary[], isBaseline: (scenarioKey: string) => boolean): string[] {
  const seen = new Set<string>();
  const picked: StoredRunSummary[] = [];
  for (const r of runs) {
    if (r.status === 'cancelled' || seen.has(r.scenarioKey)) continue;
    seen.add(r.scenarioKey);
    picked.push(r);
  }
  picked.sort((a, b) => Number(isBaseline(b.scenarioKey)) - Number(isBaseline(a.scenarioKey)));
  return picked.slice(0, MAX_RUNS).map((r) => r.id);
}

/** A scenario without measures is a baseline (documents.md). */
export function isBaselineScenario(doc: Pick<ScenarioDoc, 'measures'> | null | undefined): boolean {
  return !!doc && (doc.measures ?? []).length === 0;
}

/**
 * The reference run: the one the user chose when it is selected and finished, else the
 * first selected finished run whose scenario has no measures, else the first finished run.
 */
export function pickBaseline(
  selected: readonly { id: string; status: RunDoc['status']; scenario: Pick<ScenarioDoc, 'measures'> | null }[],
  chosen: string | null | undefined
): string | null {
  const ok = selected.filter((r) => r.status === 'ok');
  if (chosen && ok.some((r) => r.id === chosen)) return chosen;
  return (ok.find((r) => isBaselineScenario(r.scenario)) ?? ok[0])?.id ?? null;
}

/** A run's state in words, never a colour: "closed, 3e-12 of throughput", "not closed: …", "failed: …". */
export function closureWords(run: Pick<StoredRunSummary, 'status' | 'error' | 'closure'>): { ok: boolean; text: string } {
  if (run.status === 'failed') return { ok: false, text: `failed: ${run.error?.message ?? 'the engine gave no message'}` };
  if (run.status === 'cancelled') return { ok: false, text: 'cancelled before the end' };
  const c = run.closure;
  if (c.ok) return { ok: true, text: `closed, ${formatRatio(c.relativeResidual)} of throughput` };
  return { ok: false, text: `not closed: residual ${formatRatio(c.relativeResidual)} of throughput, above the tolerance ${formatRatio(c.tolerance)}` };
}

export interface LoadedRun {
  summary: StoredRunSummary;
  run: RunDoc;
  model: ModelDoc;
  scenario: ScenarioDoc | null;
}

export interface IndicatorRow {
  runId: string;
  scenarioTitle: string;
  isBaseline: boolean;
  indicators: RunIndicators;
  headlines: Headline[];
  /** Against the baseline (null for the baseline itself or when there is none). */
  changes: IndicatorChange[] | null;
  costs: Cost[];
  /** Cost per unit of growing-season chlorophyll improvement over the last years, per currency. */
  costPerChl: CostPerImprovement[] | null;
  /**
   * Relapse after the scenario's last measure (indicators/relapse.ts: the first year whose
   * growing-season chlorophyll-a is back within 10 % of the baseline's), or null with why.
   */
  relapse: { value: Relapse | null; reason?: string };
}

/** The key whose improvement the cost is set against. */
export const COST_INDICATOR = 'chlorophyll.last';

/** One row per run of the indicator table, in selection order. */
export function indicatorRows(loaded: readonly LoadedRun[], baselineId: string | null, options: IndicatorOptions): IndicatorRow[] {
  const targets = options.targets ?? {};
  const computed = loaded.map((l) => {
    const indicators = runIndicators(l.run, l.model, options);
    return { l, indicators, headlines: headlines(indicators, targets) };
  });
  const base = computed.find((c) => c.l.run.id === baselineId) ?? null;
  return computed.map(({ l, indicators, headlines: h }) => {
    const isBaseline = l.run.id === baselineId;
    const changes = base && !isBaseline ? versusBaseline(h, base.headlines) : null;
    const costs = scenarioCost(l.scenario ?? {});
    const chl = changes?.find((c) => c.key === COST_INDICATOR) ?? null;
    return {
      relapse: relapseFor(l, isBaseline ? null : base?.l ?? null, options),
      runId: l.run.id,
      scenarioTitle: l.summary.scenarioTitle || l.run.scenario,
      isBaseline,
      indicators,
      headlines: h,
      changes,
      costs,
      costPerChl: chl && costs.length ? costPerImprovement(costs, chl) : null
    };
  });
}

function relapseFor(l: LoadedRun, base: LoadedRun | null, options: IndicatorOptions): IndicatorRow['relapse'] {
  if (!base) return { value: null, reason: 'reference' };
  if (l.run.status !== 'ok') return { value: null, reason: 'the run did not finish' };
  if (!l.scenario || !(l.scenario.measures ?? []).length) return { value: null, reason: 'no measures' };
  const chl = findRoleSeries(l.model, l.run, 'chlorophyll');
  if ('ok' in chl) return { value: null, reason: chl.reason };
  return { value: relapseOf(l.run, base.run, l.scenario, chl.id, { season: options.season }) };
}

/** A relapse in words: "2033 (lasted 2 years)", "none to the end of the run". */
export function formatRelapse(r: IndicatorRow['relapse']): string {
  if (!r.value) return r.reason ?? '–';
  if (r.value.lastMeasureYear === null) return 'no measures';
  if (r.value.relapseYear === null) return 'none to the end of the run';
  const n = r.value.yearsLasting ?? 0;
  return `${r.value.relapseYear} (better for ${n} year${n === 1 ? '' : 's'} after the last measure)`;
}

const fmt = new Intl.NumberFormat('en', { maximumSignificantDigits: 3 });
const money = new Intl.NumberFormat('en', { maximumFractionDigits: 0 });

/** A headline value in words: "64.1", "2031", "–". */
export function formatHeadline(h: Pick<Headline, 'kind' | 'value'>): string {
  if (h.value === null || !Number.isFinite(h.value)) return '–';
  if (h.kind === 'year') return String(h.value);
  if (h.kind === 'days') return money.format(h.value);
  return fmt.format(h.value);
}

/** A change in words with its sign: "−12.3 ug/L (−19 %)", "3 years earlier". */
export function formatChange(c: IndicatorChange, kind: Headline['kind']): string {
  if (c.change === null) return '–';
  if (kind === 'year') {
    if (c.change === 0) return 'same year';
    const n = Math.abs(c.change);
    return `${n} year${n === 1 ? '' : 's'} ${c.change < 0 ? 'earlier' : 'later'}`;
  }
  const sign = (v: number) => (v > 0 ? '+' : v < 0 ? '−' : '±');
  const unit = c.unit && c.unit !== 'TSI' ? ` ${c.unit}` : kind === 'index' ? ' TSI units' : '';
  const pct = c.percent === null ? '' : ` (${sign(c.percent)}${fmt.format(Math.abs(c.percent))} %)`;
  return `${sign(c.change)}${fmt.format(Math.abs(c.change))}${unit}${pct}`;
}

/** "2,610,000 EUR". */
export function formatMoney(c: Cost): string {
  return `${money.format(c.amount)} ${c.currency}`;
}

/** "261,000 EUR per ug/L" or "no improvement". */
export function formatCostPer(c: CostPerImprovement): string {
  if (c.perUnit === null) return c.reason === 'no improvement' ? 'no improvement' : 'no value';
  return `${money.format(c.perUnit)} ${c.currency} per ${c.unit}`;
}
