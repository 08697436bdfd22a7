/**
 * A new measure from a catalogue item and a target: the item's defaults, its first date
 * placed in the scenario's period, and an id unique in the scenario (the item's id, then
 * `…2`, `…3`). Defaults given relative to the model (`relativeAmount`, `relativeValue`) are
 * turned into numbers in the target's unit here.
 */
import type { MeasureDoc, ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { RESERVED } from '$lib/engine/document/ids';
import type { CatalogueItem } from './catalogue';

/** The ids a scenario's measures already use, implicit ones (`m1`, `m2`, …) included. */
export function usedMeasureIds(scenario: Pick<ScenarioDoc, 'measures'> | null | undefined): Set<string> {
  const out = new Set<string>();
  const list = Array.isArray(scenario?.measures) ? scenario!.measures : [];
  list.forEach((m, i) => out.add(typeof m?.id === 'string' ? m.id : `m${i + 1}`));
  return out;
}

/** `stem`, else `stem2`, `stem3`, … whichever is free (and not a reserved word). */
export function freshMeasureId(stem: string, used: ReadonlySet<string>): string {
  const base = /^[A-Za-z_][A-Za-z0-9_]*$/.test(stem) ? stem : 'measure';
  if (!used.has(base) && !RESERVED.has(base)) return base;
  for (let n = 2; ; n++) if (!used.has(`${base}${n}`)) return `${base}${n}`;
}

const pad = (n: number) => String(n).padStart(2, '0');

/**
 * The item's first date for this scenario: `afterYears` after the start year on
 * `monthDay`; a date outside the period falls back to the period's start.
 */
export function defaultDate(item: CatalogueItem, scenario: Pick<ScenarioDoc, 'period'>): string {
  const start = scenario.period?.start;
  const end = scenario.period?.end;
  const y0 = typeof start === 'string' && /^\d{4}-/.test(start) ? Number(start.slice(0, 4)) : 2027;
  const d = item.defaults.date ?? { afterYears: 1, monthDay: '01-01' };
  const iso = `${y0 + d.afterYears}-${d.monthDay}`;
  if (typeof start === 'string' && iso < start) return start;
  if (typeof end === 'string' && iso > end) return typeof start === 'string' ? start : iso;
  return iso;
}

export interface MeasureChoice {
  /** The parameter, forcing or state it acts on. */
  target: string;
  /** transfer: the state mass goes into. */
  into?: string;
}

export function newMeasure(item: CatalogueItem, choice: MeasureChoice, scenario: ScenarioDoc, model: ModelDoc): MeasureDoc {
  const id = freshMeasureId(item.id, usedMeasureIds(scenario));
  const date = defaultDate(item, scenario);
  const dflt = item.defaults;
  const repeat = dflt.repeat ? { ...dflt.repeat } : undefined;
  const round = (x: number) => Number(x.toPrecision(6));
  switch (item.kind) {
    case 'scale':
      return { id, kind: 'scale', target: choice.target, factor: dflt.factor ?? 1, from: date, ...(dflt.rampDays ? { rampDays: dflt.rampDays } : {}) };
    case 'offset':
      return { id, kind: 'offset', target: choice.target, amount: dflt.amount ?? 0, from: date, ...(dflt.rampDays ? { rampDays: dflt.rampDays } : {}) };
    case 'set': {
      const base = model.parameters.find((p) => p.id === choice.target)?.value ?? 0;
      return { id, kind: 'set', target: choice.target, value: dflt.value ?? round(base * (dflt.relativeValue ?? 1)), from: date };
    }
    case 'remove':
      return { id, kind: 'remove', state: choice.target, fraction: dflt.fraction ?? 0.5, on: date, ...(repeat ? { repeat } : {}) };
    case 'add': {
      const initial = model.states.find((s) => s.id === choice.target)?.initial ?? 0;
      return { id, kind: 'add', state: choice.target, amount: dflt.amount ?? round(initial * (dflt.relativeAmount ?? 1)), on: date, ...(repeat ? { repeat } : {}) };
    }
    case 'transfer':
      return { id, kind: 'transfer', state: choice.target, into: choice.into ?? '', fraction: dflt.fraction ?? 0.5, on: date, ...(repeat ? { repeat } : {}) };
  }
}
