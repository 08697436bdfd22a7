/**
 * Edits of a scenario draft as plain functions on its JSON (the draft may be invalid: a
 * hand-edited file, a field typed as text). The editor's state applies them to a copy and
 * saves the result; each is tested without a DOM.
 */
import type { CostDoc, MeasureDoc, ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { SCENARIO_FORMAT } from '$lib/engine/document/types';

export type Draft = Record<string, unknown>;
type Obj = Record<string, unknown>;

const isObject = (v: unknown): v is Obj => typeof v === 'object' && v !== null && !Array.isArray(v);

/** The draft's measures list, made a list when it is missing. */
export function measuresOf(doc: Draft): unknown[] {
  if (!Array.isArray(doc.measures)) doc.measures = [];
  return doc.measures as unknown[];
}

export function costsOf(doc: Draft): unknown[] {
  if (!Array.isArray(doc.costs)) doc.costs = [];
  return doc.costs as unknown[];
}

/** The id a measure goes by (its own, or `m1`, `m2`, … by position). */
export function measureIdAt(doc: unknown, index: number): string {
  const list = isObject(doc) && Array.isArray(doc.measures) ? doc.measures : [];
  const m = list[index];
  return isObject(m) && typeof m.id === 'string' ? m.id : `m${index + 1}`;
}

/** Sets `path` (`period.start`, `solver.rtol`) to a value; `undefined` removes the field. */
export function setPath(doc: Draft, path: string, value: unknown): void {
  const keys = path.split('.');
  let at: Obj = doc;
  for (const k of keys.slice(0, -1)) {
    if (!isObject(at[k])) at[k] = {};
    at = at[k] as Obj;
  }
  const last = keys[keys.length - 1];
  if (value === undefined) delete at[last];
  else at[last] = value;
}

/** Sets a field of measure `index` (`fraction`, `repeat.count`); `undefined` removes it. */
export function setMeasureField(doc: Draft, index: number, field: string, value: unknown): void {
  const m = measuresOf(doc)[index];
  if (!isObject(m)) return;
  if (field === 'id') return renameMeasure(doc, index, value);
  setPath(m, field, value);
  if (field.startsWith('repeat.') && isObject(m.repeat) && Object.keys(m.repeat).length === 0) delete m.repeat;
}

/** A new id for a measure; its cost follows it. */
export function renameMeasure(doc: Draft, index: number, id: unknown): void {
  const m = measuresOf(doc)[index];
  if (!isObject(m)) return;
  const old = measureIdAt(doc, index);
  if (id === undefined || id === '') delete m.id;
  else m.id = id;
  const now = measureIdAt(doc, index);
  for (const c of costsOf(doc)) if (isObject(c) && c.measure === old) c.measure = now;
}

/** Repeat on (every year, twice) or off. */
export function setRepeat(doc: Draft, index: number, on: boolean): void {
  const m = measuresOf(doc)[index];
  if (!isObject(m)) return;
  if (on) m.repeat = isObject(m.repeat) ? m.repeat : { everyYears: 1, count: 2 };
  else delete m.repeat;
}

/** Switches the spacing of a repeat between whole years and days, keeping the number. */
export function setRepeatUnit(doc: Draft, index: number, unit: 'years' | 'days'): void {
  const m = measuresOf(doc)[index];
  if (!isObject(m) || !isObject(m.repeat)) return;
  const r = m.repeat;
  const every = r.everyYears ?? r.everyDays ?? 1;
  delete r.everyYears;
  delete r.everyDays;
  if (unit === 'years') r.everyYears = typeof every === 'number' ? Math.max(1, Math.round(every)) : every;
  else r.everyDays = every;
}

export function addMeasure(doc: Draft, measure: MeasureDoc): number {
  const list = measuresOf(doc);
  list.push(structuredClone(measure));
  return list.length - 1;
}

/** What removing a measure took away (its cost rows too), for Undo. */
export interface RemovedMeasure {
  index: number;
  measure: unknown;
  costs: { index: number; cost: unknown }[];
}

export function removeMeasure(doc: Draft, index: number): RemovedMeasure | null {
  const list = measuresOf(doc);
  if (index < 0 || index >= list.length) return null;
  const id = measureIdAt(doc, index);
  const [measure] = list.splice(index, 1);
  const costs: { index: number; cost: unknown }[] = [];
  const all = costsOf(doc);
  for (let i = all.length - 1; i >= 0; i--) {
    const c = all[i];
    if (isObject(c) && c.measure === id) costs.unshift({ index: i, cost: all.splice(i, 1)[0] });
  }
  return { index, measure, costs };
}

export function restoreMeasure(doc: Draft, removed: RemovedMeasure): void {
  measuresOf(doc).splice(removed.index, 0, removed.measure);
  const all = costsOf(doc);
  for (const { index, cost } of removed.costs) all.splice(Math.min(index, all.length), 0, cost);
}

/** The cost row of a measure, if any. */
export function costOf(doc: unknown, measureId: string): Partial<CostDoc> | undefined {
  const list = isObject(doc) && Array.isArray(doc.costs) ? doc.costs : [];
  return list.find((c): c is Partial<CostDoc> => isObject(c) && c.measure === measureId);
}

/**
 * Sets one field of a measure's cost (amount, currency, note). The row is made on the
 * first entry (with `currency` as the catalogue gives it) and removed when amount and note
 * are both empty again; a note without an amount stays, and the engine asks for the amount.
 */
export function setCostField(doc: Draft, measureId: string, field: 'amount' | 'currency' | 'note', value: unknown, currency = 'EUR'): void {
  const list = costsOf(doc);
  let row = list.find((c): c is Obj => isObject(c) && c.measure === measureId);
  if (!row) {
    if (value === undefined || value === '') return;
    row = { measure: measureId, currency };
    list.push(row);
  }
  if (value === undefined || (field === 'note' && value === '')) delete row[field];
  else row[field] = value;
  if (row.amount === undefined && row.note === undefined) list.splice(list.indexOf(row), 1);
}

/** `stem`, else `stem_2`, `stem_3`, … not in `taken`. */
export function freeScenarioId(stem: string, taken: ReadonlySet<string>): string {
  if (!taken.has(stem)) return stem;
  for (let n = 2; ; n++) if (!taken.has(`${stem}_${n}`)) return `${stem}_${n}`;
}

/** A new scenario without measures, over the same period as `like` (else 20 years from the model's origin). */
export function emptyScenario(model: ModelDoc, taken: ReadonlySet<string>, like?: ScenarioDoc): ScenarioDoc {
  const start = like?.period?.start ?? model.timeOrigin ?? '2027-01-01';
  const end = like?.period?.end ?? `${Number(start.slice(0, 4)) + 20}${start.slice(4)}`;
  return {
    format: SCENARIO_FORMAT,
    id: freeScenarioId('scenario', taken),
    title: 'New scenario',
    model: model.id,
    period: { start, end, outputStep: like?.period?.outputStep ?? 1 },
    initialState: 'model',
    solver: { method: 'auto', rtol: 1e-6, atol: 1e-9, maxStep: 5 },
    measures: [],
    costs: []
  };
}
