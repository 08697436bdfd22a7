/**
 * The measure catalogue: the trade's measures (load reduction, fish removal, capping, …)
 * mapped onto the six generic measure kinds of a scenario. The catalogue is data
 * (`catalogue.json`, bundled, never fetched); this module names its types and checks it,
 * so that a new trade measure is one more item in the JSON and no code changes.
 *
 * A selector says which symbols of a model an item may act on, by what the model says
 * about them (flow roles, derived roles, zones, units), never by ids; see targets.ts.
 */
import type { MeasureDoc } from '$lib/engine/document/types';
import { parseUnit } from '$lib/engine/expr/math';
import bundled from './catalogue.json';

export const CATALOGUE_FORMAT = 'lakeledger.catalogue/1';

export type MeasureKind = MeasureDoc['kind'];
export const MEASURE_KINDS: readonly MeasureKind[] = ['scale', 'offset', 'set', 'remove', 'add', 'transfer'];

/** Kinds that change a parameter or forcing from a date; the others change a state at dates. */
export const SYMBOL_KINDS: readonly MeasureKind[] = ['scale', 'offset', 'set'];

/**
 * Which symbols of a model an item may act on. Every condition given must hold (and);
 * an item's list of selectors offers what any of them allows (or).
 */
export interface Selector {
  /** What the target is. `parameterOrForcing` allows both. Size parameters never qualify. */
  of: 'parameter' | 'forcing' | 'parameterOrForcing' | 'state';
  // ---- parameters and forcings
  /** It appears in the rate of a flow with one of these roles, directly or through derived quantities and forcing expressions. */
  feedsFlowRole?: string[];
  /** …and in the rate of no flow with one of these roles (same reach). */
  notFeedsFlowRole?: string[];
  /** It appears in the expression of a derived quantity with one of these roles (same reach). */
  feedsDerivedRole?: string[];
  /** Its unit, as the model writes it, is one of these. */
  unit?: string[];
  /** Its unit has the dimension of this unit (`m^3/d` also allows `m^3/s`, `L/s`). */
  dimensionOf?: string;
  /** true: only dimensionless ones (`1`, and index units such as degC); false: none of them. */
  dimensionless?: boolean;
  // ---- states
  /** Its zone is one of these. */
  zone?: string[];
  /** A flow enters it from a state in one of these zones (what it feeds on). */
  flowInFromZone?: string[];
  /** It is the source of a flow with one of these roles. */
  flowOutRole?: string[];
  /** It is the source of no flow with one of these roles. */
  notFlowOutRole?: string[];
  /** true: only states in the mass inventory; false: only states kept out of it. */
  conserved?: boolean;
}

export interface RepeatDefaults {
  count: number;
  everyYears?: number;
  everyDays?: number;
}

export interface CatalogueDefaults {
  /** scale: multiplier (0.5 = to half). */
  factor?: number;
  /** offset: amount in the target's unit; add: amount in the state's unit. */
  amount?: number;
  /** add: amount as a multiple of the state's initial value (model-independent). */
  relativeAmount?: number;
  /** set: the new value in the parameter's unit. */
  value?: number;
  /** set: the new value as a multiple of the parameter's value (model-independent). */
  relativeValue?: number;
  /** remove, transfer: share of the state, 0–1. */
  fraction?: number;
  /** scale, offset: days over which the change is phased in. */
  rampDays?: number;
  /** remove, add, transfer: applications in all and their spacing. */
  repeat?: RepeatDefaults;
  /** The first date: `afterYears` whole years after the scenario's start year, on `monthDay` (`MM-DD`). Default 1 year, `01-01`. */
  date?: { afterYears: number; monthDay: string };
}

export interface CatalogueItem {
  /** A measure id stem too (`fishRemoval`, then `fishRemoval2`, …). */
  id: string;
  /** What the trade calls it. */
  name: string;
  /** One or two sentences for the chooser. */
  about?: string;
  kind: MeasureKind;
  /** What it may act on (any of these). For transfer: the state mass leaves. */
  targets: Selector[];
  /** transfer only: the state mass goes into (any of these). */
  into?: Selector[];
  defaults: CatalogueDefaults;
  /** Shown wherever the measure is set up; null when none. */
  caution: string | null;
  /** `EUR`, or `EUR per campaign`: the currency code, then what one amount pays for. */
  costUnit: string;
  /** The manager's sentence with placeholders (see SENTENCE_FIELDS). */
  sentence: string;
  /** A catch-all for kinds ("other change of a parameter"); a stored measure is matched to it only as "other". */
  generic?: boolean;
}

export interface Catalogue {
  format: typeof CATALOGUE_FORMAT;
  items: CatalogueItem[];
}

/** One problem of a catalogue: where, which item, what is wrong. */
export interface CatalogueProblem {
  /** JSON path such as `items[3].defaults.fraction`. */
  path: string;
  /** The item's id, when it has one. */
  item?: string;
  message: string;
}

/** Placeholders a sentence may use, by kind; `{when}` is the dates in words. */
export const SENTENCE_FIELDS: Readonly<Record<MeasureKind, readonly string[]>> = {
  scale: ['change', 'target', 'factor', 'when'],
  offset: ['change', 'target', 'amount', 'when'],
  set: ['target', 'value', 'when'],
  remove: ['state', 'fraction', 'when'],
  add: ['state', 'amount', 'when'],
  transfer: ['state', 'into', 'fraction', 'when']
};

const ITEM_FIELDS = ['id', 'name', 'about', 'kind', 'targets', 'into', 'defaults', 'caution', 'costUnit', 'sentence', 'generic'];
const SYMBOL_SELECTOR_FIELDS = ['feedsFlowRole', 'notFeedsFlowRole', 'feedsDerivedRole', 'unit', 'dimensionOf', 'dimensionless'];
const STATE_SELECTOR_FIELDS = ['zone', 'flowInFromZone', 'flowOutRole', 'notFlowOutRole', 'conserved'];
const DEFAULT_FIELDS: Readonly<Record<MeasureKind, readonly string[]>> = {
  scale: ['factor', 'rampDays', 'date'],
  offset: ['amount', 'rampDays', 'date'],
  set: ['value', 'relativeValue', 'date'],
  remove: ['fraction', 'repeat', 'date'],
  add: ['amount', 'relativeAmount', 'repeat', 'date'],
  transfer: ['fraction', 'repeat', 'date']
};
const ID = /^[A-Za-z_][A-Za-z0-9_]*$/;
const COST_UNIT = /^[A-Z]{3}( per [a-z][a-z ]*)?$/;

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const finite = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const show = (v: unknown) => (v === undefined ? 'nothing' : JSON.stringify(v));

/** Every problem of a catalogue; an empty list means it can be used. */
export function validateCatalogue(doc: unknown): CatalogueProblem[] {
  const out: CatalogueProblem[] = [];
  if (!isObject(doc)) return [{ path: '', message: `a catalogue must be an object, got ${show(doc)}` }];
  if (doc.format !== CATALOGUE_FORMAT) out.push({ path: 'format', message: `format is ${show(doc.format)}, expected '${CATALOGUE_FORMAT}'` });
  if (!Array.isArray(doc.items) || doc.items.length === 0) {
    out.push({ path: 'items', message: 'items must be a non-empty list of measures' });
    return out;
  }
  const seen = new Set<string>();
  doc.items.forEach((raw, i) => {
    const at = `items[${i}]`;
    if (!isObject(raw)) return void out.push({ path: at, message: `an item must be an object, got ${show(raw)}` });
    const item = typeof raw.id === 'string' ? raw.id : undefined;
    const bad = (field: string, message: string) => out.push({ path: field ? `${at}.${field}` : at, item, message: `${item ? `item '${item}'` : `item ${i + 1}`}: ${message}` });

    for (const k of Object.keys(raw)) if (!ITEM_FIELDS.includes(k)) bad(k, `unknown field '${k}' (known: ${ITEM_FIELDS.join(', ')})`);
    if (typeof raw.id !== 'string' || !ID.test(raw.id)) bad('id', `id must be a word of letters, digits and _ (not starting with a digit), got ${show(raw.id)}`);
    else if (seen.has(raw.id)) bad('id', `id '${raw.id}' is used by an earlier item`);
    else seen.add(raw.id);
    if (typeof raw.name !== 'string' || raw.name.trim() === '') bad('name', `name must be a non-empty text, got ${show(raw.name)}`);
    if (raw.about !== undefined && typeof raw.about !== 'string') bad('about', `about must be a text, got ${show(raw.about)}`);
    if (raw.generic !== undefined && typeof raw.generic !== 'boolean') bad('generic', `generic must be true or false, got ${show(raw.generic)}`);
    const kind = raw.kind as MeasureKind;
    if (!MEASURE_KINDS.includes(kind)) {
      bad('kind', `kind must be one of ${MEASURE_KINDS.join(', ')}, got ${show(raw.kind)}`);
      return;
    }
    checkSelectors(raw.targets, 'targets', kind, bad);
    if (kind === 'transfer') checkSelectors(raw.into, 'into', kind, bad);
    else if (raw.into !== undefined) bad('into', `'into' belongs to transfer items only (this one is ${kind})`);
    checkDefaults(raw.defaults, kind, bad);
    if (raw.caution !== null && (typeof raw.caution !== 'string' || raw.caution.trim() === ''))
      bad('caution', `caution must be a text or null, got ${show(raw.caution)}`);
    if (typeof raw.costUnit !== 'string' || !COST_UNIT.test(raw.costUnit))
      bad('costUnit', `costUnit must be a three-letter currency code, optionally followed by "per …" (EUR, EUR per campaign), got ${show(raw.costUnit)}`);
    checkSentence(raw.sentence, kind, bad);
  });
  return out;
}

type Bad = (field: string, message: string) => void;

function checkSelectors(v: unknown, field: 'targets' | 'into', kind: MeasureKind, bad: Bad) {
  if (!Array.isArray(v) || v.length === 0) return bad(field, `${field} must be a non-empty list of selectors`);
  const wantState = !SYMBOL_KINDS.includes(kind);
  v.forEach((s, j) => {
    const at = `${field}[${j}]`;
    if (!isObject(s)) return bad(at, `a selector must be an object, got ${show(s)}`);
    const of = s.of;
    if (!['parameter', 'forcing', 'parameterOrForcing', 'state'].includes(of as string))
      return bad(`${at}.of`, `of must be parameter, forcing, parameterOrForcing or state, got ${show(of)}`);
    if (wantState && of !== 'state') bad(`${at}.of`, `a ${kind} measure acts on a state, so of must be 'state', got ${show(of)}`);
    if (!wantState && of === 'state') bad(`${at}.of`, `a ${kind} measure acts on a parameter or forcing, not a state`);
    if (kind === 'set' && of !== 'parameter') bad(`${at}.of`, `'set' replaces a parameter, so of must be 'parameter', got ${show(of)}`);
    for (const k of Object.keys(s)) {
      if (k === 'of') continue;
      const symbolField = SYMBOL_SELECTOR_FIELDS.includes(k);
      const stateField = STATE_SELECTOR_FIELDS.includes(k);
      if (!symbolField && !stateField) {
        bad(`${at}.${k}`, `unknown selector field '${k}' (known: ${[...SYMBOL_SELECTOR_FIELDS, ...STATE_SELECTOR_FIELDS].join(', ')})`);
        continue;
      }
      if (stateField && of !== 'state') bad(`${at}.${k}`, `selector field '${k}' applies to states only (of: 'state')`);
      if (symbolField && of === 'state') bad(`${at}.${k}`, `selector field '${k}' applies to parameters and forcings only, not states`);
      const val = s[k];
      if (k === 'dimensionless' || k === 'conserved') {
        if (typeof val !== 'boolean') bad(`${at}.${k}`, `${k} must be true or false, got ${show(val)}`);
      } else if (k === 'dimensionOf') {
        const u = typeof val === 'string' ? parseUnit(val) : { error: 'not a text' };
        if ('error' in u) bad(`${at}.${k}`, `dimensionOf must be a unit such as m^3/d, got ${show(val)}`);
      } else if (!Array.isArray(val) || val.length === 0 || val.some((x) => typeof x !== 'string' || x === '')) {
        bad(`${at}.${k}`, `${k} must be a non-empty list of words, got ${show(val)}`);
      }
    }
  });
}

function checkDefaults(v: unknown, kind: MeasureKind, bad: Bad) {
  if (!isObject(v)) return bad('defaults', `defaults must be an object, got ${show(v)}`);
  const known = DEFAULT_FIELDS[kind];
  for (const k of Object.keys(v)) if (!known.includes(k)) bad(`defaults.${k}`, `'${k}' is not a default of a ${kind} measure (its defaults: ${known.join(', ')})`);
  const num = (k: string, required: boolean, ok: (x: number) => boolean, rule: string) => {
    if (v[k] === undefined) {
      if (required) bad(`defaults.${k}`, `a ${kind} measure needs defaults.${k} (${rule})`);
      return;
    }
    if (!finite(v[k]) || !ok(v[k] as number)) bad(`defaults.${k}`, `${k} must be ${rule}, got ${show(v[k])}`);
  };
  const oneOf = (a: string, b: string) => {
    if ((v[a] === undefined) === (v[b] === undefined)) bad(`defaults`, `a ${kind} measure needs exactly one of defaults.${a} and defaults.${b}`);
  };
  switch (kind) {
    case 'scale':
      num('factor', true, (x) => x >= 0, 'a number ≥ 0 (0.5 = to half)');
      break;
    case 'offset':
      num('amount', true, () => true, "a number in the target's unit");
      break;
    case 'set':
      oneOf('value', 'relativeValue');
      num('value', false, () => true, "a number in the parameter's unit");
      num('relativeValue', false, (x) => x >= 0, "a number ≥ 0 (times the parameter's value)");
      break;
    case 'remove':
    case 'transfer':
      num('fraction', true, (x) => x >= 0 && x <= 1, 'a share between 0 and 1');
      break;
    case 'add':
      oneOf('amount', 'relativeAmount');
      num('amount', false, (x) => x >= 0, "a number ≥ 0 in the state's unit");
      num('relativeAmount', false, (x) => x >= 0, "a number ≥ 0 (times the state's initial value)");
      break;
  }
  num('rampDays', false, (x) => x >= 0, 'a number of days ≥ 0');
  if (v.repeat !== undefined) {
    const r = v.repeat;
    if (!isObject(r)) bad('defaults.repeat', `repeat must be { "count": …, "everyYears": … }, got ${show(r)}`);
    else {
      if (!Number.isInteger(r.count) || (r.count as number) < 1) bad('defaults.repeat.count', `count must be a whole number ≥ 1, got ${show(r.count)}`);
      if ((r.everyYears === undefined) === (r.everyDays === undefined)) bad('defaults.repeat', 'repeat needs exactly one of everyYears and everyDays');
      if (r.everyYears !== undefined && (!Number.isInteger(r.everyYears) || (r.everyYears as number) < 1))
        bad('defaults.repeat.everyYears', `everyYears must be a whole number ≥ 1, got ${show(r.everyYears)}`);
      if (r.everyDays !== undefined && (!finite(r.everyDays) || r.everyDays <= 0)) bad('defaults.repeat.everyDays', `everyDays must be a number > 0, got ${show(r.everyDays)}`);
      for (const k of Object.keys(r)) if (!['count', 'everyYears', 'everyDays'].includes(k)) bad(`defaults.repeat.${k}`, `unknown field '${k}' of repeat`);
    }
  }
  if (v.date !== undefined) {
    const d = v.date;
    if (!isObject(d)) bad('defaults.date', `date must be { "afterYears": 1, "monthDay": "03-01" }, got ${show(d)}`);
    else {
      if (!Number.isInteger(d.afterYears) || (d.afterYears as number) < 0) bad('defaults.date.afterYears', `afterYears must be a whole number ≥ 0, got ${show(d.afterYears)}`);
      if (typeof d.monthDay !== 'string' || !validMonthDay(d.monthDay)) bad('defaults.date.monthDay', `monthDay must be a day of the year as MM-DD (03-01), got ${show(d.monthDay)}`);
    }
  }
}

function validMonthDay(s: string): boolean {
  const m = /^(\d\d)-(\d\d)$/.exec(s);
  if (!m) return false;
  // 2027 is not a leap year: 02-29 would fall on 1 March in most years, so it is refused.
  const d = new Date(Date.UTC(2027, Number(m[1]) - 1, Number(m[2])));
  return d.getUTCMonth() === Number(m[1]) - 1 && d.getUTCDate() === Number(m[2]);
}

function checkSentence(v: unknown, kind: MeasureKind, bad: Bad) {
  if (typeof v !== 'string' || v.trim() === '') return bad('sentence', `sentence must be a non-empty text with placeholders such as {${SENTENCE_FIELDS[kind][0]}}, got ${show(v)}`);
  const allowed = SENTENCE_FIELDS[kind];
  for (const m of v.matchAll(/\{([^}]*)\}/g)) {
    if (!allowed.includes(m[1])) bad('sentence', `unknown placeholder {${m[1]}} in the sentence of a ${kind} measure (allowed: ${allowed.map((a) => `{${a}}`).join(', ')})`);
  }
  const subject = SYMBOL_KINDS.includes(kind) ? 'target' : 'state';
  if (!v.includes(`{${subject}}`)) bad('sentence', `the sentence must name what the measure acts on with {${subject}}`);
  if (!v.includes('{when}')) bad('sentence', 'the sentence must say when with {when}');
}

/** A catalogue that failed its check: every problem, one a line. */
export class CatalogueInvalidError extends Error {
  constructor(readonly problems: CatalogueProblem[]) {
    super(`the measure catalogue has ${problems.length} problem${problems.length === 1 ? '' : 's'}:\n` + problems.map((p) => `${p.path}: ${p.message}`).join('\n'));
    this.name = 'CatalogueInvalidError';
  }
}

/** Checks a catalogue and returns it typed; throws CatalogueInvalidError naming every problem. */
export function loadCatalogue(doc: unknown): Catalogue {
  const problems = validateCatalogue(doc);
  if (problems.length > 0) throw new CatalogueInvalidError(problems);
  return doc as Catalogue;
}

/** The catalogue shipped with the app. */
export const CATALOGUE: Catalogue = loadCatalogue(bundled);

export function catalogueItem(catalogue: Catalogue, id: string): CatalogueItem | undefined {
  return catalogue.items.find((i) => i.id === id);
}

/** `EUR per campaign` → `{ currency: 'EUR', per: 'campaign' }`. */
export function costUnitParts(costUnit: string): { currency: string; per: string | null } {
  const m = /^([A-Z]{3})(?: per (.+))?$/.exec(costUnit);
  return m ? { currency: m[1], per: m[2] ?? null } : { currency: 'EUR', per: null };
}
