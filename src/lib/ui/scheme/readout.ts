/**
 * The readout strip: one card per reported quantity (id, label, unit, and after a run the
 * mean of its last year), stacked in a column of the width given. Pure layout, so the strip
 * on screen and in an export are the same drawing.
 */
import type { RunDoc } from '$lib/engine/document/types';
import type { ReportedQuantity } from './scheme-graph';
import { ellipsize, textWidth, wrapText } from './text-metrics';
import { formatMass } from './scheme-words';

export const READOUT_METRICS = Object.freeze({
  /** Width beside the scheme on wide screens (px). */
  width: 244,
  headFont: 13,
  headHeight: 26,
  pad: 8,
  gap: 6,
  idFont: 13,
  idLine: 17,
  labelFont: 11.5,
  labelLine: 14,
  unitFont: 11,
  unitLine: 15,
  valueFont: 12,
  valueLine: 17
});

const R = READOUT_METRICS;

export interface ReadoutCard {
  id: string;
  x: number;
  y: number;
  width: number;
  height: number;
  title: string;
  label: string[];
  unit: string;
  /** `mean of the last year: 63.8 ug/L`, after a run. */
  value?: string;
}

export interface ReadoutLayout {
  width: number;
  height: number;
  heading: string;
  cards: ReadoutCard[];
}

/** The mean of each series over the run's last 365 days (NaN values skipped). */
export function lastYearMeans(run: Pick<RunDoc, 'times' | 'series'>, ids: readonly string[]): Record<string, number> {
  const out: Record<string, number> = Object.create(null);
  const times = run.times;
  if (times.length === 0) return out;
  const from = times[times.length - 1] - 365;
  for (const id of ids) {
    const s = Object.hasOwn(run.series, id) ? run.series[id] : undefined;
    if (!s) continue;
    let sum = 0;
    let n = 0;
    for (let i = times.length - 1; i >= 0 && times[i] >= from; i--) {
      if (Number.isFinite(s[i])) {
        sum += s[i];
        n += 1;
      }
    }
    if (n > 0) out[id] = sum / n;
  }
  return out;
}

/** Cards for `reported` in a column `width` px wide; `values` after a run. */
export function readoutLayout(
  reported: readonly ReportedQuantity[],
  width: number = R.width,
  values: Record<string, number> | null = null
): ReadoutLayout {
  const inner = width - 2 * R.pad;
  let y: number = R.headHeight;
  const cards: ReadoutCard[] = reported.map((q) => {
    const title = textWidth(q.id, R.idFont, true) <= inner ? q.id : ellipsize(q.id, R.idFont, inner, true);
    const label = q.label ? wrapText(q.label, R.labelFont, inner, 2) : [];
    const unit = q.unit ? `in ${q.unit}` : 'no unit';
    const v = values?.[q.id];
    const value = v !== undefined ? `last year's mean: ${formatMass(v)}${q.unit ? ` ${q.unit}` : ''}` : undefined;
    const height = R.pad + R.idLine + label.length * R.labelLine + R.unitLine + (value ? R.valueLine : 0) + R.pad - 2;
    const card = { id: q.id, x: 0, y, width, height, title, label, unit, value };
    y += height + R.gap;
    return card;
  });
  const heading = reported.length ? 'Reported quantities' : 'Reported quantities: none';
  return { width, height: Math.max(R.headHeight, y - R.gap + 2), heading, cards };
}
