/**
 * Monitoring data from CSV text into an observation set (`lakeledger.observations/1`):
 * each row named to one of the model's series (a state or a reported derived quantity),
 * converted to that series' unit, and rows of one series on one date combined.
 *
 * Columns (header names, any case, any order): `date`, `variable`, `value` required;
 * `unit`, `depth` (m), `station`, `flag` optional; other columns are ignored and named.
 * Reading (RFC 4180 plus common practice): a UTF-8 byte order mark is dropped; CRLF, LF and
 * CR line endings are all read; the separator is the one of `,` `;` tab that the header line
 * has most often outside quotes (a tie or none: `,`); quoted fields may hold the separator,
 * doubled quotes and line breaks; blank lines are skipped; spaces around a value (and
 * around a quoted value) are dropped. Line numbers are the file's own lines (1 = the
 * header line if it is first), the line where the row starts.
 *
 * Dates (ISO 8601-1:2019 extended format): `YYYY-MM-DD`, optionally followed by `T` or a
 * space and `hh:mm`, `hh:mm:ss` or `hh:mm:ss.s…`, then optionally `Z` or `±hh:mm`. A time
 * of day is read as the UTC calendar date of that instant (an offset converted to UTC
 * first; no offset: UTC). Basic forms (20270503), week and ordinal dates are refused.
 *
 * Values: a decimal point only; a comma in a number (decimal comma, thousands separator)
 * is refused, never read as another number. An empty value, `NA`, `N/A`, `NaN` or `-` is a
 * row without a measurement, listed (`missing_value`). A value written `<0.5` or `< 0.5`
 * (or with flag `<DL`, `below`, `bdl`) is below a detection limit of 0.5: kept,
 * `censored: 'below'`. A value written `>1.2` (or with flag `bottom`, `above`) is a lower
 * bound — a Secchi disk still seen on the bottom — and kept with `censored: 'above'`.
 * Every row that cannot be read is listed with its line number and the reason; none is
 * dropped silently (rows of other stations or deeper than asked are counted in `filtered`).
 *
 * Combining several rows of one series on one date (stations, depths): `mean` (default)
 * averages them, with censored values entering at their limit. Then a mean with some
 * below-limit values is an upper bound of the true mean (so `censored: 'below'` at that
 * mean), one with some above-limit values a lower bound (`'above'`); a group that mixes
 * both bounds nothing and is listed as a problem (`mixed_censoring`). `station` keeps the
 * rows of one station only (then several depths are still averaged the same way).
 */
import Papa from 'papaparse';
import type { ModelDoc } from '../document/types';
import { parseUnit, sameDims, PLAIN_UNITS } from '../expr/math';

export const OBSERVATIONS_FORMAT = 'lakeledger.observations/1';

export type Censoring = 'below' | 'above' | null;

export interface ObservationPoint {
  /** Id of the model's series (state or reported derived quantity). */
  variable: string;
  /** ISO date. */
  date: string;
  /** In the series' unit; for a censored point the limit (or the mean with limits, see above). */
  value: number;
  censored: Censoring;
  /** Rows combined into this point. */
  n: number;
  stations: string[];
  /** CSV line numbers (1 = the header) of the rows combined. */
  lines: number[];
}

export interface RowProblem {
  line: number;
  code: string;
  message: string;
}

export interface ObservationSet {
  format: typeof OBSERVATIONS_FORMAT;
  model: string;
  combine: CombineOptions;
  /** Per series: its unit and the file's names that were mapped to it. */
  variables: Record<string, { unit: string; names: string[]; points: number }>;
  points: ObservationPoint[];
  /** Data rows in the file (blank lines not counted). */
  rows: number;
  /** Rows that went into points. */
  used: number;
  /** Rows left out on purpose by the combine options. */
  filtered: { station: number; depth: number };
  ignoredColumns: string[];
  problems: RowProblem[];
}

export interface CombineOptions {
  /** `mean` over stations and depths (default), or keep one `station`. */
  combine: 'mean' | 'station';
  station?: string;
  /** Keep rows no deeper than this (m); rows without a depth are kept. */
  maxDepth?: number;
}

export interface ObservationOptions extends Partial<CombineOptions> {
  /**
   * The file's variable name → a series id, or `role:NAME` (the reported quantity with that
   * role). Names not in the map are looked up as series ids, then as roles.
   */
  map?: Record<string, string>;
}

/** The series a run records: states and reported derived quantities, with their units. */
export function seriesOfModel(model: ModelDoc): { id: string; unit: string; role?: string }[] {
  return [
    ...model.states.map((s) => ({ id: s.id, unit: s.unit })),
    ...(model.derived ?? []).filter((d) => d.report).map((d) => ({ id: d.id, unit: d.unit, role: d.role }))
  ];
}

const BELOW_FLAGS = new Set(['<dl', '<', 'below', 'bdl', '<lod', 'dl']);
const ABOVE_FLAGS = new Set(['bottom', '>', 'above', '>bottom']);
const NO_FLAGS = new Set(['', 'ok', '-']);
const KNOWN = ['date', 'variable', 'value', 'unit', 'depth', 'station', 'flag'];

export function parseObservations(text: string, model: ModelDoc, options: ObservationOptions = {}): ObservationSet {
  const combine: CombineOptions = { combine: options.combine ?? (options.station !== undefined ? 'station' : 'mean') };
  if (options.station !== undefined) combine.station = options.station;
  if (options.maxDepth !== undefined) combine.maxDepth = options.maxDepth;
  const set: ObservationSet = {
    format: OBSERVATIONS_FORMAT,
    model: model.id,
    combine,
    variables: Object.create(null),
    points: [],
    rows: 0,
    used: 0,
    filtered: { station: 0, depth: 0 },
    ignoredColumns: [],
    problems: []
  };
  const records = readRecords(text);
  const headerIndex = records.findIndex((r) => r.cells.some((c) => clean(c) !== ''));
  if (headerIndex < 0) {
    set.problems.push({ line: 1, code: 'no_header', message: 'the file is empty: expected a header line with date, variable, value' });
    return set;
  }
  const headerLine = records[headerIndex].line;
  const header = records[headerIndex].cells.map((h) => clean(h).toLowerCase());
  const col = (name: string) => header.indexOf(name);
  const missing = ['date', 'variable', 'value'].filter((c) => col(c) < 0);
  if (missing.length) {
    const hint = header.length === 1 ? "; columns are separated by ',', ';' or a tab" : '';
    set.problems.push({ line: headerLine, code: 'missing_column', message: `the header has no column ${missing.map((m) => `'${m}'`).join(', ')} (it has ${header.map((h) => `'${h}'`).join(', ')})${hint}` });
    return set;
  }
  set.ignoredColumns = header.filter((h) => h !== '' && !KNOWN.includes(h));

  const series = seriesOfModel(model);
  const byId = new Map(series.map((s) => [s.id, s]));
  const resolve = (name: string): { id: string; unit: string } | string => {
    const target = options.map?.[name];
    if (target !== undefined) {
      if (target.startsWith('role:')) {
        const r = series.find((s) => s.role === target.slice(5));
        return r ?? `the map sends '${name}' to ${target}, but no reported quantity has role '${target.slice(5)}'`;
      }
      return byId.get(target) ?? `the map sends '${name}' to '${target}', which is neither a state nor a reported quantity of ${model.id}`;
    }
    const direct = byId.get(name);
    if (direct) return direct;
    const role = series.find((s) => s.role === name);
    if (role) return role;
    return `unknown variable '${name}': not a state, a reported quantity or a role of ${model.id} (${series.map((s) => s.id).join(', ')})`;
  };
  const factors = new Map<string, number | string>();
  const factorOf = (from: string, to: string): number | string => {
    const key = `${from}\u0000${to}`;
    const known = factors.get(key);
    if (known !== undefined) return known;
    let f: number | string;
    if (from === to) f = 1;
    else if (PLAIN_UNITS.has(from) || PLAIN_UNITS.has(to)) f = `unit '${from}' cannot be converted to '${to}' (temperatures are read only in the series' own unit)`;
    else {
      const a = parseUnit(from);
      const b = parseUnit(to);
      if ('error' in a) f = `unit: ${a.error}`;
      else if ('error' in b) f = `the series' unit: ${b.error}`;
      else if (!sameDims(a.dims, b.dims)) f = `unit '${from}' cannot be converted to the series' unit '${to}' (another dimension)`;
      else f = a.si / b.si;
    }
    factors.set(key, f);
    return f;
  };

  interface Row { line: number; id: string; date: string; value: number; censored: Censoring; station: string }
  const good: Row[] = [];
  const cell = (r: string[], name: string) => (col(name) >= 0 ? clean(r[col(name)]) : '');
  const separator = records.delimiter === '\t' ? 'tab' : `'${records.delimiter}'`;
  for (let i = headerIndex + 1; i < records.length; i++) {
    const { cells: r, line, lastLine, quoteError } = records[i];
    if (r.every((c) => clean(c) === '')) continue;
    set.rows++;
    const bad = (code: string, message: string) => set.problems.push({ line, code, message });
    if (quoteError) {
      const span = lastLine > line ? `lines ${line}–${lastLine} were read as one row` : 'the row cannot be split into fields';
      bad('invalid_quote', `a quoted field is not closed, or a quote inside it is not doubled (""): ${span}; refused`);
      continue;
    }
    const extra = r.slice(header.length).filter((c) => clean(c) !== '').length;
    if (extra > 0) {
      bad('invalid_value', `the row has ${r.length} fields but the header has ${header.length} (separator ${separator}): a decimal comma (12,5) or a separator inside text splits a field; write numbers with a decimal point and quote text with the separator`);
      continue;
    }
    const dateText = cell(r, 'date');
    const date = observationDate(dateText);
    if ('error' in date) {
      bad('invalid_date', date.error);
      continue;
    }
    const name = cell(r, 'variable');
    if (name === '') {
      bad('missing_variable', 'no variable name');
      continue;
    }
    const target = resolve(name);
    if (typeof target === 'string') {
      bad('unknown_variable', target);
      continue;
    }
    const written = cell(r, 'value');
    const flagText = cell(r, 'flag');
    const flag = flagText.toLowerCase();
    let flagged: Censoring | undefined;
    if (BELOW_FLAGS.has(flag)) flagged = 'below';
    else if (ABOVE_FLAGS.has(flag)) flagged = 'above';
    else if (NO_FLAGS.has(flag)) flagged = undefined;
    else {
      bad('invalid_flag', `flag '${flagText}' is not one of <DL, below, bdl, bottom, above (or empty)`);
      continue;
    }
    if (MISSING_VALUES.has(written.toLowerCase())) {
      const what = written === '' ? 'no value' : `value '${written}' marks no measurement`;
      const limit = flagged ? ` (the flag '${flagText}' says ${flagged === 'below' ? 'below a detection limit' : 'above a bound'}, but the limit is not given)` : '';
      bad('missing_value', `${name} on ${date.date}: ${what}${limit}; the row is not used`);
      continue;
    }
    let raw = written;
    let censored: Censoring = null;
    if (raw.startsWith('<')) {
      censored = 'below';
      raw = raw.slice(1).trim();
    } else if (raw.startsWith('>')) {
      censored = 'above';
      raw = raw.slice(1).trim();
    }
    if (flagged && censored && flagged !== censored) {
      bad('conflicting_flag', `the value says ${censored} a limit and the flag says ${flagged}`);
      continue;
    }
    censored = flagged ?? censored;
    const number = readNumber(raw);
    if (typeof number === 'string') {
      const what = raw === '' ? `value '${written}' has no ${written.startsWith('<') ? 'detection limit' : 'bound'} after '${written[0]}' (write <0.5 or >1.2)` : `value '${written}' ${number}`;
      bad('invalid_value', what);
      continue;
    }
    const value = number;
    if (value < 0) {
      bad('negative_value', `value ${value} is negative`);
      continue;
    }
    const unit = cell(r, 'unit') || target.unit;
    const f = factorOf(unit, target.unit);
    if (typeof f === 'string') {
      bad('unit_mismatch', `${name}: ${f}`);
      continue;
    }
    const depthText = cell(r, 'depth');
    const depth = depthText === '' ? null : readNumber(depthText);
    if (typeof depth === 'string') {
      bad('invalid_depth', `depth (m) '${depthText}' ${depth}`);
      continue;
    }
    const station = cell(r, 'station');
    if (combine.combine === 'station' && station !== (combine.station ?? '')) {
      set.filtered.station++;
      continue;
    }
    if (combine.maxDepth !== undefined && depth !== null && depth > combine.maxDepth) {
      set.filtered.depth++;
      continue;
    }
    const v = (set.variables[target.id] ??= { unit: target.unit, names: [], points: 0 });
    if (!v.names.includes(name)) v.names.push(name);
    good.push({ line, id: target.id, date: date.date, value: value * f, censored, station });
  }

  const groups = new Map<string, Row[]>();
  for (const g of good) {
    const key = `${g.id}\u0000${g.date}`;
    const list = groups.get(key);
    if (list) list.push(g);
    else groups.set(key, [g]);
  }
  for (const list of groups.values()) {
    const kinds = new Set(list.map((r) => r.censored).filter((c) => c !== null));
    if (kinds.size > 1) {
      set.problems.push({ line: list[0].line, code: 'mixed_censoring', message: `${list[0].id} on ${list[0].date}: values below a detection limit and above a bound (lines ${list.map((r) => r.line).join(', ')}) cannot be averaged; left out` });
      continue;
    }
    const censored: Censoring = kinds.size ? [...kinds][0] : null;
    set.points.push({
      variable: list[0].id,
      date: list[0].date,
      value: list.reduce((s, r) => s + r.value, 0) / list.length,
      censored,
      n: list.length,
      stations: [...new Set(list.map((r) => r.station).filter((s) => s !== ''))],
      lines: list.map((r) => r.line)
    });
    set.used += list.length;
  }
  set.points.sort((a, b) => (a.variable < b.variable ? -1 : a.variable > b.variable ? 1 : a.date < b.date ? -1 : a.date > b.date ? 1 : 0));
  for (const p of set.points) set.variables[p.variable].points++;
  set.problems.sort((a, b) => a.line - b.line);
  return set;
}

/** Value cells that mean "no measurement" (any case). */
const MISSING_VALUES = new Set(['', 'na', 'n/a', 'nan', '-']);

interface CsvRecord {
  cells: string[];
  /** File line where the record starts (1-based) and where it ends. */
  line: number;
  lastLine: number;
  /** Papa Parse found an unclosed or malformed quote in this record. */
  quoteError: boolean;
}

/**
 * Splits the text into records with Papa Parse, the separator taken from the header line,
 * and keeps each record's own file line (a quoted field may span lines, RFC 4180 §2.6).
 */
function readRecords(text: string): CsvRecord[] & { delimiter: string } {
  const body = text.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n');
  const delimiter = detectDelimiter(body);
  const records: CsvRecord[] = [];
  let pos = 0;
  let line = 1;
  Papa.parse<string[]>(body, {
    header: false,
    skipEmptyLines: false,
    delimiter,
    newline: '\n',
    quoteChar: '"',
    step: (result) => {
      const end = result.meta.cursor;
      let breaks = 0;
      for (let k = pos; k < end; k++) if (body.charCodeAt(k) === 10) breaks++;
      const endsWithBreak = end > pos && body.charCodeAt(end - 1) === 10;
      records.push({
        cells: result.data,
        line,
        lastLine: line + breaks - (endsWithBreak ? 1 : 0),
        quoteError: result.errors.some((e) => e.type === 'Quotes')
      });
      line += breaks;
      pos = end;
    }
  });
  return Object.assign(records, { delimiter });
}

/** The separator of the first non-blank line: the most frequent of `,` `;` tab outside quotes; a tie or none gives `,`. */
export function detectDelimiter(text: string): ',' | ';' | '\t' {
  const first = text.split(/\r\n?|\n/).find((l) => l.trim() !== '') ?? '';
  const counts = { ',': 0, ';': 0, '\t': 0 };
  let quoted = false;
  for (const ch of first) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === ',' || ch === ';' || ch === '\t')) counts[ch]++;
  }
  let best: ',' | ';' | '\t' = ',';
  for (const d of [';', '\t'] as const) if (counts[d] > counts[best]) best = d;
  return best;
}

/** A cell without the spaces around it, and without quotes left around it after spaces (` "12.5" `). */
function clean(c: string | undefined): string {
  const t = (c ?? '').trim();
  return t.length >= 2 && t.startsWith('"') && t.endsWith('"') ? t.slice(1, -1).replace(/""/g, '"').trim() : t;
}

/** A finite number with a decimal point (optional sign and exponent), or why not. */
function readNumber(raw: string): number | string {
  if (/^[+-]?[\d.,]*\d[\d.,]*([eE][+-]?\d+)?$/.test(raw) && raw.includes(',')) {
    const hint = /^[+-]?\d*,\d+$/.test(raw) ? ` (${raw.replace(',', '.')})` : '';
    return `has a comma: a decimal comma or a thousands separator is not read; write the number with a decimal point${hint} and no separators`;
  }
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(raw)) return 'is not a number (decimal point, optional < or > before it)';
  const n = Number(raw);
  return Number.isFinite(n) ? n : 'is too large to be a number';
}

const DATE_FORMS =
  'YYYY-MM-DD, optionally followed by T or a space and hh:mm, hh:mm:ss or hh:mm:ss.sss, then optionally Z or ±hh:mm (ISO 8601 extended format; basic forms like 20270503, week and ordinal dates are not read)';
const DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})(?:[Tt ](\d{2}):(\d{2})(?::(\d{2})(?:[.,]\d+)?)?([Zz]|[+-]\d{2}:\d{2})?)?$/;

/**
 * The UTC calendar date (YYYY-MM-DD) of an ISO 8601 date or date and time: an offset is
 * converted to UTC first, a time without offset is UTC. Or why the text is not read.
 */
export function observationDate(text: string): { date: string } | { error: string } {
  if (text === '') return { error: `no date: write ${DATE_FORMS}` };
  const m = DATE_TIME.exec(text);
  if (!m) return { error: `date '${text}' is not read: write ${DATE_FORMS}` };
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (mo < 1 || mo > 12) return { error: `date '${text}' is not a calendar date: there is no month ${m[2]}` };
  const last = utcDay(y, mo, 0).getUTCDate();
  if (d < 1 || d > last) return { error: `date '${text}' is not a calendar date: month ${m[2]} of ${m[1]} has ${last} days` };
  const h = m[4] === undefined ? 0 : Number(m[4]);
  const min = m[5] === undefined ? 0 : Number(m[5]);
  const sec = m[6] === undefined ? 0 : Number(m[6]);
  if (h > 23 || min > 59 || sec > 59) return { error: `date '${text}' has no such time of day: hours 00–23, minutes and seconds 00–59` };
  let offset = 0;
  if (m[7] !== undefined && m[7].toUpperCase() !== 'Z') {
    const oh = Number(m[7].slice(1, 3));
    const om = Number(m[7].slice(4, 6));
    if (oh > 23 || om > 59) return { error: `date '${text}' has no such offset from UTC: ±hh:mm with hours 00–23, minutes 00–59` };
    offset = (m[7][0] === '-' ? -1 : 1) * (oh * 60 + om);
  }
  // The instant in UTC; seconds and fractions cannot move it across midnight (offsets are whole minutes).
  const t = utcDay(y, mo - 1, d);
  t.setUTCHours(h, min - offset, 0, 0);
  const year = t.getUTCFullYear();
  if (year < 0 || year > 9999) return { error: `date '${text}' falls outside the years 0000–9999 in UTC` };
  const pad = (n: number, w = 2) => String(n).padStart(w, '0');
  return { date: `${pad(year, 4)}-${pad(t.getUTCMonth() + 1)}-${pad(t.getUTCDate())}` };
}

/** Midnight UTC of year/month (0-based, may overflow)/day, years below 100 kept as written. */
function utcDay(y: number, month0: number, d: number): Date {
  const t = new Date(0);
  t.setUTCFullYear(y, month0, d);
  return t;
}

/** Whether the text is exactly a calendar date YYYY-MM-DD. */
export function isIsoDate(s: string): boolean {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
  const r = observationDate(s);
  return 'date' in r && r.date === s;
}
