/**
 * Measures in the words a lake manager reads: "cut total P concentration of the inflow
 * (Pin) to 50 % from 2029, phased in over 2 years"; "remove 80 % of benthivorous fish P
 * (BFI) each February 2028–2030". Names come from the model's labels, dates are written
 * out (UTC), shares as per cent. The sentence is the catalogue item's template when the
 * measure matches one, else the kind's own (KIND_SENTENCES).
 */
import type { MeasureDoc, ModelDoc, RepeatDoc } from '$lib/engine/document/types';
import { CATALOGUE, type Catalogue, type MeasureKind } from './catalogue';
import { matchMeasure } from './match';
import { shortLabel } from './targets';

/** The sentence of a measure no trade item matches, by kind. */
export const KIND_SENTENCES: Readonly<Record<MeasureKind, string>> = {
  scale: '{change} {target} to {factor} {when}',
  offset: '{change} {target} by {amount} {when}',
  set: 'set {target} to {value} {when}',
  remove: 'remove {fraction} of {state} {when}',
  add: 'add {amount} to {state} {when}',
  transfer: 'move {fraction} of {state} into {into} {when}'
};

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
const DAY_MS = 86_400_000;

function parts(iso: string): { y: number; m: number; d: number } | null {
  if (typeof iso !== 'string' || !/^\d{4}-\d\d-\d\d$/.test(iso)) return null;
  const t = new Date(iso + 'T00:00:00Z');
  if (Number.isNaN(t.getTime())) return null;
  return { y: t.getUTCFullYear(), m: t.getUTCMonth(), d: t.getUTCDate() };
}

/** `2030-05-01` → `1 May 2030`; anything else is shown as it is. */
export function dateWords(iso: string): string {
  const p = parts(iso);
  return p ? `${p.d} ${MONTHS[p.m]} ${p.y}` : String(iso);
}

/** A number as people write it: up to 4 significant digits, no exponent for ordinary sizes. */
export function numberWords(x: number): string {
  if (typeof x !== 'number' || !Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-4 && a < 1e7) {
    const s = Number(x.toPrecision(4));
    return a >= 1000 ? s.toLocaleString('en-GB', { maximumFractionDigits: 3 }) : String(s);
  }
  return x.toExponential(2).replace(/\.?0+e/, 'e');
}

/** 0.5 → `50 %`. */
export function percentWords(share: number): string {
  return typeof share === 'number' && Number.isFinite(share) ? `${numberWords(Number((share * 100).toPrecision(6)))} %` : String(share);
}

/** Days as years when they are (near) whole or half years, else days: 730 → `2 years`, 90 → `90 days`. */
export function durationWords(days: number): string {
  if (typeof days !== 'number' || !Number.isFinite(days)) return `${String(days)} days`;
  const years = days / 365.25;
  const half = Math.round(years * 2) / 2;
  if (days >= 365 && Math.abs(days - half * 365.25) <= Math.max(1, half * 0.25 + 0.5)) {
    return half === 1 ? '1 year' : `${numberWords(half)} years`;
  }
  return days === 1 ? '1 day' : `${numberWords(days)} days`;
}

const isNewYear = (iso: string) => {
  const p = parts(iso);
  return !!p && p.m === 0 && p.d === 1;
};

/** `from 2029` on 1 January, else `from 1 May 2030`. */
export function fromWords(iso: string): string {
  return isNewYear(iso) ? `from ${parts(iso)!.y}` : `from ${dateWords(iso)}`;
}

/** The end of a measure in force until a date: `to the end of 2034` for 1 January 2035. */
export function untilWords(iso: string): string {
  return isNewYear(iso) ? `to the end of ${parts(iso)!.y - 1}` : `until ${dateWords(iso)}`;
}

/** When a dated measure (remove, add, transfer) acts, with its repetitions. */
export function datesWords(on: string, repeat?: RepeatDoc): string {
  const p = parts(on);
  if (!repeat || !(repeat.count > 1) || !p) return `on ${dateWords(on)}`;
  const n = repeat.count;
  if (repeat.everyYears !== undefined) {
    const step = repeat.everyYears;
    const last = p.y + step * (n - 1);
    const dayPart = p.d === 1 ? MONTHS[p.m] : `${p.d} ${MONTHS[p.m]}`;
    if (step === 1) return `each ${dayPart} ${p.y}–${last}`;
    return `every ${step} years ${p.d === 1 ? 'in' : 'on'} ${dayPart} ${p.y}–${last} (${n} times)`;
  }
  const every = repeat.everyDays ?? 0;
  const lastIso = new Date(Date.parse(on + 'T00:00:00Z') + Math.floor(every * (n - 1)) * DAY_MS).toISOString().slice(0, 10);
  return `${n} times every ${durationWords(every)} from ${dateWords(on)} to ${dateWords(lastIso)}`;
}

/** When a change of a parameter or forcing (scale, offset, set) is in force. */
export function periodWords(from: string, until?: string, rampDays?: number): string {
  const out = [fromWords(from)];
  if (until !== undefined) out.push(untilWords(until));
  let s = out.join(' ');
  if (rampDays !== undefined && rampDays > 0) s += `, phased in over ${durationWords(rampDays)}`;
  return s;
}

/** A symbol as a sentence names it: `total P concentration of the inflow (Pin)`. */
export function symbolWords(model: ModelDoc, id: unknown): string {
  if (typeof id !== 'string' || id === '') return '(nothing chosen)';
  const sym = [...(model.states ?? []), ...(model.parameters ?? []), ...(model.forcings ?? [])].find((s) => s.id === id);
  if (!sym) return `${id} (not in the model)`;
  const name = shortLabel(sym.label);
  if (!name || name === id) return id;
  // Lower-case a leading capital only when it starts an ordinary word ("Total", not "DIP").
  const lowered = /^[A-Z][a-z]/.test(name) ? name[0].toLowerCase() + name.slice(1) : name;
  return `${lowered} (${id})`;
}

function unitOf(model: ModelDoc, id: unknown): string {
  const sym = [...(model.states ?? []), ...(model.parameters ?? []), ...(model.forcings ?? [])].find((s) => s.id === id);
  return sym && sym.unit !== '1' ? sym.unit : '';
}

const withUnit = (x: number, unit: string) => (unit ? `${numberWords(x)} ${unit}` : numberWords(x));

/** The values a sentence's placeholders stand for. */
export function sentenceFields(m: MeasureDoc, model: ModelDoc): Record<string, string> {
  switch (m.kind) {
    case 'scale':
      return {
        change: m.factor < 1 ? 'cut' : m.factor > 1 ? 'raise' : 'keep',
        target: symbolWords(model, m.target),
        factor: percentWords(m.factor),
        when: periodWords(m.from, m.until, m.rampDays)
      };
    case 'offset':
      return {
        change: m.amount < 0 ? 'lower' : 'raise',
        target: symbolWords(model, m.target),
        amount: withUnit(Math.abs(m.amount), unitOf(model, m.target)),
        when: periodWords(m.from, m.until, m.rampDays)
      };
    case 'set':
      return { target: symbolWords(model, m.target), value: withUnit(m.value, unitOf(model, m.target)), when: periodWords(m.from, m.until) };
    case 'remove':
      return { state: symbolWords(model, m.state), fraction: percentWords(m.fraction), when: datesWords(m.on, m.repeat) };
    case 'add':
      return { state: symbolWords(model, m.state), amount: withUnit(m.amount, unitOf(model, m.state)), when: datesWords(m.on, m.repeat) };
    case 'transfer':
      return { state: symbolWords(model, m.state), into: symbolWords(model, m.into), fraction: percentWords(m.fraction), when: datesWords(m.on, m.repeat) };
  }
}

/** Fills `{name}` placeholders; an unknown one is left as it is. */
export function fillSentence(template: string, fields: Record<string, string>): string {
  return template.replace(/\{([^}]*)\}/g, (whole, k: string) => fields[k] ?? whole).replace(/\s+/g, ' ').trim();
}

/** The manager's sentence for a measure (lower-case start, as part of a list). */
export function measureWords(m: MeasureDoc, model: ModelDoc, catalogue: Catalogue = CATALOGUE): string {
  if (!m || typeof m !== 'object' || !(m.kind in KIND_SENTENCES)) return 'a measure of an unknown kind';
  const item = matchMeasure(m, model, catalogue);
  const template = item === 'other' ? KIND_SENTENCES[m.kind] : item.sentence;
  return fillSentence(template, sentenceFields(m, model));
}

export function capitalise(s: string): string {
  return s ? s[0].toUpperCase() + s.slice(1) : s;
}
