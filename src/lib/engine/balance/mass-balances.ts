/**
 * The mass balance of each state, built from the flows (never written by hand), and the
 * whole-system identity, as data and as readable equations:
 *   dSED/dt = settling · (V / A) · 0.001 − release − burial
 * A flow's rate is in its basis state's unit per day; where it arrives in a state of
 * another unit or size, the factor m(from)/m(to) converts it.
 */
import type { ModelDoc } from '../document/types';
import { analyzeModel, type AnalyzedModel } from '../document/validate-model';
import { ModelInvalidError } from '../compile/errors';
import { evaluateIr } from '../expr/evaluate';
import { printIr } from '../expr/print';

export interface BalanceTerm {
  flow: string;
  /** +1 for inflow, −1 for outflow. */
  sign: 1 | -1;
  /** Factor the rate is multiplied by in this state's equation (1 when none). */
  factor: number;
  /** The factor in words: `(V / A) · 0.001`, or '' when it is 1. */
  factorText: string;
  role?: string;
  /** Where the mass comes from / goes to: a state id or 'outside'. */
  other: string;
}

export interface StateBalance {
  state: string;
  unit: string;
  conserved: boolean;
  inflows: BalanceTerm[];
  outflows: BalanceTerm[];
  /** `dDIP/dt = load + release − uptake − flushDIP` */
  equation: string;
}

export interface MassBalances {
  element: string;
  unit: string;
  states: StateBalance[];
  /** Flows that cross the boundary into conserved states. */
  imports: string[];
  /** Flows that cross the boundary out of conserved states. */
  exports: string[];
  /** `Σ m(x)·dx/dt = load − flushDIP − burial   [kg/d]` */
  identity: string;
}

function fmt(x: number): string {
  if (x === 1) return '';
  const s = Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(6))) : x.toExponential(4);
  return s;
}

export function massBalances(model: ModelDoc | AnalyzedModel): MassBalances {
  let a: AnalyzedModel;
  if ('kinds' in model) a = model;
  else {
    const r = analyzeModel(model);
    if (!r.model) throw new ModelInvalidError(r.problems);
    a = r.model;
  }
  const pv = new Map(a.parameters.map((p) => [p.id, p.value]));
  const pSi = new Map(a.parameters.map((p) => [p.id, p.si]));
  const sizeModel = a.states.map((s) => evaluateIr(s.sizeIr, (n) => pv.get(n) ?? NaN));
  const sizeSi = a.states.map((s) => evaluateIr(s.sizeIr, (n) => pSi.get(n) ?? NaN));
  const mOf = (i: number) => (a.states[i].unit.si * sizeSi[i]) / a.conserved.si;

  const states: StateBalance[] = a.states.map((s) => ({
    state: s.id,
    unit: s.unit.text,
    conserved: s.conserved,
    inflows: [],
    outflows: [],
    equation: ''
  }));
  const imports: string[] = [];
  const exports: string[] = [];
  for (const f of a.flows) {
    if (f.from !== undefined) {
      states[f.from].outflows.push({ flow: f.id, sign: -1, factor: 1, factorText: '', role: f.role, other: f.to === undefined ? 'outside' : a.states[f.to].id });
    }
    if (f.to !== undefined) {
      let factor = 1;
      let factorText = '';
      if (f.from !== undefined) {
        factor = mOf(f.from) / mOf(f.to);
        // The denominator is bracketed when compound: V / (A * zMean), not V / A * zMean.
        const sx = printIr(a.states[f.from].sizeIr, 5);
        const sy = printIr(a.states[f.to].sizeIr, 6);
        const sizeRatio = sizeModel[f.from] / sizeModel[f.to];
        const k = factor / (printIr(a.states[f.from].sizeIr) === printIr(a.states[f.to].sizeIr) ? 1 : sizeRatio);
        const same = printIr(a.states[f.from].sizeIr) === printIr(a.states[f.to].sizeIr);
        const parts = [same ? '' : `(${sx} / ${sy})`, fmt(Number(k.toPrecision(12)))].filter(Boolean);
        factorText = parts.join(' · ');
      }
      states[f.to].inflows.push({ flow: f.id, sign: 1, factor, factorText, role: f.role, other: f.from === undefined ? 'outside' : a.states[f.from].id });
    }
    const basis = a.states[f.basis];
    if (basis.conserved) {
      if (f.from === undefined) imports.push(f.id);
      if (f.to === undefined) exports.push(f.id);
    }
  }
  for (const sb of states) {
    const terms = [
      ...sb.inflows.map((t) => ({ s: '+', t })),
      ...sb.outflows.map((t) => ({ s: '−', t }))
    ];
    const rhs = terms.length
      ? terms
          .map(({ s, t }, i) => {
            const body = t.factorText ? `${t.flow} · ${t.factorText}` : t.flow;
            return i === 0 ? (s === '+' ? body : `−${body}`) : `${s} ${body}`;
          })
          .join(' ')
      : '0';
    sb.equation = `d${sb.state}/dt = ${rhs}`;
  }
  const idRhs = [...imports.map((x, i) => (i === 0 ? x : `+ ${x}`)), ...exports.map((x, i) => (i === 0 && !imports.length ? `−${x}` : `− ${x}`))].join(' ') || '0';
  return {
    element: a.doc.conserved.element,
    unit: a.conserved.text,
    states,
    imports,
    exports,
    identity: `Σ m(x)·dx/dt = ${idRhs}   [${a.conserved.text}/d, each flow as mass]`
  };
}
