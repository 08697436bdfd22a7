/**
 * Stage 2: compile an analysed model into one generated JavaScript factory per model
 * structure. `bind(parameters, modulators)` makes the run-time functions (right-hand side,
 * flow rates, derived values) for one parameter set without recompiling, so ensembles
 * pay generation once (2-9 ms) and binding per member (well under a millisecond).
 *
 * Layout of the solver vector (balance/layout in DEVELOPERS.md):
 *   [0, nS)            states, in the units the model writes
 *   [nS, nS + nF)      per-flow accumulators: mass moved by each flow, conserved unit
 *   nS + nF            cumulative imports across the boundary (conserved states only)
 *   nS + nF + 1        cumulative exports
 * Values inside generated code are SI; states are converted on the way in and rates on
 * the way out with factors fixed here.
 */
import type { AnalyzedModel } from '../document/validate-model';
import { analyzeModel } from '../document/validate-model';
import type { ModelDoc } from '../document/types';
import { emit, newContext, PRELUDE, type CodegenContext } from '../expr/codegen';
import { symbolsOf, substitute, type Ir } from '../expr/ir';
import { differentiate } from '../expr/differentiate';
import { tableFunction } from './forcing-table';
import { ModelInvalidError } from './errors';
import { interpretedFactory } from './interpreted';
import { checkIdentity, type IdentityCheck } from '../balance/identity';

const DAY = 86400;

/** A time-dependent change of one parameter or forcing: value(t) = base * scale(t) + offset(t). */
export interface Modulator {
  /** Multiplier at model time t (days). */
  scale(t: number): number;
  /** Addition at model time t (days), in SI. */
  offset(t: number): number;
}

export interface BoundModel {
  /** Mass factor per state: conserved unit per (state unit), i.e. size × unit factor. */
  readonly m: Float64Array;
  /** Right-hand side at model time t (days since the time origin). */
  rhs(t: number, y: Float64Array, dy: Float64Array): void;
  /** Flow rates in each flow's basis unit per day. */
  rates(t: number, y: Float64Array, out: Float64Array): void;
  /** Every derived quantity in its own unit, in `derivedIds` order. */
  derived(t: number, y: Float64Array, out: Float64Array): void;
  /** Every forcing in its own unit, in `forcingIds` order. */
  forcings(t: number, out: Float64Array): void;
}

export interface CompiledModel {
  readonly analysis: AnalyzedModel;
  readonly stateIds: string[];
  readonly flowIds: string[];
  readonly derivedIds: string[];
  readonly forcingIds: string[];
  readonly parameterIds: string[];
  /** Parameters and forcings that measures may change during a run (slot order). */
  readonly dynamic: string[];
  readonly nStates: number;
  readonly nFlows: number;
  /** Solver dimension: states, flow accumulators, imports, exports. */
  readonly dim: number;
  readonly importIndex: number;
  readonly exportIndex: number;
  /** Conserved flag per state. */
  readonly conserved: boolean[];
  /** The generated source, for inspection and tests. */
  readonly source: string;
  /** `generated` JavaScript, or `interpreted` (the closure path, where eval is refused). */
  readonly mode: 'generated' | 'interpreted';
  /** The whole-system identity checked at random states when compiled. */
  readonly identity: IdentityCheck;
  /**
   * Binds a parameter set. `overrides` are values in the model's units by id; `modulators`
   * are one per `dynamic` slot (identity when absent).
   */
  bind(overrides?: Record<string, number>, modulators?: (Modulator | undefined)[]): BoundModel;
  /** Analytic Jacobian of the full solver vector, or null where a rate has no derivative formula. */
  jacobianFactory(): JacobianFactory | null;
}

export type JacobianFactory = (bound: BoundModel) => (t: number, y: Float64Array, J: Float64Array) => void;

export interface CompileOptions {
  /** Ids of parameters/forcings that measures change during the run. */
  dynamic?: string[];
  /** Take the closure path even where generated code is allowed (tests). */
  interpreted?: boolean;
}

type GeneratedFactory = (
  P: Float64Array,
  F: ((t: number) => number)[],
  MS: ((t: number) => number)[],
  MO: ((t: number) => number)[]
) => BoundModel;

/** The compiled factory, or null when the environment refuses to compile code. */
function generatedFactory(source: string): GeneratedFactory | null {
  try {
    return new Function(source)() as GeneratedFactory;
  } catch (e) {
    if (e instanceof EvalError || /unsafe-eval|Content Security Policy|code generation/i.test(String((e as Error)?.message))) return null;
    throw e;
  }
}

const IDENTITY: Modulator = { scale: () => 1, offset: () => 0 };

export function compileModel(model: ModelDoc | AnalyzedModel, options: CompileOptions = {}): CompiledModel {
  const a = 'kinds' in model ? model : analyzed(model);
  const dynamic = [...new Set(options.dynamic ?? [])];
  const dynSlot = new Map(dynamic.map((id, q) => [id, q]));
  const nS = a.states.length;
  const nF = a.flows.length;
  const dim = nS + nF + 2;
  const IMP = nS + nF;
  const EXP = IMP + 1;

  const kind = (id: string) => a.kinds.get(id);
  const derivedById = new Map(a.derived.map((d) => [d.id, d]));
  const stateById = new Map(a.states.map((s) => [s.id, s]));

  // A derived quantity is static when everything it reads is static.
  const staticDerived = new Set<string>();
  const isStaticSym = (s: string): boolean => {
    const k = kind(s);
    if (k === 'parameter') return !dynSlot.has(s);
    if (k === 'derived') return staticDerived.has(s);
    return false;
  };
  for (const d of a.derived) {
    if ([...symbolsOf(d.ir)].every((s) => s !== 't' && isStaticSym(s))) staticDerived.add(d.id);
  }

  const ctx: CodegenContext = newContext((s) => (s === 't' ? 'ts' : `s_${s}`), isStaticSym);
  const hoistedDecl: string[] = [];

  // Static parameters and derived quantities are declared once per bind.
  for (const p of a.parameters) if (!dynSlot.has(p.id)) hoistedDecl.push(`const s_${p.id} = P[${p.index}];`);
  // Static derived values join the hoisted list in order, after what their expressions hoist.
  for (const d of a.derived) if (staticDerived.has(d.id)) ctx.hoisted.push(`const s_${d.id} = ${emit(d.ir, ctx)};`);

  // Mass factors and conversions between states.
  const SFC = a.conserved.si;
  const massDecl: string[] = [];
  for (const s of a.states) {
    massDecl.push(`const m${s.index} = ${s.unit.si} * ${emit(s.sizeIr, ctx)} / ${SFC};`);
  }

  const prologue = (needed: Set<string>): string[] => prologueLines({ a, dynamic, dynSlot, staticDerived, ctx }, needed);

  const flowSyms = new Set<string>();
  for (const f of a.flows) symbolsOf(f.ir).forEach((s) => flowSyms.add(s));
  const rateLines = a.flows.map((f) => {
    const basis = a.states[f.basis];
    return `const r${f.index} = ${emit(f.ir, ctx)} * ${DAY / basis.unit.si};`;
  });
  // Conversion factors for internal flows: what leaves `from` arrives in `to`.
  const convDecl: string[] = [];
  for (const f of a.flows) {
    if (f.from !== undefined && f.to !== undefined) convDecl.push(`const c${f.index} = m${f.from} / m${f.to};`);
  }

  const assemble: string[] = [];
  for (const s of a.states) {
    const terms: string[] = [];
    for (const f of a.flows) {
      if (f.from === s.index) terms.push(`- r${f.index}`);
      if (f.to === s.index) terms.push(f.from === undefined ? `+ r${f.index}` : `+ r${f.index} * c${f.index}`);
    }
    assemble.push(`dy[${s.index}] = ${terms.length ? terms.join(' ').replace(/^\+ /, '') : '0'};`);
  }
  const imports: string[] = [];
  const exports: string[] = [];
  for (const f of a.flows) {
    assemble.push(`dy[${nS + f.index}] = r${f.index} * m${f.basis};`);
    const booked = a.states[f.basis].conserved;
    if (!booked) continue;
    if (f.from === undefined) imports.push(`r${f.index} * m${f.basis}`);
    if (f.to === undefined) exports.push(`r${f.index} * m${f.basis}`);
  }
  assemble.push(`dy[${IMP}] = ${imports.length ? imports.join(' + ') : '0'};`);
  assemble.push(`dy[${EXP}] = ${exports.length ? exports.join(' + ') : '0'};`);

  const rhsBody = [...prologue(flowSyms), ...rateLines, ...assemble];
  const ratesBody = [...prologue(flowSyms), ...rateLines, ...a.flows.map((f) => `out[${f.index}] = r${f.index};`)];
  const allDerived = new Set(a.derived.map((d) => d.id));
  const derivedBody = [
    ...prologue(allDerived),
    ...a.derived.map((d) => `out[${d.index}] = s_${d.id} / ${d.unit.si};`)
  ];
  const forcingBody = [
    ...prologue(new Set(a.forcings.map((f) => f.id))),
    ...a.forcings.map((f) => `out[${f.index}] = s_${f.id} / ${f.unit.si};`)
  ];

  const source = [
    '"use strict";',
    PRELUDE,
    'return function bind(P, F, MS, MO) {',
    ...hoistedDecl,
    ...ctx.hoisted,
    ...massDecl,
    ...convDecl,
    `const m = new Float64Array([${a.states.map((s) => `m${s.index}`).join(', ')}]);`,
    'return {',
    '  m,',
    `  rhs(t, y, dy) {\n${rhsBody.join('\n')}\n  },`,
    `  rates(t, y, out) {\n${ratesBody.join('\n')}\n  },`,
    `  derived(t, y, out) {\n${derivedBody.join('\n')}\n  },`,
    `  forcings(t, out) {\n${forcingBody.join('\n')}\n  }`,
    '};',
    '};'
  ].join('\n');

  const tables = a.forcings.map((f) =>
    f.table ? tableFunction(f.table.t, f.table.v, f.table.step, f.table.period, f.unit.si) : () => NaN
  );
  // Generated code where the Content-Security-Policy allows it, else the closure path
  // (DEVELOPERS.md, decision 4).
  const factory = options.interpreted ? null : generatedFactory(source);
  const interpreted = factory ? null : interpretedFactory(a, dynamic, tables);

  const bind = (overrides: Record<string, number> = {}, modulators: (Modulator | undefined)[] = []): BoundModel => {
    const P = new Float64Array(a.parameters.length);
    for (const p of a.parameters) {
      const v = Object.prototype.hasOwnProperty.call(overrides, p.id) ? overrides[p.id] : p.value;
      P[p.index] = v * p.unit.si;
    }
    const MS = dynamic.map((_, q) => {
      const m = modulators[q] ?? IDENTITY;
      return (t: number) => m.scale(t);
    });
    const MO = dynamic.map((_, q) => {
      const m = modulators[q] ?? IDENTITY;
      return (t: number) => m.offset(t);
    });
    if (!factory) return interpreted!(P, modulators);
    const bound = factory(P, tables, MS, MO);
    Object.defineProperty(bound, BIND_ARGS, { value: { P, MS, MO } satisfies BindArgs });
    return bound;
  };

  let jac: JacobianFactory | null | undefined;
  const compiled: CompiledModel = {
    analysis: a,
    stateIds: a.states.map((s) => s.id),
    flowIds: a.flows.map((f) => f.id),
    derivedIds: a.derived.map((d) => d.id),
    forcingIds: a.forcings.map((f) => f.id),
    parameterIds: a.parameters.map((p) => p.id),
    dynamic,
    nStates: nS,
    nFlows: nF,
    dim,
    importIndex: IMP,
    exportIndex: EXP,
    conserved: a.states.map((s) => s.conserved),
    source,
    mode: factory ? 'generated' : 'interpreted',
    identity: { worst: 0, samples: 0 },
    bind,
    jacobianFactory() {
      // The closure path has no symbolic Jacobian: the stiff method takes finite differences.
      if (jac === undefined) jac = factory ? buildJacobian(a, dynamic, dynSlot, staticDerived, derivedById, stateById, tables) : null;
      return jac;
    }
  };
  const identity = checkIdentity(compiled, bind());
  // Round-off is ~1e-16 per term; a larger gap means the assembly itself is wrong.
  if (identity.worst > 1e-10) {
    throw new Error(`internal error: the compiled model breaks the mass identity by ${identity.worst.toExponential(2)} (please report)`);
  }
  return { ...compiled, identity };
}

interface PrologueEnv {
  a: AnalyzedModel;
  dynamic: string[];
  dynSlot: Map<string, number>;
  staticDerived: Set<string>;
  ctx: CodegenContext;
}

/**
 * Declarations at the top of a generated time function for the symbols `needed` reads
 * (and what those read), in a valid order: time, measured parameters, forcings, states,
 * derived quantities. Static parameters and derived quantities are hoisted elsewhere.
 */
function prologueLines(env: PrologueEnv, needed: Set<string>): string[] {
  const { a, dynamic, dynSlot, staticDerived, ctx } = env;
  const lines: string[] = ['const ts = t * 86400;'];
  const want = new Set<string>();
  const derivedById = new Map(a.derived.map((d) => [d.id, d]));
  const forcingById = new Map(a.forcings.map((f) => [f.id, f]));
  const paramIdx = new Map(a.parameters.map((p) => [p.id, p.index]));
  const visit = (s: string) => {
    if (want.has(s) || s === 't' || s === 'pi' || s === 'e') return;
    const k = a.kinds.get(s);
    if (k === 'parameter' && !dynSlot.has(s)) return;
    if (k === 'derived' && staticDerived.has(s)) return;
    want.add(s);
    if (k === 'derived') symbolsOf(derivedById.get(s)!.ir).forEach(visit);
    if (k === 'forcing') {
      const f = forcingById.get(s)!;
      if (f.ir) symbolsOf(f.ir).forEach(visit);
    }
  };
  needed.forEach(visit);
  for (const id of dynamic) {
    if (a.kinds.get(id) === 'parameter' && want.has(id)) {
      const q = dynSlot.get(id)!;
      lines.push(`const s_${id} = P[${paramIdx.get(id)}] * MS[${q}](t) + MO[${q}](t);`);
    }
  }
  for (const f of a.forcings) {
    if (!want.has(f.id)) continue;
    const base = f.table ? `F[${f.index}](t)` : emit(f.ir!, ctx);
    const q = dynSlot.get(f.id);
    lines.push(q === undefined ? `const s_${f.id} = ${base};` : `const s_${f.id} = (${base}) * MS[${q}](t) + MO[${q}](t);`);
  }
  for (const s of a.states) if (want.has(s.id)) lines.push(`const s_${s.id} = y[${s.index}] * ${s.unit.si};`);
  for (const d of a.derived) if (want.has(d.id)) lines.push(`const s_${d.id} = ${emit(d.ir, ctx)};`);
  return lines;
}

function analyzed(doc: ModelDoc): AnalyzedModel {
  const r = analyzeModel(doc);
  if (!r.model) throw new ModelInvalidError(r.problems);
  return r.model;
}

/**
 * Generates the Jacobian of the whole solver vector: rates are differentiated with the
 * derived quantities inlined, by the chain rule through the SI conversion
 * (dr/dy_j = RF · d(rate_SI)/d(s_j,SI) · SF_j).
 */
function buildJacobian(
  a: AnalyzedModel,
  dynamic: string[],
  dynSlot: Map<string, number>,
  staticDerived: Set<string>,
  derivedById: Map<string, AnalyzedModel['derived'][number]>,
  stateById: Map<string, AnalyzedModel['states'][number]>,
  tables: ((t: number) => number)[]
): JacobianFactory | null {
  const nS = a.states.length;
  const nF = a.flows.length;
  const dim = nS + nF + 2;
  const inlined = new Map<string, Ir>();
  for (const d of a.derived) {
    if (staticDerived.has(d.id)) continue;
    inlined.set(d.id, substitute(d.ir, (n) => inlined.get(n)));
  }
  const isStaticSym = (s: string): boolean => {
    const k = a.kinds.get(s);
    if (k === 'parameter') return !dynSlot.has(s);
    if (k === 'derived') return staticDerived.has(s);
    return false;
  };
  const ctx = newContext((s) => (s === 't' ? 'ts' : `s_${s}`), isStaticSym);
  for (const d of a.derived) if (staticDerived.has(d.id)) ctx.hoisted.push(`const s_${d.id} = ${emit(d.ir, ctx)};`);
  const entries: string[] = [];
  const used = new Set<string>();
  for (const f of a.flows) {
    const rate = substitute(f.ir, (n) => inlined.get(n));
    const RF = DAY / a.states[f.basis].unit.si;
    for (const sname of symbolsOf(rate)) {
      const s = stateById.get(sname);
      if (!s) continue;
      const dr = differentiate(rate, sname);
      if (!dr) return null;
      if (dr.k === 'num' && dr.v === 0) continue;
      symbolsOf(dr).forEach((x) => used.add(x));
      const v = `d${f.index}_${s.index}`;
      entries.push(`const ${v} = ${emit(dr, ctx)} * ${RF * s.unit.si};`);
      const j = s.index;
      if (f.from !== undefined) entries.push(`J[${f.from * dim + j}] -= ${v};`);
      if (f.to !== undefined) entries.push(f.from === undefined ? `J[${f.to * dim + j}] += ${v};` : `J[${f.to * dim + j}] += ${v} * c${f.index};`);
      entries.push(`J[${(nS + f.index) * dim + j}] += ${v} * m${f.basis};`);
      if (a.states[f.basis].conserved) {
        if (f.from === undefined) entries.push(`J[${(nS + nF) * dim + j}] += ${v} * m${f.basis};`);
        if (f.to === undefined) entries.push(`J[${(nS + nF + 1) * dim + j}] += ${v} * m${f.basis};`);
      }
    }
  }
  // Declarations for what the derivatives read (derived quantities are inlined there).
  const decl = prologueLines({ a, dynamic, dynSlot, staticDerived, ctx }, used);

  const hoistedDecl: string[] = [];
  for (const p of a.parameters) if (!dynSlot.has(p.id)) hoistedDecl.push(`const s_${p.id} = P[${p.index}];`);
  const massDecl = a.states.map((s) => `const m${s.index} = M[${s.index}];`);
  const convDecl = a.flows
    .filter((f) => f.from !== undefined && f.to !== undefined)
    .map((f) => `const c${f.index} = m${f.from} / m${f.to};`);

  const source = [
    '"use strict";',
    PRELUDE,
    'return function bindJacobian(P, F, MS, MO, M) {',
    ...hoistedDecl,
    ...ctx.hoisted,
    ...massDecl,
    ...convDecl,
    'return function jacobian(t, y, J) {',
    'J.fill(0);',
    ...decl,
    ...entries,
    '};',
    '};'
  ].join('\n');
  const factory = new Function(source)() as (
    P: Float64Array,
    F: ((t: number) => number)[],
    MS: ((t: number) => number)[],
    MO: ((t: number) => number)[],
    M: Float64Array
  ) => (t: number, y: Float64Array, J: Float64Array) => void;

  return (bound: BoundModel) => {
    const internals = (bound as unknown as { [BIND_ARGS]?: BindArgs })[BIND_ARGS];
    if (!internals) throw new Error('jacobian: bound model without its binding');
    return factory(internals.P, tables, internals.MS, internals.MO, bound.m);
  };
}

export const BIND_ARGS = Symbol('bindArgs');
interface BindArgs {
  P: Float64Array;
  MS: ((t: number) => number)[];
  MO: ((t: number) => number)[];
}
