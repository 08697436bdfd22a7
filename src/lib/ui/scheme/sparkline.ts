/**
 * The small line of a compartment's value over a run, drawn in its tile's band. The series
 * is cut into at most `maxPoints` equal runs of outputs, each drawn at its mean (the page
 * takes one per year, so a trend shows and the seasons do not turn into noise), and the box
 * spans the series' own smallest to largest output (a flat series is a line through the
 * middle). Non-finite values break the line.
 */
import type { Box } from './layout-scheme';

export interface SeriesSummary {
  first: number;
  last: number;
  min: number;
  max: number;
}

/** First, last, smallest and largest finite value, or null without any. */
export function summarise(values: ArrayLike<number>): SeriesSummary | null {
  let first = Number.NaN;
  let last = Number.NaN;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    if (Number.isNaN(first)) first = v;
    last = v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return Number.isNaN(first) ? null : { first, last, min, max };
}

const round = (v: number) => Math.round(v * 100) / 100;

/** SVG path data of `values` in `box`; empty when nothing can be drawn. */
export function sparkPath(values: ArrayLike<number>, box: Box, maxPoints = 64): string {
  const s = summarise(values);
  if (!s || values.length < 2 || box.width <= 0) return '';
  const n = Math.min(maxPoints, values.length);
  const means: number[] = [];
  for (let k = 0; k < n; k++) {
    const from = Math.floor((k * values.length) / n);
    const to = Math.floor(((k + 1) * values.length) / n);
    let sum = 0;
    let count = 0;
    for (let i = from; i < to; i++) {
      if (Number.isFinite(values[i])) {
        sum += values[i];
        count += 1;
      }
    }
    means.push(count > 0 ? sum / count : Number.NaN);
  }
  const span = s.max - s.min;
  const y = (v: number) => (span > 0 ? box.y + box.height - ((v - s.min) / span) * box.height : box.y + box.height / 2);
  const x = (k: number) => box.x + (n === 1 ? 0 : (k / (n - 1)) * box.width);
  let d = '';
  let pen = false;
  means.forEach((v, k) => {
    if (!Number.isFinite(v)) {
      pen = false;
      return;
    }
    d += `${d ? ' ' : ''}${pen ? 'L' : 'M'}${round(x(k))},${round(y(v))}`;
    pen = true;
  });
  return d;
}
