/**
 * What the scheme draws, read from a model document: the compartments grouped by zone,
 * the internal flows, the flows across the lake's boundary, what drives each flow and the
 * reported quantities. A pure function of the document, lenient on purpose: a draft with
 * errors is drawn as far as it can be, and what cannot be drawn is listed with the reason.
 */
import { parseExpression } from '$lib/engine/expr/parse';
import { symbolsOf } from '$lib/engine/expr/ir';

/** The zone of a state that names none. */
export const NO_ZONE = '';

export interface SchemeState {
  id: string;
  label?: string;
  /** As the model writes it. */
  unit: string;
  /** Key of its zone in `SchemeGraph.zones`. */
  zone: string;
  /** False: kept out of the mass inventory. */
  conserved: boolean;
}

export interface SchemeZone {
  /** Lower-case zone word (`water`), or NO_ZONE. */
  key: string;
  /** The word as the model first writes it, or `no zone`. */
  name: string;
  /** Ids of its states, in document order. */
  states: string[];
}

/** A forcing or parameter that a flow's rate reads. */
export interface Driver {
  id: string;
  kind: 'forcing' | 'parameter';
  label?: string;
  /** Read by the rate itself (not only through derived quantities). */
  direct: boolean;
  /** Derived quantities it is read through, in the order met. */
  via: string[];
}

export interface SchemeFlow {
  id: string;
  label?: string;
  /** `internal`: between two states; `import`: from outside to `to`; `export`: from `from` to outside. */
  kind: 'internal' | 'import' | 'export';
  from?: string;
  to?: string;
  rate: string;
  role?: string;
  /** Forcings first, then parameters read directly, then those read through derived quantities. */
  drivers: Driver[];
  /** Why the drivers could not be read (the rate does not parse), else absent. */
  rateProblem?: string;
}

export interface ReportedQuantity {
  id: string;
  label?: string;
  unit: string;
  expression: string;
  role?: string;
}

export interface Omission {
  kind: 'state' | 'flow';
  /** The item's id, or its position (`flows[4]`) when it has none. */
  id: string;
  reason: string;
}

export interface SchemeGraph {
  modelId: string;
  /** The conserved element and its unit, for the frame's label; null when the draft lacks them. */
  conserved: { element: string; unit: string } | null;
  zones: SchemeZone[];
  nodes: SchemeState[];
  /** Internal flows. */
  edges: SchemeFlow[];
  /** Imports and exports, in document order. */
  boundary: SchemeFlow[];
  reported: ReportedQuantity[];
  omitted: Omission[];
}

type Json = Record<string, unknown>;

function isObject(v: unknown): v is Json {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function list(doc: Json, key: string): unknown[] {
  const v = doc[key];
  return Array.isArray(v) ? v : [];
}

function str(v: unknown): string | undefined {
  return typeof v === 'string' && v.trim() !== '' ? v : undefined;
}

/** Symbols an expression reads, or the reason it cannot be read. */
function readsOf(expr: unknown): { symbols: Set<string> } | { problem: string } {
  if (typeof expr !== 'string') return { problem: 'the expression is missing' };
  const parsed = parseExpression(expr);
  if (!parsed.ok) return { problem: parsed.issues.map((i) => i.message).join('; ') };
  return { symbols: symbolsOf(parsed.ir) };
}

/** Reads a model document (valid or not) into what the scheme draws. */
export function schemeGraph(doc: unknown): SchemeGraph {
  const d: Json = isObject(doc) ? doc : {};
  const omitted: Omission[] = [];
  const conservedDoc = isObject(d.conserved) ? d.conserved : null;
  const conserved =
    conservedDoc && str(conservedDoc.element) && str(conservedDoc.unit)
      ? { element: conservedDoc.element as string, unit: conservedDoc.unit as string }
      : null;

  // Symbol tables (null-prototype: ids such as `constructor` must not hit Object's members).
  const parameters: Record<string, { label?: string }> = Object.create(null);
  const forcings: Record<string, { label?: string }> = Object.create(null);
  const derivedExpr: Record<string, unknown> = Object.create(null);
  for (const p of list(d, 'parameters')) if (isObject(p) && str(p.id)) parameters[p.id as string] ??= { label: str(p.label) };
  for (const f of list(d, 'forcings')) if (isObject(f) && str(f.id)) forcings[f.id as string] ??= { label: str(f.label) };
  for (const q of list(d, 'derived')) if (isObject(q) && str(q.id) && !((q.id as string) in derivedExpr)) derivedExpr[q.id as string] = q.expression;

  // States and zones.
  const nodes: SchemeState[] = [];
  const zones: SchemeZone[] = [];
  const zoneOf: Record<string, SchemeZone> = Object.create(null);
  const stateIds: Record<string, true> = Object.create(null);
  list(d, 'states').forEach((s, i) => {
    if (!isObject(s) || !str(s.id)) {
      omitted.push({ kind: 'state', id: `states[${i}]`, reason: 'it has no id' });
      return;
    }
    const id = s.id as string;
    if (stateIds[id]) {
      omitted.push({ kind: 'state', id, reason: 'its id is used by an earlier state' });
      return;
    }
    stateIds[id] = true;
    const word = str(s.zone)?.trim();
    const key = word ? word.toLowerCase() : NO_ZONE;
    let zone = zoneOf[key];
    if (!zone) {
      zone = { key, name: word ?? 'no zone', states: [] };
      zoneOf[key] = zone;
      zones.push(zone);
    }
    zone.states.push(id);
    nodes.push({ id, label: str(s.label), unit: str(s.unit) ?? '', zone: key, conserved: s.conserved !== false });
  });

  // What a derived quantity reads, transitively; memoised, cycles cut (a draft may have one).
  const derivedReads: Record<string, Set<string>> = Object.create(null);
  const visiting = new Set<string>();
  function readsOfDerived(id: string): Set<string> {
    if (derivedReads[id]) return derivedReads[id];
    if (visiting.has(id)) return new Set();
    visiting.add(id);
    const r = readsOf(derivedExpr[id]);
    const out = new Set<string>();
    if ('symbols' in r) for (const s of r.symbols) out.add(s);
    visiting.delete(id);
    derivedReads[id] = out;
    return out;
  }

  function driversOf(symbols: Set<string>): Driver[] {
    const found = new Map<string, Driver>();
    const note = (id: string, via: string | null) => {
      const kind = id in forcings ? 'forcing' : id in parameters ? 'parameter' : null;
      if (!kind) return;
      let dr = found.get(id);
      if (!dr) {
        dr = { id, kind, label: (kind === 'forcing' ? forcings : parameters)[id].label, direct: false, via: [] };
        found.set(id, dr);
      }
      if (via === null) dr.direct = true;
      else if (!dr.via.includes(via)) dr.via.push(via);
    };
    // Breadth-first through derived quantities, remembering the first derived each symbol is met through.
    const seen = new Set<string>();
    const queue: Array<{ id: string; via: string | null }> = [...symbols].map((id) => ({ id, via: null }));
    while (queue.length > 0) {
      const { id, via } = queue.shift()!;
      if (id in derivedExpr) {
        if (seen.has(id)) continue;
        seen.add(id);
        for (const s of readsOfDerived(id)) queue.push({ id: s, via: id });
      } else note(id, via);
    }
    const rank = (x: Driver) => (x.kind === 'forcing' ? 0 : x.direct ? 1 : 2);
    const order = new Map([...Object.keys(forcings), ...Object.keys(parameters)].map((id, i) => [id, i]));
    return [...found.values()].sort((a, b) => rank(a) - rank(b) || order.get(a.id)! - order.get(b.id)!);
  }

  // Flows.
  const edges: SchemeFlow[] = [];
  const boundary: SchemeFlow[] = [];
  const flowIds: Record<string, true> = Object.create(null);
  list(d, 'flows').forEach((f, i) => {
    if (!isObject(f) || !str(f.id)) {
      omitted.push({ kind: 'flow', id: `flows[${i}]`, reason: 'it has no id' });
      return;
    }
    const id = f.id as string;
    if (flowIds[id]) {
      omitted.push({ kind: 'flow', id, reason: 'its id is used by an earlier flow' });
      return;
    }
    const from = str(f.from);
    const to = str(f.to);
    const reason =
      !from && !to
        ? 'it has neither `from` nor `to`'
        : from && !stateIds[from]
          ? `\`from\` names no state (${from})`
          : to && !stateIds[to]
            ? `\`to\` names no state (${to})`
            : from === to
              ? 'it leaves and enters the same state'
              : null;
    if (reason) {
      omitted.push({ kind: 'flow', id, reason });
      return;
    }
    flowIds[id] = true;
    const r = readsOf(f.rate);
    const flow: SchemeFlow = {
      id,
      label: str(f.label),
      kind: from && to ? 'internal' : from ? 'export' : 'import',
      from,
      to,
      rate: typeof f.rate === 'string' ? f.rate : '',
      role: str(f.role),
      drivers: 'symbols' in r ? driversOf(r.symbols) : []
    };
    if ('problem' in r) flow.rateProblem = r.problem;
    (flow.kind === 'internal' ? edges : boundary).push(flow);
  });

  const reported: ReportedQuantity[] = [];
  for (const q of list(d, 'derived')) {
    if (!isObject(q) || !str(q.id) || q.report !== true) continue;
    reported.push({
      id: q.id as string,
      label: str(q.label),
      unit: str(q.unit) ?? '',
      expression: typeof q.expression === 'string' ? q.expression : '',
      role: str(q.role)
    });
  }

  return { modelId: str(d.id) ?? 'model', conserved, zones, nodes, edges, boundary, reported, omitted };
}

/** Every flow the scheme draws, internal and across the boundary, in one list. */
export function drawnFlows(graph: SchemeGraph): SchemeFlow[] {
  return [...graph.edges, ...graph.boundary];
}
