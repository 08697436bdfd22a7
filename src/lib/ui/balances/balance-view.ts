/**
 * What the Balances screen shows, as plain data (no DOM, tested without one): each state's
 * mass balance as LaTeX and as words, grouped by zone; the whole-system identity with the
 * flows that cross the boundary and those that cancel; the numerical identity check in
 * words. The balances themselves come from the engine (massBalances), never from here.
 */
import {
  bin,
  compileModel,
  evaluateIr,
  latexId,
  latexNumber,
  latexOfIr,
  latexText,
  massBalances,
  printIr,
  rateLawsIn,
  type AnalyzedModel,
  type Ir,
  type BalanceTerm,
  type MassBalances
} from '$lib/engine';

/** How a flow is named in the equations. */
export type TermNames = 'id' | 'label';

export interface BalanceViewOptions {
  /** `id` (default) or the flow's `label` where it has one. */
  names?: TermNames;
  /** Rate laws by name (default) or as their defining fractions. */
  rateLaws?: 'named' | 'expanded';
}

export interface TermView {
  flow: string;
  label?: string;
  sign: 1 | -1;
  /** The state the mass comes from or goes to, or 'outside'. */
  other: string;
  /** Factor the rate is multiplied by in this balance (1 when none). */
  factor: number;
  /** The factor as LaTeX (`\frac{V}{A} \cdot 0.001`), '' when it is 1. */
  factorTex: string;
  /** The factor as text: `(V / A) · 0.001`, '' when it is 1. */
  factorText: string;
  /** The rate expression as LaTeX. */
  rateTex: string;
  /** The rate expression as the model writes it. */
  rateText: string;
  /** The rate's unit: its basis state's unit per day. */
  rateUnit: string;
}

export interface StateView {
  id: string;
  label?: string;
  /** The state's unit as the model writes it. */
  unit: string;
  /** The balance's unit: the state's unit per day. */
  balanceUnit: string;
  zone: string;
  conserved: boolean;
  terms: TermView[];
  /** `\frac{\mathrm{d}\mathit{DIP}}{\mathrm{d}t} = …` */
  equationTex: string;
  /** `[mg/m^3/d]` as LaTeX. */
  unitTex: string;
  /**
   * The equation as text with its unit, for screen readers: massBalances' `equation` form
   * (`dSED/dt = settling · (V / A) · 0.001 − release`), with the same cancelled factors
   * as the typeset one and the same names (ids or labels).
   */
  equationText: string;
}

export interface ZoneView {
  zone: string;
  states: StateView[];
}

export interface BoundaryFlow {
  flow: string;
  label?: string;
  /** The conserved state the flow enters (import) or leaves (export). */
  state: string;
}

export interface InternalFlow {
  flow: string;
  label?: string;
  from: string;
  to: string;
}

export interface IdentityView {
  element: string;
  unit: string;
  tex: string;
  /** massBalances' identity in words. */
  text: string;
  imports: BoundaryFlow[];
  exports: BoundaryFlow[];
  /** Flows between conserved states: they leave one and arrive in another, so they cancel. */
  internal: InternalFlow[];
  /** States kept out of the inventory (`conserved: false`). */
  excluded: string[];
}

export interface IdentityCheckView {
  holds: boolean;
  /** "holds at 5 random states to 3e-16" */
  words: string;
  worst: number | null;
  samples: number;
}

export interface BalancesView {
  zones: ZoneView[];
  identity: IdentityView;
  /** Rate laws the rates call (for the key under the equations). */
  rateLaws: string[];
}

/** Words for states with no `zone`. */
export const NO_ZONE = 'no zone';

/** A unit as the model writes it, typeset upright: `mg/m^3/d` → `\mathrm{mg}/\mathrm{m}^{3}/\mathrm{d}`. */
export function unitLatex(unit: string): string {
  return unit
    .trim()
    .replace(/\s*([*/])\s*/g, '$1')
    .replace(/[A-Za-z]+/g, (w) => `\\mathrm{${w}}`)
    .replace(/\^\(?(-?[\d.]+)\)?/g, '^{$1}')
    .replace(/\s+/g, '\\,')
    .replace(/\*/g, ' \\cdot ');
}

/** `dSED/dt = settling · (V / A) · 0.001 − release − burial` (the engine's form, factors in words). */
function equationText(state: string, terms: TermView[], names: TermNames): string {
  const rhs = terms
    .map((t, i) => {
      const name = names === 'label' && t.label ? t.label : t.flow;
      const body = t.factorText ? `${name} · ${t.factorText}` : name;
      return i === 0 ? (t.sign > 0 ? body : `−${body}`) : `${t.sign > 0 ? '+' : '−'} ${body}`;
    })
    .join(' ');
  return `d${state}/dt = ${rhs || '0'}`;
}

/** The unit of a balance: the state's unit per day (`mg/m^3` → `mg/m^3/d`). */
export function perDay(unit: string): string {
  const u = unit.trim();
  return u === '1' ? '1/d' : `${u}/d`;
}

/** The unit part of a conversion factor, to six digits; null when it is 1. */
function fmtNumber(k: number): number | null {
  const r = Number(k.toPrecision(6));
  return r === 1 ? null : r;
}

/** The factors of a size written as a plain product of ids and numbers, else null. */
function productFactors(ir: Ir): Ir[] | null {
  if (ir.k === 'sym' || ir.k === 'num') return [ir];
  if (ir.k === 'bin' && ir.op === '*') {
    const a = productFactors(ir.a);
    const b = productFactors(ir.b);
    return a && b ? [...a, ...b] : null;
  }
  return null;
}

const product = (fs: Ir[]): Ir => fs.reduce((acc, f) => bin('*', acc, f));

/**
 * size(from) / size(to) with common factors cancelled (`A * zMean` over `A` is `zMean`),
 * as LaTeX and text; null when the sizes are the same.
 */
export function sizeRatio(from: Ir, to: Ir): { tex: string; text: string } | null {
  let num: Ir[] = [from];
  let den: Ir[] = [to];
  const pf = productFactors(from);
  const pt = productFactors(to);
  if (pf && pt) {
    den = [...pt];
    num = [];
    for (const f of pf) {
      const j = den.findIndex((g) => printIr(g) === printIr(f));
      if (j >= 0) den.splice(j, 1);
      else num.push(f);
    }
  } else if (printIr(from) === printIr(to)) return null;
  if (!num.length && !den.length) return null;
  const n = num.length ? product(num) : { k: 'num' as const, v: 1 };
  if (!den.length) {
    const tex = latexOfIr(n);
    return { tex, text: num.length === 1 ? printIr(n) : `(${printIr(n)})` };
  }
  const d = product(den);
  return { tex: `\\frac{${latexOfIr(n)}}{${latexOfIr(d)}}`, text: `(${printIr(bin('/', n, d))})` };
}

export function balancesView(a: AnalyzedModel, options: BalanceViewOptions = {}): BalancesView {
  const names = options.names ?? 'id';
  const mb: MassBalances = massBalances(a);
  const doc = a.doc;
  const flowDoc = new Map(doc.flows.map((f) => [f.id, f]));
  const flowA = new Map(a.flows.map((f) => [f.id, f]));
  const stateDoc = new Map(doc.states.map((s) => [s.id, s]));
  const stateA = new Map(a.states.map((s) => [s.id, s]));
  const pv = new Map(a.parameters.map((p) => [p.id, p.value]));
  const sizeValue = (id: string) => evaluateIr(stateA.get(id)!.sizeIr, (n) => pv.get(n) ?? NaN);

  const flowName = (id: string) => {
    const label = flowDoc.get(id)?.label;
    return names === 'label' && label ? latexText(label) : latexId(id);
  };

  const conversion = (t: BalanceTerm, state: string): { tex: string; text: string } => {
    if (t.factor === 1 || t.other === 'outside') return { tex: '', text: '' };
    const from = stateA.get(t.other)!;
    const to = stateA.get(state)!;
    const ratio = sizeRatio(from.sizeIr, to.sizeIr);
    const k = fmtNumber(t.factor / (sizeValue(from.id) / sizeValue(to.id)));
    const tex = [ratio?.tex, k ? latexNumber(k) : ''].filter(Boolean).join(' \\cdot ');
    const text = [ratio?.text, k ? String(k) : ''].filter(Boolean).join(' · ');
    return { tex, text };
  };

  const term = (t: BalanceTerm, state: string): TermView => {
    const f = flowA.get(t.flow)!;
    const conv = conversion(t, state);
    return {
      flow: t.flow,
      label: flowDoc.get(t.flow)?.label,
      sign: t.sign,
      other: t.other,
      factor: t.factor,
      factorTex: conv.tex,
      factorText: conv.text,
      rateTex: latexOfIr(f.ir, { rateLaws: options.rateLaws }),
      rateText: flowDoc.get(t.flow)?.rate ?? printIr(f.ir),
      rateUnit: perDay(stateDoc.get(t.sign > 0 && t.other !== 'outside' ? t.other : state)!.unit)
    };
  };

  const zones: ZoneView[] = [];
  for (const sb of mb.states) {
    const sd = stateDoc.get(sb.state)!;
    const zone = sd.zone?.trim() || NO_ZONE;
    const terms = [...sb.inflows.map((t) => term(t, sb.state)), ...sb.outflows.map((t) => term(t, sb.state))];
    const rhs = terms.length
      ? terms
          .map((t, i) => {
            // Braces keep a term with its factor on one line when a long balance wraps.
            const body = t.factorTex ? `{${flowName(t.flow)} \\cdot ${t.factorTex}}` : flowName(t.flow);
            return i === 0 ? (t.sign > 0 ? body : `-${body}`) : `${t.sign > 0 ? '+' : '-'} ${body}`;
          })
          .join(' ')
      : '0';
    const unit = perDay(sb.unit);
    const view: StateView = {
      id: sb.state,
      label: sd.label,
      unit: sb.unit,
      balanceUnit: unit,
      zone,
      conserved: sb.conserved,
      terms,
      equationTex: `\\frac{\\mathrm{d}${latexId(sb.state)}}{\\mathrm{d}t} = ${rhs}`,
      unitTex: `\\left[${unitLatex(unit)}\\right]`,
      equationText: `${equationText(sb.state, terms, names)}, in ${unit}`
    };
    let z = zones.find((x) => x.zone === zone);
    if (!z) zones.push((z = { zone, states: [] }));
    z.states.push(view);
  }

  const boundary = (ids: string[], end: 'to' | 'from'): BoundaryFlow[] =>
    ids.map((id) => ({ flow: id, label: flowDoc.get(id)?.label, state: flowDoc.get(id)![end]! }));
  const imports = boundary(mb.imports, 'to');
  const exports = boundary(mb.exports, 'from');
  const internal: InternalFlow[] = doc.flows
    .filter((f) => f.from !== undefined && f.to !== undefined && stateA.get(f.from)!.conserved)
    .map((f) => ({ flow: f.id, label: f.label, from: f.from!, to: f.to! }));
  const massTerm = (b: BoundaryFlow) => `{m_{${latexId(b.state)}} \\cdot ${flowName(b.flow)}}`;
  const idTerms = [
    ...imports.map((b, i) => (i === 0 ? massTerm(b) : `+ ${massTerm(b)}`)),
    ...exports.map((b, i) => (i === 0 && !imports.length ? `-${massTerm(b)}` : `- ${massTerm(b)}`))
  ];
  const identity: IdentityView = {
    element: mb.element,
    unit: mb.unit,
    tex: `\\sum_{x} m_{x} \\, \\frac{\\mathrm{d}x}{\\mathrm{d}t} = ${idTerms.join(' ') || '0'}`,
    text: mb.identity,
    imports,
    exports,
    internal,
    excluded: a.states.filter((s) => !s.conserved).map((s) => s.id)
  };

  const laws = new Set<string>();
  for (const f of a.flows) rateLawsIn(f.ir, laws);
  return { zones, identity, rateLaws: [...laws].sort() };
}

/** Worst relative gap below which the identity holds (the engine's own threshold). */
export const IDENTITY_TOLERANCE = 1e-10;

/** The identity checked numerically at random states, in words. */
export function identityCheck(a: AnalyzedModel): IdentityCheckView {
  try {
    // The page's Content-Security-Policy refuses generated code (that runs in the engine
    // worker only): the identity is checked on the closure path here.
    const { worst, samples } = compileModel(a, { interpreted: true }).identity;
    const states = `${samples} random state${samples === 1 ? '' : 's'}`;
    const holds = worst <= IDENTITY_TOLERANCE;
    const words = !holds
      ? `fails: at ${states} the two sides differ by up to ${worst.toExponential(1)} of the terms' size`
      : worst === 0
        ? `holds exactly at ${states}`
        : `holds at ${states} to ${worst.toExponential(0)}`;
    return { holds, words, worst, samples };
  } catch (e) {
    return { holds: false, words: `could not be checked: ${(e as Error).message}`, worst: null, samples: 0 };
  }
}
