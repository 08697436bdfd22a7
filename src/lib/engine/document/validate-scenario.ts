/**
 * Validates a scenario document against its model: period, solver settings, measures
 * (targets exist and are of the right kind, dates inside or outside the period), costs.
 */
import { plainJsonProblem } from './json';
import { SCENARIO_FORMAT, type ModelDoc, type Problem } from './types';
import { ProblemList, didYouMean, nearest } from './problems';
import { describe, idProblem, quote } from './ids';
import { isIsoDate } from './validate-model';

const KNOWN: Record<string, readonly string[]> = {
  scenario: ['format', 'id', 'title', 'model', 'period', 'initialState', 'solver', 'measures', 'costs', 'notes', 'description'],
  period: ['start', 'end', 'outputStep'],
  solver: ['method', 'rtol', 'atol', 'maxStep', 'maxSteps'],
  costs: ['measure', 'amount', 'currency', 'note'],
  repeat: ['count', 'everyYears', 'everyDays']
};

const MEASURE_FIELDS: Record<string, readonly string[]> = {
  scale: ['id', 'kind', 'label', 'target', 'factor', 'from', 'until', 'rampDays', 'note'],
  offset: ['id', 'kind', 'label', 'target', 'amount', 'from', 'until', 'rampDays', 'note'],
  set: ['id', 'kind', 'label', 'target', 'value', 'from', 'until', 'note'],
  remove: ['id', 'kind', 'label', 'state', 'fraction', 'on', 'repeat', 'note'],
  add: ['id', 'kind', 'label', 'state', 'amount', 'on', 'repeat', 'note'],
  transfer: ['id', 'kind', 'label', 'state', 'into', 'fraction', 'on', 'repeat', 'note']
};

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}
const finite = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

function unknownFields(p: ProblemList, o: Record<string, unknown>, known: readonly string[], path: string, id?: string) {
  for (const k of Object.keys(o)) {
    if (known.includes(k)) continue;
    const near = nearest(k, known);
    p.warning('unknown_field', path ? `${path}.${k}` : k, `unknown field '${k}'${near ? `; did you mean '${near}'?` : ` (known: ${known.join(', ')})`}`, id);
  }
}

/** Day number of an ISO date (days since 1970-01-01, UTC). */
export function dayNumber(iso: string): number {
  return Math.round(Date.parse(iso + 'T00:00:00Z') / 86400000);
}

/** The id of a stored run: `run_` and the first 16 hex digits of its digest. */
export const RUN_ID_PATTERN = /^run_[0-9a-f]{16}$/;

export function validateScenario(doc: unknown, model: ModelDoc): Problem[] {
  const p = new ProblemList('scenario');
  if (!isObject(doc)) {
    p.error('not_an_object', '', `a scenario document must be a JSON object, got ${describe(doc)}`);
    return p.items;
  }
  const shape = plainJsonProblem(doc);
  if (shape) {
    p.error('not_plain_json', shape.path, shape.message);
    return p.items;
  }
  unknownFields(p, doc, KNOWN.scenario, '');
  if (doc.format === undefined) p.error('missing_field', 'format', `missing 'format' (expected '${SCENARIO_FORMAT}')`);
  else if (doc.format !== SCENARIO_FORMAT) p.error('wrong_format', 'format', `format is ${describe(doc.format)}, expected '${SCENARIO_FORMAT}'`);
  if (doc.id === undefined) p.error('missing_field', 'id', "missing 'id'");
  else {
    const why = idProblem(doc.id);
    if (why) p.error('invalid_id', 'id', why);
  }
  if (doc.model === undefined) p.error('missing_field', 'model', "missing 'model' (the id of the model it runs)");
  else if (doc.model !== model.id) p.error('wrong_model', 'model', `the scenario is for model '${String(doc.model)}', not '${model.id}'`);

  let start: number | undefined;
  let end: number | undefined;
  if (!isObject(doc.period)) p.error('missing_field', 'period', "missing 'period' ({ \"start\": \"2027-01-01\", \"end\": \"2047-01-01\" })");
  else {
    const per = doc.period;
    unknownFields(p, per, KNOWN.period, 'period');
    for (const k of ['start', 'end'] as const) {
      if (per[k] === undefined) p.error('missing_field', `period.${k}`, `missing 'period.${k}' (an ISO date)`);
      else if (!isIsoDate(per[k])) p.error('invalid_date', `period.${k}`, `period.${k} must be an ISO date like 2027-01-01, got ${describe(per[k])}`);
    }
    if (isIsoDate(per.start)) start = dayNumber(per.start);
    if (isIsoDate(per.end)) end = dayNumber(per.end);
    if (start !== undefined && end !== undefined && end <= start) p.error('invalid_period', 'period', `the period ends (${per.end}) before or when it starts (${per.start})`);
    if (per.outputStep !== undefined && (!finite(per.outputStep) || per.outputStep <= 0))
      p.error('invalid_output_step', 'period.outputStep', `outputStep must be a positive number of days, got ${describe(per.outputStep)}`);
  }
  if (doc.initialState !== undefined && typeof doc.initialState !== 'string')
    p.error('invalid_initial_state', 'initialState', "initialState must be 'model', 'settled' or the id of a stored run");
  else if (doc.initialState === 'settled')
    p.error('unsupported_initial_state', 'initialState', "initialState 'settled' is not supported yet; use 'model' or the id of a stored run (spin-up)");
  else if (doc.initialState !== undefined && doc.initialState !== 'model' && !RUN_ID_PATTERN.test(doc.initialState))
    p.error('invalid_initial_state', 'initialState', `initialState must be 'model' or the id of a stored run (run_ and 16 hex digits), got ${describe(doc.initialState)}`);

  if (doc.solver !== undefined) {
    if (!isObject(doc.solver)) p.error('invalid_solver', 'solver', 'solver must be an object');
    else {
      const s = doc.solver;
      unknownFields(p, s, KNOWN.solver, 'solver');
      if (s.method !== undefined && !['auto', 'odex', 'stiff', 'dp54'].includes(s.method as string))
        p.error('invalid_solver', 'solver.method', `method must be auto, odex, dp54 or stiff, got ${describe(s.method)}`);
      for (const k of ['rtol', 'atol', 'maxStep'] as const) {
        if (s[k] !== undefined && (!finite(s[k]) || (s[k] as number) <= 0)) p.error('invalid_solver', `solver.${k}`, `${k} must be a positive number, got ${describe(s[k])}`);
      }
      if (s.rtol !== undefined && finite(s.rtol) && (s.rtol < 1e-14 || s.rtol >= 1)) p.error('invalid_solver', 'solver.rtol', `rtol ${s.rtol} is outside the sensible range 1e-14 to 0.1`);
      if (s.maxSteps !== undefined && (!Number.isInteger(s.maxSteps) || (s.maxSteps as number) < 1)) p.error('invalid_solver', 'solver.maxSteps', `maxSteps must be a positive whole number, got ${describe(s.maxSteps)}`);
    }
  }

  const params = new Set(model.parameters.map((x) => x.id));
  const forcings = new Set((model.forcings ?? []).map((x) => x.id));
  const states = new Set(model.states.map((x) => x.id));
  const sizeParams = new Set<string>();
  for (const s of model.states) for (const m of String(s.size).matchAll(/[A-Za-z_][A-Za-z0-9_]*/g)) sizeParams.add(m[0]);
  const measureIds = new Set<string>();

  if (doc.measures !== undefined && !Array.isArray(doc.measures)) p.error('not_a_list', 'measures', 'measures must be a list');
  const measures = Array.isArray(doc.measures) ? doc.measures : [];
  measures.forEach((m, i) => {
    const path = `measures[${i}]`;
    if (!isObject(m)) {
      p.error('not_an_object', path, `a measure must be an object, got ${describe(m)}`);
      return;
    }
    const id = m.id === undefined ? `m${i + 1}` : m.id;
    if (m.id !== undefined) {
      const why = idProblem(m.id);
      if (why) p.error('invalid_id', `${path}.id`, why);
    }
    if (typeof id === 'string') {
      if (measureIds.has(id)) p.error('duplicate_id', `${path}.id`, `duplicate measure id '${id}'`, id);
      measureIds.add(id);
    }
    const mid = typeof id === 'string' ? id : undefined;
    const kind = m.kind;
    if (typeof kind !== 'string' || !(kind in MEASURE_FIELDS)) {
      p.error('invalid_measure', `${path}.kind`, `unknown measure kind ${quote(kind)} (${Object.keys(MEASURE_FIELDS).join(', ')})${typeof kind === 'string' ? didYouMean(kind, Object.keys(MEASURE_FIELDS)) : ''}`, mid);
      return;
    }
    unknownFields(p, m, MEASURE_FIELDS[kind], path, mid);
    const date = (k: string, required: boolean) => {
      if (m[k] === undefined) {
        if (required) p.error('missing_field', `${path}.${k}`, `missing '${k}' (an ISO date)`, mid);
        return;
      }
      if (!isIsoDate(m[k])) {
        p.error('invalid_date', `${path}.${k}`, `${k} must be an ISO date like 2029-01-01, got ${describe(m[k])}`, mid);
        return;
      }
      const d = dayNumber(m[k] as string);
      if (start !== undefined && end !== undefined && end > start && (d < start || d > end))
        p.warning('measure_outside_period', `${path}.${k}`, `${k} ${m[k]} lies outside the period; the measure ${d > end ? 'never takes effect' : 'is already in force at the start'}`, mid);
      return d;
    };
    const num = (k: string, check: (v: number) => string | null) => {
      if (m[k] === undefined) {
        p.error('missing_field', `${path}.${k}`, `missing '${k}'`, mid);
        return;
      }
      if (!finite(m[k])) {
        p.error('not_a_number', `${path}.${k}`, `${k} must be a finite number, got ${describe(m[k])}`, mid);
        return;
      }
      const why = check(m[k] as number);
      if (why) p.error('invalid_measure', `${path}.${k}`, why, mid);
    };
    const target = () => {
      const t = m.target;
      if (t === undefined) return p.error('missing_field', `${path}.target`, "missing 'target' (a parameter or forcing id)", mid);
      if (typeof t === 'string' && states.has(t)) {
        return p.error('unknown_target', `${path}.target`, `'${t}' is a state; ${kind} changes a parameter or forcing (a state changes with remove, add or transfer)`, mid);
      }
      if (typeof t !== 'string' || (!params.has(t) && !forcings.has(t))) {
        const cands = [...params, ...forcings];
        return p.error('unknown_target', `${path}.target`, `unknown parameter or forcing ${quote(t)}${typeof t === 'string' ? didYouMean(t, cands) : ''}`, mid);
      }
      if (sizeParams.has(t) && params.has(t)) p.error('measure_on_size', `${path}.target`, `'${t}' sets the size of a state; sizes are constant and cannot be changed by a measure`, mid);
      if (kind === 'set' && forcings.has(t)) p.error('invalid_measure', `${path}.target`, `'set' replaces a parameter; '${t}' is a forcing (use scale or offset)`, mid);
    };
    const state = (k: 'state' | 'into') => {
      const s = m[k];
      if (s === undefined) return p.error('missing_field', `${path}.${k}`, `missing '${k}' (a state id)`, mid);
      if (typeof s !== 'string' || !states.has(s))
        return p.error('unknown_state', `${path}.${k}`, `unknown state ${quote(s)}${typeof s === 'string' ? didYouMean(s, states) : ''} (states: ${[...states].join(', ')})`, mid);
    };
    let from: number | undefined;
    let until: number | undefined;
    switch (kind) {
      case 'scale':
      case 'offset':
      case 'set':
        target();
        if (kind === 'scale') num('factor', (v) => (v < 0 ? `factor ${v} is negative` : null));
        if (kind === 'offset') num('amount', () => null);
        if (kind === 'set') num('value', () => null);
        from = date('from', true);
        until = date('until', false);
        if (from !== undefined && until !== undefined && until <= from) p.error('invalid_measure', `${path}.until`, `until (${m.until}) must come after from (${m.from})`, mid);
        if (m.rampDays !== undefined) {
          if (kind === 'set') p.error('invalid_measure', `${path}.rampDays`, "'set' is a step change and has no ramp", mid);
          else if (!finite(m.rampDays) || m.rampDays < 0) p.error('invalid_measure', `${path}.rampDays`, `rampDays must be a number of days ≥ 0, got ${describe(m.rampDays)}`, mid);
        }
        break;
      case 'remove':
      case 'transfer':
        state('state');
        if (kind === 'transfer') {
          state('into');
          if (m.state === m.into && m.state !== undefined) p.error('invalid_measure', `${path}.into`, 'a transfer needs two different states', mid);
          const a = model.states.find((s) => s.id === m.state);
          const b = model.states.find((s) => s.id === m.into);
          if (a && b && (a.conserved !== false) !== (b.conserved !== false))
            p.error('invalid_measure', `${path}.into`, `a transfer cannot move mass between a conserved and a non-conserved state`, mid);
        }
        num('fraction', (v) => (v < 0 || v > 1 ? `fraction ${v} must lie between 0 and 1` : null));
        date('on', true);
        break;
      case 'add':
        state('state');
        num('amount', (v) => (v < 0 ? `amount ${v} is negative (use remove to take mass out)` : null));
        date('on', true);
        break;
    }
    if (m.repeat !== undefined) {
      if (!['remove', 'add', 'transfer'].includes(kind)) p.error('invalid_measure', `${path}.repeat`, `only dated measures (remove, add, transfer) repeat`, mid);
      else if (!isObject(m.repeat)) p.error('invalid_measure', `${path}.repeat`, 'repeat must be { "count": …, "everyYears": … }', mid);
      else {
        const r = m.repeat;
        unknownFields(p, r, KNOWN.repeat, `${path}.repeat`, mid);
        if (!Number.isInteger(r.count) || (r.count as number) < 1) p.error('invalid_measure', `${path}.repeat.count`, `count must be a whole number ≥ 1, got ${describe(r.count)}`, mid);
        const hasY = r.everyYears !== undefined;
        const hasD = r.everyDays !== undefined;
        if (hasY === hasD) p.error('invalid_measure', `${path}.repeat`, 'repeat needs exactly one of everyYears and everyDays', mid);
        if (hasY && (!Number.isInteger(r.everyYears) || (r.everyYears as number) < 1)) p.error('invalid_measure', `${path}.repeat.everyYears`, `everyYears must be a whole number ≥ 1, got ${describe(r.everyYears)}`, mid);
        if (hasD && (!finite(r.everyDays) || (r.everyDays as number) <= 0)) p.error('invalid_measure', `${path}.repeat.everyDays`, `everyDays must be a positive number, got ${describe(r.everyDays)}`, mid);
      }
    }
  });

  if (doc.costs !== undefined && !Array.isArray(doc.costs)) p.error('not_a_list', 'costs', 'costs must be a list');
  (Array.isArray(doc.costs) ? doc.costs : []).forEach((c, i) => {
    const path = `costs[${i}]`;
    if (!isObject(c)) return p.error('not_an_object', path, 'a cost must be an object');
    unknownFields(p, c, KNOWN.costs, path);
    if (typeof c.measure !== 'string' || !measureIds.has(c.measure))
      p.error('unknown_measure', `${path}.measure`, `unknown measure ${quote(c.measure)}${typeof c.measure === 'string' ? didYouMean(c.measure, measureIds) : ''} (measures: ${[...measureIds].join(', ') || 'none'})`);
    if (!finite(c.amount) || c.amount < 0) p.error('not_a_number', `${path}.amount`, `amount must be a number ≥ 0, got ${describe(c.amount)}`);
    if (typeof c.currency !== 'string' || !/^[A-Z]{3}$/.test(c.currency)) p.error('invalid_currency', `${path}.currency`, `currency must be a three-letter code such as EUR, got ${describe(c.currency)}`);
  });
  return p.items;
}
