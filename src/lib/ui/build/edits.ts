/**
 * Edits of a model draft, as pure functions that mutate the clone `ModelSession.update`
 * hands them. The draft is plain JSON and may be invalid: fields keep what was typed, an
 * emptied optional field is removed, and nothing here refuses an edit; the engine's
 * validation says what is wrong, at the field.
 */
import { SECTIONS, type Section } from './field-paths';
import { parseNumberText } from './number-text';

export type Doc = Record<string, unknown>;
export type Item = Record<string, unknown>;

export function isObject(v: unknown): v is Item {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** The section's list, or null when the draft holds something other than a list there. */
export function listOf(doc: Doc, section: Section): Item[] | null {
  const v = doc[section];
  if (v === undefined) return [];
  return Array.isArray(v) ? (v as Item[]) : null;
}

/**
 * Each row of a section as JSON text. Rows are drawn from these strings, so that a row
 * whose text did not change is not drawn again when another one is edited (the draft is
 * a fresh copy after every edit).
 */
export function rowTexts(list: readonly unknown[]): string[] {
  return list.map((x) => JSON.stringify(x) ?? 'null');
}

/** A row back from its text (`rowTexts`). */
export function rowOf(text: string): unknown {
  return JSON.parse(text);
}

/** The item at `index`, or undefined when there is no object there. */
export function itemOf(doc: Doc, section: Section, index: number): Item | undefined {
  const v = listOf(doc, section)?.[index];
  return isObject(v) ? v : undefined;
}

/** Sets a text field; an optional field emptied is removed. Text is kept as typed. */
export function setText(target: Item, key: string, text: string, optional = false): void {
  if (optional && text.trim() === '') delete target[key];
  else target[key] = text;
}

/** Sets a number field from typed text: a number when it reads as one, else the text. */
export function setNumber(target: Item, key: string, text: string): void {
  const entry = parseNumberText(text);
  if (entry.kind === 'empty') delete target[key];
  else target[key] = entry.value;
}

export type RangeKey = 'range' | 'initialRange';
export type RangePart = 'min' | 'max' | 'distribution';

/**
 * Sets one part of an uncertainty range. The range is created by its first part and
 * removed when min and max are both emptied (a lone distribution means nothing).
 */
export function setRangePart(target: Item, key: RangeKey, part: RangePart, text: string): void {
  const range: Item = isObject(target[key]) ? (target[key] as Item) : {};
  if (part === 'distribution') {
    if (text === '' || text === 'uniform') delete range.distribution;
    else range.distribution = text;
  } else setNumber(range, part, text);
  if (range.min === undefined && range.max === undefined) delete target[key];
  else target[key] = range;
}

/** Every id used in the draft, across all symbols. */
export function usedIds(doc: Doc): Set<string> {
  const ids = new Set<string>();
  for (const s of SECTIONS) {
    for (const item of listOf(doc, s) ?? []) if (isObject(item) && typeof item.id === 'string') ids.add(item.id);
  }
  return ids;
}

const NEW_ID_BASE: Readonly<Record<Section, string>> = {
  parameters: 'param',
  forcings: 'forcing',
  states: 'state',
  derived: 'derived',
  flows: 'flow'
};

/** `param1`, `param2`, …: the first not yet used by any symbol. */
export function newId(doc: Doc, section: Section): string {
  const used = usedIds(doc);
  for (let n = 1; ; n++) {
    const id = `${NEW_ID_BASE[section]}${n}`;
    if (!used.has(id)) return id;
  }
}

/** A new row for the section: valid where a default makes sense, empty where the modeller must write. */
export function newItem(doc: Doc, section: Section): Item {
  const id = newId(doc, section);
  const states = (listOf(doc, 'states') ?? []).filter(isObject);
  const last = states[states.length - 1];
  switch (section) {
    case 'parameters':
      return { id, value: 1, unit: '1' };
    case 'forcings':
      return { id, unit: '1', expression: '' };
    case 'states': {
      // A new compartment most often sits beside the last one: same unit, size and zone.
      const item: Item = { id, unit: typeof last?.unit === 'string' ? last.unit : '1', initial: 0, size: typeof last?.size === 'string' ? last.size : '' };
      if (typeof last?.zone === 'string') item.zone = last.zone;
      return item;
    }
    case 'derived':
      return { id, expression: '', unit: '1' };
    case 'flows': {
      const item: Item = { id, rate: '' };
      const first = states.find((s) => typeof s.id === 'string');
      if (first) item.from = first.id;
      return item;
    }
  }
}

/** Appends a new row and returns its index, or -1 when the section is not a list. */
export function addItem(doc: Doc, section: Section): number {
  const list = listOf(doc, section);
  if (list === null) return -1;
  list.push(newItem(doc, section));
  doc[section] = list;
  return list.length - 1;
}

/** Removes the row at `index` and returns it (for undo), or undefined when there is none. */
export function removeItem(doc: Doc, section: Section, index: number): unknown {
  const list = listOf(doc, section);
  if (!list || index < 0 || index >= list.length) return undefined;
  const [removed] = list.splice(index, 1);
  return removed;
}

/** Puts a removed row back at its place (or at the end when the list got shorter). */
export function insertItem(doc: Doc, section: Section, index: number, item: unknown): number {
  const list = listOf(doc, section);
  if (list === null) return -1;
  const at = Math.max(0, Math.min(index, list.length));
  list.splice(at, 0, item as Item);
  doc[section] = list;
  return at;
}

/** `from`/`to` of a flow: a state's id, or '' for outside the lake (the key is removed). */
export function setFlowEnd(flow: Item, end: 'from' | 'to', value: string): void {
  if (value === '') delete flow[end];
  else flow[end] = value;
}

/** A flag whose default is `whenAbsent`: setting it to the default removes the key. */
export function setFlag(target: Item, key: string, on: boolean, whenAbsent: boolean): void {
  if (on === whenAbsent) delete target[key];
  else target[key] = on;
}

// ---- forcings

export type ForcingKind = 'expression' | 'table';

export function forcingKind(f: Item): ForcingKind {
  return f.table !== undefined && f.expression === undefined ? 'table' : 'expression';
}

/** The fields a switch of kind takes away, to put them back on undo. */
export type ForcingParts = Partial<Record<'expression' | 'table' | 'interpolation' | 'period', unknown>>;

const KIND_FIELDS: Readonly<Record<ForcingKind, readonly (keyof ForcingParts)[]>> = {
  expression: ['expression'],
  table: ['table', 'interpolation', 'period']
};

/**
 * Makes the forcing a table or an expression. Returns the fields of the other kind that
 * were removed (so an undo can restore them). A new table starts with one row at day 0.
 */
export function setForcingKind(f: Item, kind: ForcingKind): ForcingParts {
  const removed: ForcingParts = {};
  const other: ForcingKind = kind === 'table' ? 'expression' : 'table';
  for (const k of KIND_FIELDS[other]) {
    if (f[k] !== undefined) {
      removed[k] = f[k];
      delete f[k];
    }
  }
  if (kind === 'table' && f.table === undefined) f.table = { t: [0], v: [0] };
  if (kind === 'expression' && f.expression === undefined) f.expression = '';
  return removed;
}

/** Puts back what `setForcingKind` removed, removing what it added. */
export function restoreForcingParts(f: Item, parts: ForcingParts): void {
  const kind: ForcingKind = parts.expression !== undefined ? 'expression' : 'table';
  for (const k of KIND_FIELDS[kind === 'table' ? 'expression' : 'table']) delete f[k];
  for (const [k, v] of Object.entries(parts)) f[k] = v;
}

export interface TableColumns {
  t: unknown[];
  v: unknown[];
}

/** The forcing's table as two lists (a broken table reads as an empty one). */
export function tableOf(f: Item): TableColumns {
  const tab = isObject(f.table) ? f.table : {};
  return { t: Array.isArray(tab.t) ? [...tab.t] : [], v: Array.isArray(tab.v) ? [...tab.v] : [] };
}

function writeTable(f: Item, cols: TableColumns): void {
  const tab = isObject(f.table) ? f.table : {};
  f.table = { ...tab, t: cols.t, v: cols.v };
}

/** Sets one cell from typed text (a number, or the text so the engine names the cell). */
export function setTableCell(f: Item, column: 't' | 'v', row: number, text: string): void {
  const cols = tableOf(f);
  const entry = parseNumberText(text);
  cols[column][row] = entry.kind === 'number' ? entry.value : entry.kind === 'text' ? entry.value : '';
  writeTable(f, cols);
}

/** Adds a row after the last: one day later (or day 0), with the last value. */
export function addTableRow(f: Item): number {
  const cols = tableOf(f);
  const lastT = cols.t[cols.t.length - 1];
  const lastV = cols.v[cols.v.length - 1];
  cols.t.push(typeof lastT === 'number' ? lastT + 1 : cols.t.length === 0 ? 0 : '');
  cols.v.push(typeof lastV === 'number' ? lastV : 0);
  writeTable(f, cols);
  return cols.t.length - 1;
}

export function removeTableRow(f: Item, row: number): { t: unknown; v: unknown } | undefined {
  const cols = tableOf(f);
  if (row < 0 || row >= Math.max(cols.t.length, cols.v.length)) return undefined;
  const [t] = cols.t.splice(row, 1);
  const [v] = cols.v.splice(row, 1);
  writeTable(f, cols);
  return { t, v };
}

export function insertTableRow(f: Item, row: number, cells: { t: unknown; v: unknown }): void {
  const cols = tableOf(f);
  cols.t.splice(row, 0, cells.t);
  cols.v.splice(row, 0, cells.v);
  writeTable(f, cols);
}

/** Replaces the whole table (an import); returns the table it replaced. */
export function replaceTable(f: Item, t: number[], v: number[]): unknown {
  const old = f.table;
  delete f.expression;
  f.table = { t: [...t], v: [...v] };
  return old;
}

/** A problem path (`flows[2].range.mni`, `conserved.x`, `colour`) as keys and list indexes, or null. */
function pathParts(path: string): (string | number)[] | null {
  const parts: (string | number)[] = [];
  for (const seg of path.split('.')) {
    const m = /^([^[\]]+)((?:\[\d+\])*)$/.exec(seg);
    if (!m) return null;
    parts.push(m[1]);
    for (const i of m[2].match(/\d+/g) ?? []) parts.push(Number(i));
  }
  return parts;
}

/** The object that holds the field a path names, and the field's key; null when there is none. */
function holderOf(doc: Doc, path: string): { holder: Item; key: string } | null {
  const parts = pathParts(path);
  const key = parts?.pop();
  if (!parts || typeof key !== 'string') return null;
  let at: unknown = doc;
  for (const p of parts) {
    at = typeof p === 'number' ? (Array.isArray(at) ? at[p] : undefined) : isObject(at) ? at[p] : undefined;
    if (at === undefined) return null;
  }
  return isObject(at) ? { holder: at, key } : null;
}

/** Removes the field a problem path names; returns its value for an undo, or undefined when there is none. */
export function removeField(doc: Doc, path: string): { value: unknown } | undefined {
  const f = holderOf(doc, path);
  if (!f || !(f.key in f.holder)) return undefined;
  const value = f.holder[f.key];
  delete f.holder[f.key];
  return { value };
}

/** Puts back a field removed by `removeField` (its holder must still be there). */
export function restoreField(doc: Doc, path: string, value: unknown): boolean {
  const f = holderOf(doc, path);
  if (!f) return false;
  f.holder[f.key] = value;
  return true;
}
