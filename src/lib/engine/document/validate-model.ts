/**
 * Stage 1 of the engine: validate a model document once, at the boundary, and hand the
 * next stage a typed analysis (parsed expressions, units, evaluation order). Every
 * problem found is returned with its JSON path; nothing further in re-checks.
 */
import { plainJsonProblem } from './json';
import { MODEL_FORMAT, type ModelDoc, type Problem } from './types';
import { ProblemList, didYouMean, nearest } from './problems';
import { describe, idProblem, quote } from './ids';
import { parseExpression } from '../expr/parse';
import { parseUnit, sameDims, isDimensionless, type UnitInfo } from '../expr/math';
import { inferUnits, describeUnit, type SymbolUnit } from '../expr/units';
import { symbolsOf, type Ir } from '../expr/ir';
import { evaluateIr } from '../expr/evaluate';

export type SymbolKind = 'parameter' | 'forcing' | 'state' | 'derived' | 'flow';

export interface AParameter { id: string; index: number; value: number; unit: UnitInfo; si: number }
export interface AForcing {
  id: string;
  index: number;
  unit: UnitInfo;
  table?: { t: number[]; v: number[]; step: boolean; period?: number };
  ir?: Ir;
}
export interface AState {
  id: string;
  index: number;
  unit: UnitInfo;
  initial: number;
  sizeIr: Ir;
  /** SI unit of the size expression (its dims checked against the conserved unit). */
  sizeUnit: UnitInfo | null;
  conserved: boolean;
}
export interface ADerived { id: string; index: number; unit: UnitInfo; ir: Ir; report: boolean; role?: string }
export interface AFlow { id: string; index: number; from?: number; to?: number; basis: number; ir: Ir; role?: string }

/** The validated, analysed model: what compile (stage 2) starts from. */
export interface AnalyzedModel {
  doc: ModelDoc;
  conserved: UnitInfo;
  parameters: AParameter[];
  forcings: AForcing[];
  states: AState[];
  /** In dependency order: each only reads earlier ones. */
  derived: ADerived[];
  flows: AFlow[];
  kinds: Map<string, SymbolKind>;
}

export interface ModelAnalysis {
  problems: Problem[];
  /** Present only when there is no error. */
  model?: AnalyzedModel;
}

const KNOWN: Record<string, readonly string[]> = {
  model: ['format', 'id', 'title', 'description', 'timeOrigin', 'conserved', 'parameters', 'forcings', 'states', 'derived', 'flows', 'notes', 'version'],
  conserved: ['element', 'unit'],
  parameters: ['id', 'value', 'unit', 'label', 'range', 'source', 'description'],
  forcings: ['id', 'unit', 'label', 'table', 'interpolation', 'period', 'expression', 'source', 'description'],
  states: ['id', 'unit', 'initial', 'size', 'label', 'zone', 'initialRange', 'conserved', 'description'],
  derived: ['id', 'expression', 'unit', 'label', 'report', 'role', 'description', 'source'],
  flows: ['id', 'from', 'to', 'rate', 'label', 'role', 'description', 'source'],
  range: ['min', 'max', 'distribution'],
  table: ['t', 'v']
};

const DAY_SECONDS = 86400;
const TIME_DIMS = [0, 0, 1, 0, 0, 0, 0, 0, 0];
const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;

export function isIsoDate(s: unknown): s is string {
  if (typeof s !== 'string' || !ISO_DATE.test(s)) return false;
  const d = new Date(s + 'T00:00:00Z');
  return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function checkUnknown(p: ProblemList, obj: Record<string, unknown>, section: string, path: string, id?: string) {
  const known = KNOWN[section];
  for (const key of Object.keys(obj)) {
    if (!known.includes(key)) {
      const near = nearest(key, known);
      p.warning(
        'unknown_field',
        path ? `${path}.${key}` : key,
        `unknown field '${key}'${near ? `; did you mean '${near}'?` : ` (known: ${known.join(', ')})`}`,
        id
      );
    }
  }
}

function finite(v: unknown): v is number {
  return typeof v === 'number' && Number.isFinite(v);
}

export function validateModel(doc: unknown): Problem[] {
  return analyzeModel(doc).problems;
}

export function analyzeModel(doc: unknown): ModelAnalysis {
  const p = new ProblemList('model');
  if (!isObject(doc)) {
    p.error('not_an_object', '', `a model document must be a JSON object, got ${describe(doc)}`);
    return { problems: p.items };
  }
  const shape = plainJsonProblem(doc);
  if (shape) {
    p.error('not_plain_json', shape.path, shape.message);
    return { problems: p.items };
  }
  checkUnknown(p, doc, 'model', '');
  if (doc.format === undefined) p.error('missing_field', 'format', `missing 'format' (expected '${MODEL_FORMAT}')`);
  else if (doc.format !== MODEL_FORMAT)
    p.error('wrong_format', 'format', `format is ${describe(doc.format)}, expected '${MODEL_FORMAT}'`);
  if (doc.id === undefined) p.error('missing_field', 'id', "missing 'id'");
  else {
    const why = idProblem(doc.id);
    if (why) p.error('invalid_id', 'id', why);
  }
  if (doc.timeOrigin !== undefined && !isIsoDate(doc.timeOrigin))
    p.error('invalid_date', 'timeOrigin', `timeOrigin must be an ISO date like 2027-01-01, got ${describe(doc.timeOrigin)}`);

  // conserved
  let conserved: UnitInfo | null = null;
  if (!isObject(doc.conserved)) {
    p.error('missing_field', 'conserved', "missing 'conserved' ({ \"element\": \"P\", \"unit\": \"kg\" })");
  } else {
    checkUnknown(p, doc.conserved, 'conserved', 'conserved');
    if (typeof doc.conserved.element !== 'string' || !doc.conserved.element)
      p.error('missing_field', 'conserved.element', "missing 'conserved.element' (the element the books are kept in, e.g. P)");
    conserved = unitOf(p, doc.conserved.unit, 'conserved.unit');
  }

  const kinds = new Map<string, SymbolKind>();
  const firstPath = new Map<string, string>();
  const claim = (id: string, kind: SymbolKind, path: string) => {
    const prev = firstPath.get(id);
    if (prev !== undefined) {
      p.error('duplicate_id', `${path}.id`, `duplicate id '${id}': already used at ${prev}; ids are unique across all symbols of a model`, id);
      return false;
    }
    kinds.set(id, kind);
    firstPath.set(id, `${path}`);
    return true;
  };

  const indexOf = new WeakMap<object, number>();
  const list = (key: string, required: boolean): Record<string, unknown>[] => {
    const v = doc[key];
    if (v === undefined) {
      if (required) p.error('missing_field', key, `missing '${key}' (a list)`);
      return [];
    }
    if (!Array.isArray(v)) {
      p.error('not_a_list', key, `'${key}' must be a list of objects with an id, got ${describe(v)}`);
      return [];
    }
    const out: Record<string, unknown>[] = [];
    v.forEach((item, i) => {
      if (!isObject(item)) p.error('not_an_object', `${key}[${i}]`, `each entry must be an object, got ${describe(item)}`);
      else {
        indexOf.set(item, i);
        out.push(item);
      }
    });
    return out;
  };
  const idx = (o: Record<string, unknown>) => indexOf.get(o) as number;
  const entries = list;

  const rawParams = entries('parameters', true);
  const rawForcings = entries('forcings', false);
  const rawStates = entries('states', true);
  const rawDerived = entries('derived', false);
  const rawFlows = entries('flows', true);

  const idOf = (o: Record<string, unknown>, path: string, kind: SymbolKind): string | null => {
    if (o.id === undefined) {
      p.error('missing_field', `${path}.id`, "missing 'id'");
      return null;
    }
    const why = idProblem(o.id);
    if (why) {
      p.error('invalid_id', `${path}.id`, why, typeof o.id === 'string' ? o.id : undefined);
      return null;
    }
    return claim(o.id as string, kind, path) ? (o.id as string) : null;
  };

  // ---- parameters
  const parameters: AParameter[] = [];
  for (const o of rawParams) {
    const path = `parameters[${idx(o)}]`;
    checkUnknown(p, o, 'parameters', path, o.id as string);
    const id = idOf(o, path, 'parameter');
    const unit = unitOf(p, o.unit, `${path}.unit`, id ?? undefined);
    if (o.value === undefined) p.error('missing_field', `${path}.value`, "missing 'value'", id ?? undefined);
    else if (!finite(o.value)) p.error('not_a_number', `${path}.value`, `value must be a finite number, got ${describe(o.value)}`, id ?? undefined);
    checkRange(p, o.range, `${path}.range`, id ?? undefined, finite(o.value) ? o.value : undefined);
    if (id && unit && finite(o.value)) parameters.push({ id, index: parameters.length, value: o.value, unit, si: o.value * unit.si });
  }

  // ---- forcings (structure; expressions below)
  const forcings: AForcing[] = [];
  const forcingExpr: { f: AForcing; src: unknown; path: string }[] = [];
  for (const o of rawForcings) {
    const path = `forcings[${idx(o)}]`;
    checkUnknown(p, o, 'forcings', path, o.id as string);
    const id = idOf(o, path, 'forcing');
    const unit = unitOf(p, o.unit, `${path}.unit`, id ?? undefined);
    const hasT = o.table !== undefined;
    const hasE = o.expression !== undefined;
    if (hasT === hasE) {
      p.error('forcing_source', path, `a forcing needs exactly one of 'table' and 'expression'`, id ?? undefined);
      continue;
    }
    if (!id || !unit) continue;
    const f: AForcing = { id, index: forcings.length, unit };
    if (hasT) {
      const tab = checkTable(p, o, path, id);
      if (tab) f.table = tab;
      else continue;
    } else {
      forcingExpr.push({ f, src: o.expression, path: `${path}.expression` });
    }
    forcings.push(f);
  }

  // ---- states
  const states: AState[] = [];
  const stateSize: { s: AState; src: unknown; path: string }[] = [];
  for (const o of rawStates) {
    const path = `states[${idx(o)}]`;
    checkUnknown(p, o, 'states', path, o.id as string);
    const id = idOf(o, path, 'state');
    const unit = unitOf(p, o.unit, `${path}.unit`, id ?? undefined);
    if (o.initial === undefined) p.error('missing_field', `${path}.initial`, "missing 'initial' (the starting value)", id ?? undefined);
    else if (!finite(o.initial)) p.error('not_a_number', `${path}.initial`, `initial must be a finite number, got ${describe(o.initial)}`, id ?? undefined);
    if (o.size === undefined) p.error('missing_field', `${path}.size`, "missing 'size' (an expression of parameters: the volume or area the state fills)", id ?? undefined);
    if (o.conserved !== undefined && typeof o.conserved !== 'boolean') p.error('not_a_boolean', `${path}.conserved`, 'conserved must be true or false', id ?? undefined);
    if (o.zone !== undefined && typeof o.zone !== 'string') p.error('not_a_string', `${path}.zone`, 'zone must be a word', id ?? undefined);
    checkRange(p, o.initialRange, `${path}.initialRange`, id ?? undefined, finite(o.initial) ? o.initial : undefined);
    if (!id || !unit || !finite(o.initial)) continue;
    const s: AState = { id, index: states.length, unit, initial: o.initial, sizeIr: { k: 'num', v: 1 }, sizeUnit: null, conserved: o.conserved !== false };
    states.push(s);
    if (o.size !== undefined) stateSize.push({ s, src: o.size, path: `${path}.size` });
  }
  if (rawStates.length === 0 && Array.isArray(doc.states)) p.error('no_states', 'states', 'a model needs at least one state');

  // ---- derived (structure)
  const derivedRaw: { d: ADerived; src: unknown; path: string }[] = [];
  for (const o of rawDerived) {
    const path = `derived[${idx(o)}]`;
    checkUnknown(p, o, 'derived', path, o.id as string);
    const id = idOf(o, path, 'derived');
    const unit = unitOf(p, o.unit, `${path}.unit`, id ?? undefined);
    if (o.expression === undefined) p.error('missing_field', `${path}.expression`, "missing 'expression'", id ?? undefined);
    if (o.report !== undefined && typeof o.report !== 'boolean') p.error('not_a_boolean', `${path}.report`, 'report must be true or false', id ?? undefined);
    if (!id || !unit || o.expression === undefined) continue;
    derivedRaw.push({
      d: { id, index: -1, unit, ir: { k: 'num', v: 0 }, report: o.report === true, role: typeof o.role === 'string' ? o.role : undefined },
      src: o.expression,
      path: `${path}.expression`
    });
  }

  // ---- flows (structure)
  const flowIds: string[] = [];
  for (const o of rawFlows) {
    const path = `flows[${idx(o)}]`;
    const id = idOf(o, path, 'flow');
    if (id) flowIds.push(id);
  }

  // ---- symbol table for expressions
  const symUnit = new Map<string, SymbolUnit>();
  for (const x of parameters) symUnit.set(x.id, { info: x.unit, value: x.si });
  for (const x of forcings) symUnit.set(x.id, { info: x.unit });
  for (const x of states) symUnit.set(x.id, { info: x.unit });
  for (const x of derivedRaw) symUnit.set(x.d.id, { info: x.d.unit });

  const allowedFor = (allowed: SymbolKind[]) => (name: string) => {
    const k = kinds.get(name);
    return k !== undefined && allowed.includes(k);
  };

  /** Parses, checks symbols and infers the unit; reports at `path`. */
  const expression = (
    src: unknown,
    path: string,
    id: string | undefined,
    allowed: SymbolKind[],
    context: string
  ): { ir: Ir; inferred: ReturnType<typeof inferUnits> } | null => {
    if (typeof src !== 'string') {
      p.error('not_an_expression', path, `must be an expression (text), got ${describe(src)}`, id);
      return null;
    }
    const r = parseExpression(src);
    if (!r.ok) {
      for (const issue of r.issues) p.error(issue.code, path, `${context}: ${issue.message}`, id);
      return null;
    }
    let bad = false;
    const ok = allowedFor(allowed);
    for (const name of symbolsOf(r.ir)) {
      if (name === 't' || name === 'pi' || name === 'e') continue;
      if (ok(name)) continue;
      bad = true;
      const k = kinds.get(name);
      if (k) {
        p.error('symbol_not_allowed', path, `${context}: \`${name}\` is a ${k} and cannot be used here (allowed: ${allowed.join('s, ')}s${allowed.includes('parameter') ? ', t' : ''})`, id);
      } else {
        const candidates = [...kinds.entries()].filter(([, kk]) => allowed.includes(kk)).map(([n]) => n);
        p.error('unknown_symbol', path, `${context}: unknown symbol \`${name}\`${didYouMean(name, candidates)}`, id);
      }
    }
    if (bad) return null;
    const issues: { code: string; message: string }[] = [];
    const inferred = inferUnits(r.ir, (n) => symUnit.get(n), issues);
    for (const issue of issues) p.error(issue.code, path, `${context}: ${issue.message}`, id);
    if (!inferred) return null;
    return { ir: r.ir, inferred };
  };

  const expectUnit = (
    got: NonNullable<ReturnType<typeof inferUnits>>,
    want: number[],
    wantText: string,
    path: string,
    id: string,
    what: string
  ) => {
    if (!sameDims(got.dims, want)) {
      p.error('unit_mismatch', path, `${what} has the unit ${describeUnit(got)}, but must be in ${wantText}`, id);
      return false;
    }
    return true;
  };

  for (const { f, src, path } of forcingExpr) {
    const r = expression(src, path, f.id, ['parameter'], `forcing \`${f.id}\``);
    if (r && expectUnit(r.inferred!, f.unit.dims, f.unit.text, path, f.id, `the expression of forcing \`${f.id}\``)) f.ir = r.ir;
  }
  for (const { s, src, path } of stateSize) {
    const r = expression(src, path, s.id, ['parameter'], `size of state \`${s.id}\``);
    if (!r) continue;
    s.sizeIr = r.ir;
    const dims = r.inferred!.dims;
    s.sizeUnit = { text: describeUnit(r.inferred!), dims, si: 1, unit: r.inferred!.unit };
    const sizeValue = evaluateIr(r.ir, (n) => symUnit.get(n)?.value ?? NaN);
    if (!(sizeValue > 0)) p.error('size_not_positive', path, `size of state \`${s.id}\` evaluates to ${sizeValue}; it must be positive`, s.id);
    if (s.conserved && conserved) {
      const amount = s.unit.dims.map((x, i) => x + dims[i]);
      if (!sameDims(amount, conserved.dims)) {
        p.error(
          'unit_mismatch',
          path,
          `state \`${s.id}\` in ${s.unit.text} times its size (${describeUnit(r.inferred!)}) is not an amount of ${conserved.text}: a concentration needs a volume, an areal density an area`,
          s.id
        );
      }
    }
  }

  // derived: parse, then order by dependencies, reporting cycles
  const derivedOk: ADerived[] = [];
  const deps = new Map<string, string[]>();
  for (const x of derivedRaw) {
    const r = expression(x.src, x.path, x.d.id, ['parameter', 'forcing', 'state', 'derived'], `derived \`${x.d.id}\``);
    if (!r) continue;
    if (!expectUnit(r.inferred!, x.d.unit.dims, x.d.unit.text, x.path, x.d.id, `the expression of \`${x.d.id}\``)) continue;
    x.d.ir = r.ir;
    derivedOk.push(x.d);
    deps.set(x.d.id, [...symbolsOf(r.ir)].filter((n) => kinds.get(n) === 'derived'));
  }
  const ordered = orderDerived(p, derivedOk, deps, new Map(derivedRaw.map((x) => [x.d.id, x.path])));

  // flows
  const stateIndex = new Map(states.map((s) => [s.id, s.index]));
  const stateIds = states.map((s) => s.id);
  const flows: AFlow[] = [];
  for (const o of rawFlows) {
    const path = `flows[${idx(o)}]`;
    const id = typeof o.id === 'string' ? o.id : undefined;
    checkUnknown(p, o, 'flows', path, id);
    if (!id || idProblem(id)) continue;
    const end = (key: 'from' | 'to'): number | undefined | null => {
      const v = o[key];
      if (v === undefined) return undefined;
      if (typeof v !== 'string' || !stateIndex.has(v)) {
        const k = typeof v === 'string' ? kinds.get(v) : undefined;
        // A state with errors of its own is reported there; its flows are not checked further.
        if (k === 'state') return null;
        p.error(
          'unknown_state',
          `${path}.${key}`,
          k
            ? `'${v}' is a ${k}, not a state (states: ${stateIds.join(', ')})`
            : `unknown state ${quote(v)}${typeof v === 'string' ? didYouMean(v, stateIds) : ''} (states: ${stateIds.join(', ')})`,
          id
        );
        return null;
      }
      return stateIndex.get(v);
    };
    const from = end('from');
    const to = end('to');
    if (from === null || to === null) continue;
    if (from === undefined && to === undefined) {
      p.error('flow_no_end', path, `flow \`${id}\` needs a 'from' state, a 'to' state, or both`, id);
      continue;
    }
    if (from !== undefined && from === to) {
      p.error('flow_self', path, `flow \`${id}\` goes from \`${stateIds[from]}\` to itself`, id);
      continue;
    }
    if (from !== undefined && to !== undefined && states[from].conserved !== states[to].conserved) {
      p.error(
        'flow_mixed_conservation',
        path,
        `flow \`${id}\` links \`${states[from].id}\` (${states[from].conserved ? 'conserved' : 'not conserved'}) and \`${states[to].id}\` (${states[to].conserved ? 'conserved' : 'not conserved'}); mass cannot move between the books and outside them`,
        id
      );
      continue;
    }
    if (o.rate === undefined) {
      p.error('missing_field', `${path}.rate`, "missing 'rate'", id);
      continue;
    }
    const r = expression(o.rate, `${path}.rate`, id, ['parameter', 'forcing', 'state', 'derived'], `flow \`${id}\``);
    if (!r) continue;
    const basis = (from ?? to) as number;
    const bu = states[basis].unit;
    const want = bu.dims.map((x, i) => x - TIME_DIMS[i]);
    if (!expectUnit(r.inferred!, want, `${bu.text}/d (the unit of \`${states[basis].id}\` per day)`, `${path}.rate`, id, `the rate of flow \`${id}\``)) continue;
    flows.push({ id, index: flows.length, from, to, basis, ir: r.ir, role: typeof o.role === 'string' ? o.role : undefined });
  }

  const model: AnalyzedModel | undefined =
    p.hasErrors || !conserved
      ? undefined
      : { doc: doc as unknown as ModelDoc, conserved, parameters, forcings, states, derived: ordered, flows, kinds };
  return { problems: p.items, model };
}

function unitOf(p: ProblemList, v: unknown, path: string, id?: string): UnitInfo | null {
  if (v === undefined) {
    p.error('missing_field', path, "missing 'unit' (write 1 for dimensionless)", id);
    return null;
  }
  if (typeof v !== 'string') {
    p.error('invalid_unit', path, `unit must be text such as mg/m^3, got ${describe(v)}`, id);
    return null;
  }
  const u = parseUnit(v);
  if ('error' in u) {
    p.error('invalid_unit', path, u.error, id);
    return null;
  }
  return u;
}

function checkRange(p: ProblemList, r: unknown, path: string, id: string | undefined, value: number | undefined) {
  if (r === undefined) return;
  if (!isObject(r)) {
    p.error('invalid_range', path, `range must be { "min": …, "max": …, "distribution": … }, got ${describe(r)}`, id);
    return;
  }
  checkUnknown(p, r, 'range', path, id);
  if (!finite(r.min) || !finite(r.max)) {
    p.error('invalid_range', path, 'range needs finite numbers min and max', id);
    return;
  }
  if (r.min > r.max) p.error('invalid_range', path, `range min ${r.min} is above max ${r.max}`, id);
  const dist = r.distribution ?? 'uniform';
  if (!['uniform', 'triangular', 'loguniform'].includes(dist as string))
    p.error('invalid_range', `${path}.distribution`, `unknown distribution ${describe(dist)} (uniform, triangular, loguniform)`, id);
  if (dist === 'loguniform' && !(r.min > 0)) p.error('invalid_range', path, 'a loguniform range needs min > 0', id);
  if (value !== undefined && (value < r.min || value > r.max))
    p.warning('value_outside_range', path, `the value ${value} lies outside its range [${r.min}, ${r.max}]`, id);
}

function checkTable(p: ProblemList, o: Record<string, unknown>, path: string, id: string): AForcing['table'] | null {
  const t = o.table;
  if (!isObject(t)) {
    p.error('invalid_table', `${path}.table`, `table must be { "t": [...], "v": [...] }, got ${describe(t)}`, id);
    return null;
  }
  checkUnknown(p, t, 'table', `${path}.table`, id);
  const tt = t.t;
  const tv = t.v;
  if (!Array.isArray(tt) || !Array.isArray(tv)) {
    p.error('invalid_table', `${path}.table`, "table needs lists 't' (days) and 'v' (values)", id);
    return null;
  }
  let ok = true;
  if (tt.length === 0) {
    p.error('invalid_table', `${path}.table.t`, 'the table is empty', id);
    ok = false;
  }
  if (tt.length !== tv.length) {
    p.error('invalid_table', `${path}.table`, `'t' has ${tt.length} entries but 'v' has ${tv.length}`, id);
    ok = false;
  }
  tt.forEach((x, i) => {
    if (!finite(x)) {
      p.error('not_a_number', `${path}.table.t[${i}]`, `time must be a finite number, got ${describe(x)}`, id);
      ok = false;
    } else if (i > 0 && finite(tt[i - 1]) && x <= (tt[i - 1] as number)) {
      p.error('table_not_increasing', `${path}.table.t[${i}]`, `times must increase strictly: ${x} follows ${tt[i - 1]}`, id);
      ok = false;
    }
  });
  tv.forEach((x, i) => {
    if (!finite(x)) {
      p.error('not_a_number', `${path}.table.v[${i}]`, `value must be a finite number, got ${describe(x)}`, id);
      ok = false;
    }
  });
  const interp = o.interpolation ?? 'linear';
  if (interp !== 'linear' && interp !== 'step') {
    p.error('invalid_interpolation', `${path}.interpolation`, `interpolation must be 'linear' or 'step', got ${describe(interp)}`, id);
    ok = false;
  }
  let period: number | undefined;
  if (o.period !== undefined) {
    if (!finite(o.period) || o.period <= 0) {
      p.error('invalid_period', `${path}.period`, `period must be a positive number of days, got ${describe(o.period)}`, id);
      ok = false;
    } else if (ok && (tt[tt.length - 1] as number) - (tt[0] as number) > o.period) {
      p.error('invalid_period', `${path}.period`, `the table spans more than its period of ${o.period} days`, id);
      ok = false;
    } else period = o.period;
  }
  return ok ? { t: tt as number[], v: tv as number[], step: interp === 'step', period } : null;
}

function orderDerived(
  p: ProblemList,
  items: ADerived[],
  deps: Map<string, string[]>,
  paths: Map<string, string>
): ADerived[] {
  const byId = new Map(items.map((d) => [d.id, d]));
  const state = new Map<string, 0 | 1 | 2>();
  const out: ADerived[] = [];
  const stack: string[] = [];
  const reported = new Set<string>();
  const visit = (id: string): boolean => {
    const s = state.get(id);
    if (s === 2) return true;
    if (s === 1) {
      const cycle = stack.slice(stack.indexOf(id)).concat(id);
      if (!reported.has(id)) {
        cycle.forEach((c) => reported.add(c));
        p.error('dependency_cycle', paths.get(id) ?? 'derived', `derived quantities depend on each other in a circle: ${cycle.join(' → ')}`, id);
      }
      return false;
    }
    const d = byId.get(id);
    if (!d) return false; // a derived with its own errors
    state.set(id, 1);
    stack.push(id);
    let ok = true;
    for (const dep of deps.get(id) ?? []) if (!visit(dep)) ok = false;
    stack.pop();
    state.set(id, 2);
    if (ok) {
      d.index = out.length;
      out.push(d);
    }
    return ok;
  };
  for (const d of items) visit(d.id);
  return out;
}

export { isDimensionless, DAY_SECONDS };
