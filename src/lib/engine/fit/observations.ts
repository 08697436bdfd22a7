/**
 * Monitoring data from CSV text into an observation set (`lakeledger.observations/1`):
 * each row named to one of the model's series (a state or a reported derived quantity),
 * converted to that series' unit, and rows of one series on one date combined.
 *
 * Columns (header names, any case, any order): `date` (ISO YYYY-MM-DD, UTC), `variable`,
 * `value` required; `unit`, `depth` (m), `station`, `flag` optional; other columns are
 * ignored and named. A value written `<0.5` (or with flag `<DL`, `below`) is below a
 * detection limit of 0.5: kept, `censored: 'below'`. A value written `>1.2` (or with flag
 * `bottom`, `above`) is a lower bound — a Secchi disk still seen on the bottom — and kept
 * with `censored: 'above'`. Every row that cannot be read is listed with its line number
 * and the reason; none is dropped silently (rows of other stations or deeper than asked
 * are counted in `filtered`).
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
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { header: false, skipEmptyLines: false });
  const rows = parsed.data;
  const headerIndex = rows.findIndex((r) => r.some((c) => c.trim() !== ''));
  if (headerIndex < 0) {
    set.problems.push({ line: 1, code: 'no_header', message: 'the file is empty: expected a header line with date, variable, value' });
    return set;
  }
  const header = rows[headerIndex].map((h) => h.trim().toLowerCase());
  const col = (name: string) => header.indexOf(name);
  const missing = ['date', 'variable', 'value'].filter((c) => col(c) < 0);
  if (missing.length) {
    set.problems.push({ line: headerIndex + 1, code: 'missing_column', message: `the header has no column ${missing.map((m) => `'${m}'`).join(', ')} (it has ${header.map((h) => `'${h}'`).join(', ')})` });
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
  const cell = (r: string[], name: string) => (col(name) >= 0 ? (r[col(name)] ?? '').trim() : '');
  for (let i = headerIndex + 1; i < rows.length; i++) {
    const r = rows[i];
    const line = i + 1;
    if (r.every((c) => c.trim() === '')) continue;
    set.rows++;
    const bad = (code: string, message: string) => set.problems.push({ line, code, message });
    const date = cell(r, 'date');
    if (!isIsoDate(date)) {
      bad('invalid_date', `date '${date}' is not a calendar date YYYY-MM-DD`);
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
    let raw = cell(r, 'value');
    let censored: Censoring = null;
    if (raw.startsWith('<')) {
      censored = 'below';
      raw = raw.slice(1).trim();
    } else if (raw.startsWith('>')) {
      censored = 'above';
      raw = raw.slice(1).trim();
    }
    const flag = cell(r, 'flag').toLowerCase();
    let flagged: Censoring | undefined;
    if (BELOW_FLAGS.has(flag)) flagged = 'below';
    else if (ABOVE_FLAGS.has(flag)) flagged = 'above';
    else if (NO_FLAGS.has(flag)) flagged = undefined;
    else {
      bad('invalid_flag', `flag '${cell(r, 'flag')}' is not one of <DL, below, bottom, above (or empty)`);
      continue;
    }
    if (flagged && censored && flagged !== censored) {
      bad('conflicting_flag', `the value says ${censored} a limit and the flag says ${flagged}`);
      continue;
    }
    censored = flagged ?? censored;
    if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(raw)) {
      bad('invalid_value', `value '${cell(r, 'value')}' is not a number (decimal point, optional < or > before it)`);
      continue;
    }
    const value = Number(raw);
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
    if (depthText !== '' && !Number.isFinite(Number(depthText))) {
      bad('invalid_depth', `depth '${depthText}' is not a number (m)`);
      continue;
    }
    const station = cell(r, 'station');
    if (combine.combine === 'station' && station !== (combine.station ?? '')) {
      set.filtered.station++;
      continue;
    }
    if (combine.maxDepth !== undefined && depthText !== '' && Number(depthText) > combine.maxDepth) {
      set.filtered.depth++;
      continue;
    }
    const v = (set.variables[target.id] ??= { unit: target.unit, names: [], points: 0 });
    if (!v.names.includes(name)) v.names.push(name);
    good.push({ line, id: target.id, date, value: value * f, censored, station });
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

export function isIsoDate(s: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) return false;
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
  return d.getUTCFullYear() === Number(m[1]) && d.getUTCMonth() === Number(m[2]) - 1 && d.getUTCDate() === Number(m[3]);
}
