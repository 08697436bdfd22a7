/**
 * The scenario's calendar turned into solver terms: run days (since the period's start),
 * the modulators that scale/offset/set parameters and forcings, the dated events
 * (remove, add, transfer), and the breakpoints where integration restarts (measure
 * dates, ramp ends, 1 January of each year, the period's end).
 */
import type { MeasureDoc, ScenarioDoc } from '../document/types';
import { dayNumber } from '../document/validate-scenario';
import type { Modulator } from '../compile/compile-model';
import type { AnalyzedModel } from '../document/validate-model';

export interface DatedEvent {
  measureId: string;
  kind: 'remove' | 'add' | 'transfer';
  /** Run day. */
  day: number;
  state: number;
  into?: number;
  fraction: number;
  amount: number;
}

export interface Schedule {
  /** Day number (days since 1970-01-01) of the period's start. */
  startDay: number;
  /** Run day of the period's end. */
  endDay: number;
  /** Model time of run day 0 (days since the model's time origin). */
  offset: number;
  /** Output grid, run days. */
  grid: Float64Array;
  /** Sorted, unique run days in (0, endDay] where a segment ends. */
  breakpoints: number[];
  /** Run days in (0, endDay] that are 1 January (a budget year ends there). */
  yearEnds: Set<number>;
  events: DatedEvent[];
  /** Ids of the parameters/forcings the measures change (compile's `dynamic`). */
  dynamic: string[];
  /** One modulator per `dynamic` slot, in model time. */
  modulators: Modulator[];
  /**
   * Tells the modulators which segment is being integrated: a step change belongs to
   * the segment it starts, so a segment ending on a measure date never sees the new
   * value, not even in its last stage evaluation.
   */
  setSegment(t0: number, t1: number): void;
  /** Measures ids in document order (with default ids m1, m2, ...). */
  measureIds: string[];
  warnings: { code: string; message: string; id?: string }[];
}

export function isoOfDay(day: number): string {
  return new Date(day * 86400000).toISOString().slice(0, 10);
}

function addYears(iso: string, years: number): string {
  const [y, m, d] = iso.split('-').map(Number);
  const date = new Date(Date.UTC(y + years, m - 1, d));
  // 29 February in a common year falls back to 28 February.
  if (date.getUTCMonth() !== m - 1) date.setUTCDate(0);
  return date.toISOString().slice(0, 10);
}

interface Piece {
  kind: 'scale' | 'offset' | 'set';
  from: number;
  until: number;
  ramp: number;
  /** factor (scale), SI amount (offset) or SI value (set). */
  x: number;
}

export function buildSchedule(model: AnalyzedModel, scenario: ScenarioDoc): Schedule {
  const startDay = dayNumber(scenario.period.start);
  const endDay = dayNumber(scenario.period.end) - startDay;
  const origin = model.doc.timeOrigin ? dayNumber(model.doc.timeOrigin) : startDay;
  const offset = startDay - origin;
  const step = scenario.period.outputStep ?? 1;
  const n = Math.floor(endDay / step + 1e-9) + 1;
  const onGrid = Math.abs((n - 1) * step - endDay) < 1e-9;
  const grid = new Float64Array(onGrid ? n : n + 1);
  for (let i = 0; i < n; i++) grid[i] = i * step;
  if (!onGrid) grid[n] = endDay;
  else grid[n - 1] = endDay;

  const warnings: Schedule['warnings'] = [];
  const bps = new Set<number>([endDay]);
  const yearEnds = new Set<number>();
  const startYear = Number(scenario.period.start.slice(0, 4));
  for (let y = startYear + 1; ; y++) {
    const d = dayNumber(`${y}-01-01`) - startDay;
    if (d >= endDay) break;
    if (d > 0) {
      bps.add(d);
      yearEnds.add(d);
    }
  }
  yearEnds.add(endDay);

  const stateIdx = new Map(model.states.map((s) => [s.id, s.index]));
  const unitSi = new Map<string, number>();
  for (const p of model.parameters) unitSi.set(p.id, p.unit.si);
  for (const f of model.forcings) unitSi.set(f.id, f.unit.si);

  const pieces = new Map<string, Piece[]>();
  const events: DatedEvent[] = [];
  const measureIds: string[] = [];
  const measures: MeasureDoc[] = scenario.measures ?? [];
  measures.forEach((m, i) => {
    const id = m.id ?? `m${i + 1}`;
    measureIds.push(id);
    const inPeriod = (d: number) => d > 0 && d < endDay;
    switch (m.kind) {
      case 'scale':
      case 'offset':
      case 'set': {
        const from = dayNumber(m.from) - startDay;
        const until = m.until ? dayNumber(m.until) - startDay : Infinity;
        const ramp = m.kind === 'set' ? 0 : (m.rampDays ?? 0);
        if (from >= endDay) warnings.push({ code: 'measure_outside_period', id, message: `measure \`${id}\` starts ${m.from}, after the period ends; it has no effect` });
        for (const d of [from, from + ramp, until]) if (inPeriod(d)) bps.add(d);
        const si = unitSi.get(m.target) ?? 1;
        const x = m.kind === 'scale' ? m.factor : m.kind === 'offset' ? m.amount * si : m.value * si;
        const list = pieces.get(m.target) ?? [];
        list.push({ kind: m.kind, from, until, ramp, x });
        pieces.set(m.target, list);
        break;
      }
      case 'remove':
      case 'add':
      case 'transfer': {
        const count = m.repeat?.count ?? 1;
        for (let k = 0; k < count; k++) {
          let iso = m.on;
          let day: number;
          if (m.repeat?.everyYears) {
            iso = addYears(m.on, k * m.repeat.everyYears);
            day = dayNumber(iso) - startDay;
          } else {
            day = dayNumber(m.on) - startDay + k * (m.repeat?.everyDays ?? 0);
          }
          if (day < 0 || day > endDay) {
            warnings.push({ code: 'measure_outside_period', id, message: `measure \`${id}\` on ${isoOfDay(day + startDay)} falls outside the period and is not applied` });
            continue;
          }
          if (day > 0) bps.add(day);
          events.push({
            measureId: id,
            kind: m.kind,
            day,
            state: stateIdx.get(m.state)!,
            into: m.kind === 'transfer' ? stateIdx.get(m.into) : undefined,
            fraction: m.kind === 'add' ? 0 : m.fraction,
            amount: m.kind === 'add' ? m.amount : 0
          });
        }
        break;
      }
    }
  });
  events.sort((a, b) => a.day - b.day);

  const dynamic = [...pieces.keys()];
  const segment = { mid: 0 };
  const modulators = dynamic.map((id) => modulatorOf(pieces.get(id)!, offset, segment));
  return {
    startDay,
    endDay,
    offset,
    grid,
    breakpoints: [...bps].filter((d) => d > 0 && d <= endDay).sort((a, b) => a - b),
    yearEnds,
    events,
    dynamic,
    modulators,
    setSegment(t0: number, t1: number) {
      segment.mid = 0.5 * (t0 + t1);
    },
    measureIds,
    warnings
  };
}

/**
 * value(t) = base * S(t) + O(t), composing the measures on one target in document order:
 * scale s maps (S, O) to (S s, O s); offset o to (S, O + o); set v to (0, v).
 * A ramp moves linearly from no effect at `from` to the full effect at `from + ramp`.
 */
function modulatorOf(list: Piece[], offset: number, segment: { mid: number }): Modulator {
  const at = (tModel: number): [number, number] => {
    const day = tModel - offset;
    const mid = segment.mid;
    let S = 1;
    let O = 0;
    for (const p of list) {
      if (mid < p.from || mid >= p.until) continue;
      const w = p.ramp > 0 && mid < p.from + p.ramp ? Math.min(1, Math.max(0, (day - p.from) / p.ramp)) : 1;
      if (p.kind === 'scale') {
        const s = 1 + w * (p.x - 1);
        S *= s;
        O *= s;
      } else if (p.kind === 'offset') O += w * p.x;
      else {
        S = 0;
        O = p.x;
      }
    }
    return [S, O];
  };
  return { scale: (t) => at(t)[0], offset: (t) => at(t)[1] };
}
