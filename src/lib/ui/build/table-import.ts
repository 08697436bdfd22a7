/**
 * A forcing table from pasted rows or a CSV file. Columns are separated by tabs, commas,
 * semicolons or bars (papaparse finds which); a first row of names is a header. The time
 * column holds either days since the model's time origin or calendar dates, which become
 * days since the origin, taken as UTC (a date with a time of day gives a fraction of a
 * day). Every bad row is reported by its line number; a table with any bad row is not
 * applied, so nothing is half-written.
 */
import Papa from 'papaparse';

const DAY_MS = 86_400_000;

export interface TableImportOptions {
  /** The model's time origin (ISO date); dates count from it. Without it, from the first date. */
  timeOrigin?: string;
  /** Column (0-based) of the values; default: one named `v`/`value` or after the forcing's id, else the first after the time column. */
  valueColumn?: number;
  /** Column (0-based) of the time; default: one named like a date or day, else the first. */
  timeColumn?: number;
  /** The forcing's id, to find its column by name. */
  forcingId?: string;
}

export interface RowError {
  /** 1-based line of the text. */
  line: number;
  message: string;
}

export interface TableImport {
  /** True when every row was read and the times increase: the table can be applied. */
  ok: boolean;
  /** Days since the time origin. */
  t: number[];
  v: number[];
  errors: RowError[];
  /** Column names from the header, or `column 1`, `column 2`, … */
  columns: string[];
  header: boolean;
  timeColumn: number;
  valueColumn: number;
  /** Whether the time column holds day numbers or dates. */
  timeKind: 'days' | 'dates';
  /** First and last date read (dates only), ISO. */
  firstDate?: string;
  lastDate?: string;
  /** The origin the days count from (dates only): the one given, else the first date. */
  origin?: string;
  /** Dates were read but no time origin was given: the first date was taken; ask to confirm. */
  originAssumed: boolean;
  delimiter: string;
}

const TIME_NAMES = /^(t|time|times|day|days|date|dates|datum|d|doy)$/i;
const VALUE_NAMES = /^(v|value|values|val)$/i;

/** `2027-03-01`, `2027-03-01T06:00`, `2027-03-01 06:00:00`, `...Z`, or `01.03.2027`. */
const ISO = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?(Z)?)?$/;
const DOTTED = /^(\d{1,2})\.(\d{1,2})\.(\d{4})$/;
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const DECIMAL_COMMA = /^[+-]?\d+,\d+$/;

/** Milliseconds since 1970 (UTC) of a date text, or a reason it is not one. */
export function parseDate(text: string): { ms: number } | { error: string } {
  const s = text.trim();
  let y: number, mo: number, d: number, h = 0, mi = 0, se = 0;
  const iso = ISO.exec(s);
  const dotted = iso ? null : DOTTED.exec(s);
  if (iso) {
    [y, mo, d] = [Number(iso[1]), Number(iso[2]), Number(iso[3])];
    if (iso[4] !== undefined) [h, mi, se] = [Number(iso[4]), Number(iso[5]), Number(iso[6] ?? 0)];
  } else if (dotted) {
    [d, mo, y] = [Number(dotted[1]), Number(dotted[2]), Number(dotted[3])];
  } else if (/^\d{1,4}[/]\d{1,2}[/]\d{1,4}$/.test(s)) {
    return { error: `'${s}' is ambiguous (day or month first?); write dates as YYYY-MM-DD, e.g. 2027-03-01` };
  } else if (/[+-]\d{2}:?\d{2}$/.test(s) && ISO.test(s.slice(0, 10))) {
    return { error: `'${s}' has a time-zone offset; give times in UTC (no offset, or Z)` };
  } else {
    return { error: `'${s}' is not a date (write YYYY-MM-DD, e.g. 2027-03-01)` };
  }
  const ms = Date.UTC(y, mo - 1, d, h, mi, se);
  const back = new Date(ms);
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d || h > 23 || mi > 59 || se > 59) {
    return { error: `'${s}' is not a calendar date` };
  }
  return { ms };
}

/** Days from `origin` (ISO date) to `ms`, as a plain number; whole days stay whole. */
export function daysSince(originIso: string, ms: number): number {
  const o = parseDate(originIso);
  if ('error' in o) throw new Error(o.error);
  return (ms - o.ms) / DAY_MS;
}

function isoOf(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

/** A number from a cell: decimal point, or a decimal comma where commas do not separate columns. */
export function parseCellNumber(text: string, delimiter: string): number | null {
  const s = text.trim();
  if (DECIMAL.test(s)) return Number(s);
  if (delimiter !== ',' && DECIMAL_COMMA.test(s)) return Number(s.replace(',', '.'));
  return null;
}

function looksLikeTime(cell: string, delimiter: string): boolean {
  return parseCellNumber(cell, delimiter) !== null || !('error' in parseDate(cell));
}

function splitLines(text: string): string[] {
  return text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
}

function detectDelimiter(lines: string[]): string {
  const sample = lines.filter((l) => l.trim() !== '').slice(0, 20).join('\n');
  if (sample.includes('\t')) return '\t';
  const guess = Papa.parse<string[]>(sample, { delimitersToGuess: [',', ';', '|', '\t'] }).meta.delimiter;
  return guess || ',';
}

function cellsOf(line: string, delimiter: string): string[] {
  const r = Papa.parse<string[]>(line, { delimiter });
  return (r.data[0] ?? []).map((c) => c.trim());
}

function pickColumn(names: string[], test: (n: string) => boolean, not: number): number {
  return names.findIndex((n, i) => i !== not && test(n));
}

/** Reads a table of times and values; see the module comment. */
export function parseTableText(text: string, options: TableImportOptions = {}): TableImport {
  const lines = splitLines(text);
  const delimiter = detectDelimiter(lines);
  const rows: { line: number; cells: string[] }[] = [];
  lines.forEach((l, i) => {
    if (l.trim() !== '') rows.push({ line: i + 1, cells: cellsOf(l, delimiter) });
  });
  const errors: RowError[] = [];
  const empty = (message: string): TableImport => ({
    ok: false, t: [], v: [], errors: [{ line: rows[0]?.line ?? 1, message }], columns: [], header: false,
    timeColumn: 0, valueColumn: 1, timeKind: 'days', originAssumed: false, delimiter
  });
  if (rows.length === 0) return empty('there are no rows to read');

  const width = Math.max(...rows.map((r) => r.cells.length));
  const first = rows[0].cells;
  // A first row without a single number or date is a row of column names.
  const header = !first.some((c) => looksLikeTime(c, delimiter));
  const names = Array.from({ length: width }, (_, i) => (header && first[i] ? first[i] : `column ${i + 1}`));
  const data = header ? rows.slice(1) : rows;
  if (width < 2) return { ...empty(`line ${rows[0].line}: found one column; a table needs a time column and a value column`), columns: names, header };

  let timeColumn = options.timeColumn ?? (header ? pickColumn(names, (n) => TIME_NAMES.test(n) || /date|day|time/i.test(n), -1) : 0);
  if (timeColumn < 0) timeColumn = 0;
  let valueColumn = options.valueColumn ?? -1;
  if (valueColumn < 0 && header) {
    const id = options.forcingId;
    valueColumn = pickColumn(names, (n) => (id !== undefined && n === id) || VALUE_NAMES.test(n), timeColumn);
  }
  if (valueColumn < 0) valueColumn = timeColumn === 0 ? 1 : 0;
  if (valueColumn === timeColumn || valueColumn >= width || timeColumn >= width) {
    return { ...empty('the time and value columns must be two different columns of the table'), columns: names, header };
  }
  if (data.length === 0) return { ...empty(`only a header row (line ${rows[0].line}); there are no values`), columns: names, header };

  // The first row's time cell decides whether the column holds days or dates.
  const firstTime = data[0].cells[timeColumn] ?? '';
  const timeKind: 'days' | 'dates' = parseCellNumber(firstTime, delimiter) === null && !('error' in parseDate(firstTime)) ? 'dates' : 'days';

  const read: { line: number; t: number; v: number; ms?: number }[] = [];
  for (const { line, cells } of data) {
    const tc = cells[timeColumn] ?? '';
    const vc = cells[valueColumn] ?? '';
    let t: number | null = null;
    let ms: number | undefined;
    if (tc === '') errors.push({ line, message: `line ${line}: no ${timeKind === 'dates' ? 'date' : 'day'} in column '${names[timeColumn]}'` });
    else if (timeKind === 'days') {
      t = parseCellNumber(tc, delimiter);
      if (t === null) {
        const asDate = parseDate(tc);
        errors.push({
          line,
          message: 'error' in asDate
            ? `line ${line}: '${tc}' is not a number of days`
            : `line ${line}: '${tc}' is a date, but the column holds days since the time origin (as on line ${data[0].line})`
        });
      }
    } else {
      const d = parseDate(tc);
      if ('error' in d) {
        errors.push({
          line,
          message: parseCellNumber(tc, delimiter) !== null
            ? `line ${line}: '${tc}' is a number, but the column holds dates (as on line ${data[0].line})`
            : `line ${line}: ${d.error}`
        });
      } else {
        ms = d.ms;
        t = 0;
      }
    }
    const v = vc === '' ? null : parseCellNumber(vc, delimiter);
    if (vc === '') errors.push({ line, message: `line ${line}: no value in column '${names[valueColumn]}'` });
    else if (v === null) errors.push({ line, message: `line ${line}: value '${vc}' is not a number${delimiter === ',' && /^\d+,\d+$/.test(vc) ? ' (a decimal comma needs tabs or semicolons between columns)' : ''}` });
    if (t !== null && v !== null) read.push({ line, t, v, ms });
  }

  let origin: string | undefined;
  let originAssumed = false;
  let firstDate: string | undefined;
  let lastDate: string | undefined;
  if (timeKind === 'dates') {
    const dated = read.filter((r) => r.ms !== undefined);
    if (dated.length > 0) {
      firstDate = isoOf(dated[0].ms!);
      lastDate = isoOf(dated[dated.length - 1].ms!);
    }
    const given = options.timeOrigin !== undefined && !('error' in parseDate(options.timeOrigin)) ? options.timeOrigin : undefined;
    origin = given ?? firstDate;
    originAssumed = given === undefined;
    if (origin) for (const r of read) r.t = daysSince(origin, r.ms!);
  }

  for (let i = 1; i < read.length; i++) {
    const prev = read[i - 1];
    const cur = read[i];
    if (cur.t <= prev.t) {
      const what = (r: typeof cur) => (timeKind === 'dates' ? `${isoOf(r.ms!)} (day ${r.t})` : `day ${r.t}`);
      errors.push({
        line: cur.line,
        message: `line ${cur.line}: ${what(cur)} ${cur.t === prev.t ? 'repeats' : 'comes before'} ${what(prev)} of line ${prev.line}; times must increase from row to row`
      });
    }
  }
  errors.sort((a, b) => a.line - b.line);

  return {
    ok: errors.length === 0 && read.length > 0,
    t: read.map((r) => r.t),
    v: read.map((r) => r.v),
    errors,
    columns: names,
    header,
    timeColumn,
    valueColumn,
    timeKind,
    firstDate,
    lastDate,
    origin,
    originAssumed,
    delimiter
  };
}
