/**
 * What the printable report for water managers says, as pure functions: each option's
 * measures in words with the cautions of the measures that act on the lake itself, and the
 * yearly growing-season chlorophyll-a of every option as lines of an inline SVG (crisp on
 * paper, no canvas). The numbers come from the comparison's indicators.
 */
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import type { YearValue } from '$lib/engine/indicators/seasonal';
import { CATALOGUE, type Catalogue } from '$lib/scenario/catalogue';
import { matchMeasure } from '$lib/scenario/match';
import { capitalise, measureWords } from '$lib/scenario/words';
import { summarize } from '$lib/engine/uncertainty/summaries';
import { shareMeeting, type Share } from '$lib/engine/uncertainty/share';
import type { EnsembleRecord } from '$lib/archive/records';

/** The caution printed with every report, whatever the options. */
export const REPORT_CAUTION =
  'These are projections of a model under assumed inputs, not guarantees. Fish removal, stocking, chemical ' +
  'treatment of the sediment, dredging and changes of the water level need the permits and licensed practice ' +
  'that local rules require; the authorities and specialists who grant and carry them out decide, not this report.';

export interface OptionMeasure {
  text: string;
  /** The catalogue item's caution, when the measure acts on the lake itself. */
  caution: string | null;
  /** The measure's cost entries, in words. */
  costs: string[];
}

const money = (amount: number, currency: string) =>
  `${currency} ${new Intl.NumberFormat('en', { maximumFractionDigits: 0 }).format(amount)}`;

/** The measures of an option in a manager's words, with cautions and costs. */
export function optionMeasures(scenario: ScenarioDoc | null, model: ModelDoc, catalogue: Catalogue = CATALOGUE): OptionMeasure[] {
  const measures = scenario?.measures ?? [];
  return measures.map((m, i) => {
    const id = m.id ?? `m${i + 1}`;
    const item = matchMeasure(m, model, catalogue);
    const costs = (scenario?.costs ?? []).filter((c) => c.measure === id).map((c) => `${money(c.amount, c.currency)}${c.note ? ` (${c.note})` : ''}`);
    return { text: `${capitalise(measureWords(m, model, catalogue))}.`, caution: item === 'other' ? null : item.caution, costs };
  });
}

/** The distinct cautions of all options, in the order first met. */
export function cautionsOf(options: readonly OptionMeasure[][]): string[] {
  return [...new Set(options.flat().flatMap((m) => (m.caution ? [m.caution] : [])))];
}

export interface YearLine {
  id: string;
  colour: string;
  dash: readonly number[];
  values: readonly YearValue[];
}

export interface YearChart {
  width: number;
  height: number;
  /** SVG path per line (`M x y L x y …`), skipping years without a value. */
  paths: { id: string; colour: string; dash: string; d: string }[];
  xTicks: { x: number; label: string }[];
  yTicks: { y: number; label: string }[];
  /** A target as a horizontal line, when one is set and inside the scale. */
  target: { y: number; label: string } | null;
}

/** Round up to 1, 2 or 5 times a power of ten. */
function niceCeil(x: number): number {
  if (!(x > 0)) return 1;
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 5, 10]) if (m * p >= x) return m * p;
  return 10 * p;
}

/** Lines of yearly values on a shared scale from zero; years on x, one tick per 5 years. */
export function yearChart(lines: readonly YearLine[], target: number | null, size = { width: 640, height: 240 }): YearChart {
  const pad = { left: 44, right: 12, top: 10, bottom: 24 };
  const all = lines.flatMap((l) => l.values.filter((v) => Number.isFinite(v.value)));
  const years = all.map((v) => v.year);
  const y0 = years.length ? Math.min(...years) : 0;
  const y1 = years.length ? Math.max(...years) : 1;
  const top = niceCeil(Math.max(...all.map((v) => v.value), target ?? 0, 0));
  const w = size.width - pad.left - pad.right;
  const h = size.height - pad.top - pad.bottom;
  const X = (year: number) => pad.left + (y1 === y0 ? w / 2 : ((year - y0) / (y1 - y0)) * w);
  const Y = (v: number) => pad.top + h - (v / top) * h;
  const fmt = (v: number) => new Intl.NumberFormat('en', { maximumSignificantDigits: 3 }).format(v);
  const paths = lines.map((l) => {
    let d = '';
    let pen = false;
    for (const v of l.values) {
      if (!Number.isFinite(v.value)) {
        pen = false;
        continue;
      }
      d += `${pen ? 'L' : 'M'}${X(v.year).toFixed(1)} ${Y(v.value).toFixed(1)} `;
      pen = true;
    }
    return { id: l.id, colour: l.colour, dash: l.dash.join(' '), d: d.trim() };
  });
  const xTicks: YearChart['xTicks'] = [];
  for (let y = Math.ceil(y0 / 5) * 5; y <= y1; y += 5) xTicks.push({ x: X(y), label: String(y) });
  const yTicks = [0, 0.25, 0.5, 0.75, 1].map((f) => ({ y: Y(f * top), label: fmt(f * top) }));
  return {
    width: size.width,
    height: size.height,
    paths,
    xTicks,
    yTicks,
    target: target !== null && target <= top ? { y: Y(target), label: `target ${fmt(target)}` } : null
  };
}

/** One option's spread in a stored ensemble: the indicator over the parameter sets that counted. */
export interface EnsembleLine {
  scenarioId: string;
  title: string;
  /** Sets that ran and closed with a value, of the sets done. */
  members: number;
  completed: number;
  p05: number;
  p50: number;
  p95: number;
  /** Share of those sets meeting the target (null without a target). */
  share: Share | null;
}

export interface EnsembleSummary {
  id: string;
  n: number;
  seed: number;
  partial: boolean;
  label: string;
  unit: string;
  direction: 'below' | 'above';
  /** The calibration whose intervals gave the ranges, if any. */
  calibration: string | null;
  lines: EnsembleLine[];
}

/**
 * The spread of one indicator (default growing-season chlorophyll-a of the last five years)
 * in a stored ensemble, for the options of the report it shares: the record must have run
 * on the same model document, and an option is one of its scenarios with the same digest.
 * Null when the record does not fit the report (other model, or fewer than two options in
 * common) or has no such indicator.
 */
export function ensembleSummary(
  record: EnsembleRecord,
  report: { modelDigest: string; options: readonly { scenarioDigest: string }[] },
  target: number | null,
  key = 'chlorophyll.last'
): EnsembleSummary | null {
  if (record.modelDigest !== report.modelDigest) return null;
  const column = record.columns.find((c) => c.key === key);
  if (!column) return null;
  const digests = new Set(report.options.map((o) => o.scenarioDigest));
  const direction = column.better === 'higher' ? 'above' : 'below';
  const lines: EnsembleLine[] = [];
  record.scenarios.forEach((sc, si) => {
    if (!digests.has(sc.digest)) return;
    const values: number[] = [];
    for (const m of record.members) {
      const r = m.runs[si];
      const v = r && r.status === 'ok' && r.closed ? r.values[key] : null;
      if (typeof v === 'number' && Number.isFinite(v)) values.push(v);
    }
    const s = summarize(values);
    lines.push({ scenarioId: sc.id, title: sc.title, members: values.length, completed: record.completed, p05: s.p05, p50: s.p50, p95: s.p95, share: target === null ? null : shareMeeting(values, target, direction) });
  });
  if (lines.length < 2) return null;
  return { id: record.id, n: record.n, seed: record.seed, partial: record.partial, label: column.label, unit: column.unit, direction, calibration: record.ranges?.calibration ?? null, lines };
}
