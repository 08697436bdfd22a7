/**
 * A sweep in words and as table rows: which ranges hold two long-run states, the switch
 * points (critical values) with their numbers, and one row per swept value. Pure functions,
 * tested without a DOM.
 */
import type { SweepDoc } from '$lib/engine/longrun/sweep';
import { formatValue } from '$lib/ui/chart-config';

export interface SweepRow {
  value: number;
  clear: number | null;
  turbid: number | null;
  /** Both starts settled more than the separation apart. */
  twoStates: boolean;
  /** "two states", "one state", "did not settle from the clear start", … */
  verdict: string;
}

/** `5 mg/m^3`, or `× 1.5` for a forcing's scale factor. */
export function withUnit(v: number, unit: string, kind: SweepDoc['kind']): string {
  if (kind === 'forcing') return `× ${formatValue(v)}`;
  return unit && unit !== '1' ? `${formatValue(v)} ${unit}` : formatValue(v);
}

/**
 * The ranges of two states as far as the switch points narrow them: each bistable range of
 * swept values widened to the switch point that lies between it and its neighbouring value
 * (the engine refines exactly those edges), else left at the swept values.
 */
export function refinedRanges(doc: Pick<SweepDoc, 'values' | 'bistable' | 'switchPoints'>): [number, number][] {
  const sorted = [...doc.values].sort((a, b) => a - b);
  return doc.bistable.map(([a, b]) => {
    const lo = Math.min(a, b);
    const hi = Math.max(a, b);
    const below = sorted.filter((v) => v < lo).at(-1);
    const above = sorted.find((v) => v > hi);
    const s1 = below === undefined ? undefined : doc.switchPoints.filter((p) => p > below && p <= lo).at(0);
    const s2 = above === undefined ? undefined : doc.switchPoints.filter((p) => p >= hi && p < above).at(-1);
    return [s1 ?? lo, s2 ?? hi];
  });
}

/** A label without a trailing remark in brackets, first letter lower-cased unless an acronym. */
export function shortLabel(label: string): string {
  const t = label.replace(/\s*\([^()]*\)\s*$/, '').trim() || label;
  return /^[A-Z][A-Z0-9]/.test(t) ? t : t.charAt(0).toLowerCase() + t.slice(1);
}

export function sweepRows(doc: SweepDoc): SweepRow[] {
  return doc.values.map((value, i) => {
    const clear = doc.low[i];
    const turbid = doc.high[i];
    const twoStates = doc.bistable.some(([a, b]) => value >= Math.min(a, b) && value <= Math.max(a, b));
    const unsettled = [clear === null ? 'the clear start' : null, turbid === null ? 'the turbid start' : null].filter(Boolean);
    const verdict = unsettled.length
      ? `did not settle from ${unsettled.join(' or ')}`
      : twoStates
        ? 'two states'
        : 'one state';
    return { value, clear, turbid, twoStates, verdict };
  });
}

/**
 * Sentences for the result: where two states exist and the switch points, with numbers.
 * `label` names the swept quantity (`inflow total P (Pin)`), `unit` its unit.
 */
export function sweepSummary(doc: SweepDoc, label: string, unit: string): string[] {
  const w = (v: number) => withUnit(v, unit, doc.kind);
  const lo = Math.min(...doc.values);
  const hi = Math.max(...doc.values);
  const out: string[] = [];
  const what = doc.kind === 'forcing' ? `${label} scaled` : label;
  if (doc.bistable.length === 0) {
    out.push(`Over the whole swept range (${what} from ${w(lo)} to ${w(hi)}) both starts end in one and the same long-run state: no range with two states was found at these steps.`);
  } else {
    for (const [a, b] of doc.bistable) {
      const from = Math.min(a, b);
      const to = Math.max(a, b);
      out.push(
        from === to
          ? `At ${what} = ${w(from)} the clear and the turbid start end in different long-run states.`
          : `From ${w(from)} to ${w(to)} of ${what} the clear and the turbid start end in different long-run states: two states are possible, and which one the lake is in depends on where it comes from.`
      );
      if (from === lo || to === hi) out.push(`That range reaches the end of the swept range, so it may go on beyond it; sweep further to find its switch point there.`);
    }
  }
  const refined = refinedRanges(doc);
  refined.forEach(([a, b], i) => {
    const [ga, gb] = doc.bistable[i];
    if (a !== Math.min(ga, gb) || b !== Math.max(ga, gb)) out.push(`Narrowed between the steps, the range of two states runs from about ${w(a)} to ${w(b)}.`);
  });
  if (doc.switchPoints.length) {
    out.push(
      `Switch points (critical values, refined by bisection): ${doc.switchPoints.map((v, i) => `S${i + 1} at ${w(v)}`).join(', ')}. Crossing one, the lake can jump from one state to the other.`
    );
  }
  if (doc.notSettled.length) {
    out.push(`${doc.notSettled.length} long run${doc.notSettled.length === 1 ? '' : 's'} did not settle (shown as gaps): ${doc.notSettled.map((n) => `${w(n.value)} from the ${n.start === 'low' ? 'clear' : 'turbid'} start`).join('; ')}.`);
  }
  return out;
}

/** The end state of a run: each state's last value (non-finite values left out). */
export function endStateOf(series: Record<string, number[]>, stateIds: readonly string[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const id of stateIds) {
    const v = series[id];
    const last = v?.[v.length - 1];
    if (typeof last === 'number' && Number.isFinite(last)) out[id] = last;
  }
  return out;
}

/** "3 of 8 long runs" with the share, for the progress line. */
export function progressWords(done: number, total: number): string {
  return `${done} of ${total} long runs done (${total ? Math.round((100 * done) / total) : 0} %)`;
}
