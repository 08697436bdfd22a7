/**
 * What a catalogue item may act on in a given model, found from what the model says about
 * its symbols (flow roles, derived roles, zones, units), never from ids.
 *
 * Reach: a parameter or forcing *feeds* a flow when it appears in the flow's rate, or in a
 * derived quantity or forcing expression the rate uses (followed to any depth). Parameters
 * that make up a state's size are never targets (sizes are constant).
 */
import type { MeasureDoc, ModelDoc } from '$lib/engine/document/types';
import { parseExpression } from '$lib/engine/expr/parse';
import { symbolsOf } from '$lib/engine/expr/ir';
import { isDimensionless, parseUnit, sameDims } from '$lib/engine/expr/math';
import { SYMBOL_KINDS, type CatalogueItem, type Selector } from './catalogue';

export type TargetKind = 'parameter' | 'forcing' | 'state';

export interface TargetOption {
  id: string;
  kind: TargetKind;
  /** The model's label, if any. */
  label?: string;
  unit: string;
  zone?: string;
  /** For a list: `Total P concentration of the inflow (Pin), mg/m^3`. */
  text: string;
}

/** What targets.ts reads off a model once (kept per model document). */
interface ModelFacts {
  params: Map<string, { unit: string; label?: string }>;
  forcings: Map<string, { unit: string; label?: string }>;
  states: Map<string, { unit: string; label?: string; zone?: string; conserved: boolean }>;
  sizeSymbols: Set<string>;
  /** Flow role → every symbol its flows' rates reach. */
  flowReach: Map<string, Set<string>>;
  /** Derived role → every symbol its expressions reach. */
  derivedReach: Map<string, Set<string>>;
  /** State → zones of the states flows come in from. */
  inFromZones: Map<string, Set<string>>;
  /** State → roles of the flows leaving it. */
  outRoles: Map<string, Set<string>>;
}

const factsCache = new WeakMap<object, ModelFacts>();

function directSymbols(expr: unknown): Set<string> {
  if (typeof expr !== 'string') return new Set();
  const r = parseExpression(expr);
  return r.ok ? symbolsOf(r.ir) : new Set();
}

function factsOf(model: ModelDoc): ModelFacts {
  const cached = factsCache.get(model);
  if (cached) return cached;
  const params = new Map<string, { unit: string; label?: string }>();
  for (const p of model.parameters ?? []) params.set(p.id, { unit: p.unit, label: p.label });
  const forcings = new Map<string, { unit: string; label?: string }>();
  for (const f of model.forcings ?? []) forcings.set(f.id, { unit: f.unit, label: f.label });
  const states = new Map<string, { unit: string; label?: string; zone?: string; conserved: boolean }>();
  for (const s of model.states ?? []) states.set(s.id, { unit: s.unit, label: s.label, zone: s.zone, conserved: s.conserved !== false });

  const sizeSymbols = new Set<string>();
  for (const s of model.states ?? []) for (const x of directSymbols(s.size)) sizeSymbols.add(x);

  // Symbols an expression of a derived quantity or a forcing uses directly.
  const uses = new Map<string, Set<string>>();
  for (const d of model.derived ?? []) uses.set(d.id, directSymbols(d.expression));
  for (const f of model.forcings ?? []) if (f.expression !== undefined) uses.set(f.id, directSymbols(f.expression));
  const reach = (start: Iterable<string>, into: Set<string>) => {
    const stack = [...start];
    while (stack.length) {
      const s = stack.pop()!;
      if (into.has(s)) continue;
      into.add(s);
      for (const u of uses.get(s) ?? []) stack.push(u);
    }
  };

  const flowReach = new Map<string, Set<string>>();
  const inFromZones = new Map<string, Set<string>>();
  const outRoles = new Map<string, Set<string>>();
  const add = (m: Map<string, Set<string>>, k: string) => m.get(k) ?? m.set(k, new Set()).get(k)!;
  for (const f of model.flows ?? []) {
    if (f.role) reach(directSymbols(f.rate), add(flowReach, f.role));
    if (f.to && f.from) {
      const z = states.get(f.from)?.zone;
      if (z) add(inFromZones, f.to).add(z);
    }
    if (f.from && f.role) add(outRoles, f.from).add(f.role);
  }
  const derivedReach = new Map<string, Set<string>>();
  for (const d of model.derived ?? []) if (d.role) reach(directSymbols(d.expression), add(derivedReach, d.role));

  const facts = { params, forcings, states, sizeSymbols, flowReach, derivedReach, inFromZones, outRoles };
  factsCache.set(model, facts);
  return facts;
}

const anyIn = (roles: string[] | undefined, reach: Map<string, Set<string>>, id: string) =>
  (roles ?? []).some((r) => reach.get(r)?.has(id));

function unitDims(unit: string): number[] | null {
  const u = parseUnit(unit);
  return 'error' in u ? null : u.dims;
}

/** True when the symbol `id` (of kind `kind`) satisfies every condition of the selector. */
export function selectorAllows(sel: Selector, model: ModelDoc, id: string): boolean {
  const f = factsOf(model);
  if (sel.of === 'state') {
    const s = f.states.get(id);
    if (!s) return false;
    if (sel.zone && !(s.zone !== undefined && sel.zone.includes(s.zone))) return false;
    if (sel.flowInFromZone && !sel.flowInFromZone.some((z) => f.inFromZones.get(id)?.has(z))) return false;
    if (sel.flowOutRole && !sel.flowOutRole.some((r) => f.outRoles.get(id)?.has(r))) return false;
    if (sel.notFlowOutRole && sel.notFlowOutRole.some((r) => f.outRoles.get(id)?.has(r))) return false;
    if (sel.conserved !== undefined && s.conserved !== sel.conserved) return false;
    return true;
  }
  const p = f.params.get(id);
  const fo = f.forcings.get(id);
  const sym = sel.of === 'parameter' ? p : sel.of === 'forcing' ? fo : (p ?? fo);
  if (!sym) return false;
  if (p && f.sizeSymbols.has(id)) return false;
  if (sel.feedsFlowRole && !anyIn(sel.feedsFlowRole, f.flowReach, id)) return false;
  if (sel.notFeedsFlowRole && anyIn(sel.notFeedsFlowRole, f.flowReach, id)) return false;
  if (sel.feedsDerivedRole && !anyIn(sel.feedsDerivedRole, f.derivedReach, id)) return false;
  if (sel.unit && !sel.unit.includes(sym.unit.trim())) return false;
  if (sel.dimensionOf !== undefined || sel.dimensionless !== undefined) {
    const dims = unitDims(sym.unit);
    if (!dims) return false;
    if (sel.dimensionOf !== undefined) {
      const want = unitDims(sel.dimensionOf);
      if (!want || !sameDims(dims, want)) return false;
    }
    if (sel.dimensionless !== undefined && isDimensionless(dims) !== sel.dimensionless) return false;
  }
  return true;
}

/** A label as a list or a sentence names it: without a trailing remark in brackets. */
export function shortLabel(label: string | undefined): string | undefined {
  if (!label) return undefined;
  const s = label.replace(/\s*\([^()]*\)\s*$/, '').trim();
  return s || label;
}

function option(model: ModelDoc, id: string, kind: TargetKind): TargetOption {
  const f = factsOf(model);
  const sym = kind === 'parameter' ? f.params.get(id) : kind === 'forcing' ? f.forcings.get(id) : f.states.get(id);
  const label = sym?.label;
  const unit = sym?.unit ?? '';
  const name = shortLabel(label);
  const zone = kind === 'state' ? f.states.get(id)?.zone : undefined;
  return { id, kind, label, unit, zone, text: `${name ? `${name} (${id})` : id}${unit && unit !== '1' ? `, ${unit}` : ''}` };
}

function listFor(selectors: Selector[], model: ModelDoc, exclude?: string): TargetOption[] {
  const f = factsOf(model);
  const out: TargetOption[] = [];
  const seen = new Set<string>();
  const consider = (id: string, kind: TargetKind) => {
    if (seen.has(id) || id === exclude) return;
    if (selectors.some((s) => selectorAllows(s, model, id) && (s.of === kind || (s.of === 'parameterOrForcing' && kind !== 'state')))) {
      seen.add(id);
      out.push(option(model, id, kind));
    }
  };
  // Model order: states, then parameters, then forcings (as the Build screen lists them).
  for (const id of f.states.keys()) consider(id, 'state');
  for (const id of f.params.keys()) consider(id, 'parameter');
  for (const id of f.forcings.keys()) consider(id, 'forcing');
  return out;
}

/** What the item may act on in this model (for transfer: the state mass leaves). */
export function targetsFor(item: CatalogueItem, model: ModelDoc): TargetOption[] {
  return listFor(item.targets, model);
}

/** transfer only: the states mass may go into, never the state it leaves. */
export function intoTargetsFor(item: CatalogueItem, model: ModelDoc, from?: string): TargetOption[] {
  if (item.kind !== 'transfer' || !item.into) return [];
  const fromState = from ? model.states.find((s) => s.id === from) : undefined;
  // A transfer keeps to one side of the inventory (conserved or not).
  return listFor(item.into, model, from).filter((o) => !fromState || (model.states.find((s) => s.id === o.id)?.conserved !== false) === (fromState.conserved !== false));
}

/** The id a measure acts on (its target or its state). */
export function measureSubject(m: MeasureDoc): string | undefined {
  return SYMBOL_KINDS.includes(m.kind) ? (m as { target?: string }).target : (m as { state?: string }).state;
}

/** True when the item allows this measure's target (and, for transfer, its `into`). */
export function itemAllows(item: CatalogueItem, model: ModelDoc, m: MeasureDoc): boolean {
  if (item.kind !== m.kind) return false;
  const subject = measureSubject(m);
  if (typeof subject !== 'string' || !targetsFor(item, model).some((t) => t.id === subject)) return false;
  if (m.kind === 'transfer') return intoTargetsFor(item, model, m.state).some((t) => t.id === m.into);
  return true;
}

/** A symbol of the model as a list or a sentence shows it. */
export function symbolOption(model: ModelDoc, id: string): TargetOption | undefined {
  const f = factsOf(model);
  if (f.states.has(id)) return option(model, id, 'state');
  if (f.params.has(id)) return option(model, id, 'parameter');
  if (f.forcings.has(id)) return option(model, id, 'forcing');
  return undefined;
}
