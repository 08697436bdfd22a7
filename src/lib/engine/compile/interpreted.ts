/**
 * The closure path: the same run-time functions as the generated code, evaluated by
 * walking the expression trees (expr/evaluate.ts) instead of compiling JavaScript. Used
 * where a Content-Security-Policy refuses `new Function` (the page itself, for the
 * Balances screen's identity check; a worker on a host that forbids eval). The engine
 * notes measured tree evaluation at several times the generated code's cost; the results
 * are the same numbers (tested against the generated path).
 */
import type { AnalyzedModel } from '../document/validate-model';
import { evaluateIr } from '../expr/evaluate';
import { expandRateLaws } from '../expr/functions';
import type { Ir } from '../expr/ir';
import type { BoundModel, Modulator } from './compile-model';

const DAY = 86400;

export function interpretedFactory(
  a: AnalyzedModel,
  dynamic: string[],
  tables: ((t: number) => number)[]
): (P: Float64Array, modulators: (Modulator | undefined)[]) => BoundModel {
  const dynSlot = new Map(dynamic.map((id, q) => [id, q]));
  const expand = (ir: Ir) => expandRateLaws(ir);
  const forcingIr = a.forcings.map((f) => (f.ir ? expand(f.ir) : null));
  const derivedIr = new Map(a.derived.map((d) => [d.id, expand(d.ir)]));
  const flowIr = a.flows.map((f) => expand(f.ir));
  const sizeIr = a.states.map((s) => expand(s.sizeIr));
  const pIndex = new Map(a.parameters.map((p) => [p.id, p.index]));
  const fIndex = new Map(a.forcings.map((f) => [f.id, f.index]));
  const sIndex = new Map(a.states.map((s) => [s.id, s.index]));
  const nS = a.states.length;
  const nF = a.flows.length;

  return (P, modulators) => {
    const mod = (id: string): Modulator | undefined => {
      const q = dynSlot.get(id);
      return q === undefined ? undefined : modulators[q];
    };
    const paramEnv = (name: string) => P[pIndex.get(name)!];
    const m = new Float64Array(a.states.map((s, i) => (s.unit.si * evaluateIr(sizeIr[i], paramEnv)) / a.conserved.si));

    /** An environment for time t (days) and state y, with per-call memo of derived values. */
    const envAt = (t: number, y: Float64Array | null) => {
      const memo = new Map<string, number>();
      const env = (name: string): number => {
        if (name === 't') return t * DAY;
        const k = a.kinds.get(name);
        if (k === 'parameter') {
          const md = mod(name);
          const v = P[pIndex.get(name)!];
          return md ? v * md.scale(t) + md.offset(t) : v;
        }
        if (k === 'state') return y ? y[sIndex.get(name)!] * a.states[sIndex.get(name)!].unit.si : NaN;
        const hit = memo.get(name);
        if (hit !== undefined) return hit;
        let v: number;
        if (k === 'forcing') {
          const i = fIndex.get(name)!;
          const base = a.forcings[i].table ? tables[i](t) : evaluateIr(forcingIr[i]!, env);
          const md = mod(name);
          v = md ? base * md.scale(t) + md.offset(t) : base;
        } else v = evaluateIr(derivedIr.get(name)!, env);
        memo.set(name, v);
        return v;
      };
      return env;
    };

    const rates = (t: number, y: Float64Array, out: Float64Array) => {
      const env = envAt(t, y);
      a.flows.forEach((f, k) => (out[k] = (evaluateIr(flowIr[k], env) * DAY) / a.states[f.basis].unit.si));
    };
    const r = new Float64Array(nF);
    return {
      m,
      rates,
      rhs(t, y, dy) {
        rates(t, y, r);
        dy.fill(0, 0, nS + nF + 2);
        a.flows.forEach((f, k) => {
          if (f.from !== undefined) dy[f.from] -= r[k];
          if (f.to !== undefined) dy[f.to] += f.from === undefined ? r[k] : (r[k] * m[f.from]) / m[f.to];
          const mass = r[k] * m[f.basis];
          dy[nS + k] = mass;
          if (a.states[f.basis].conserved) {
            if (f.from === undefined) dy[nS + nF] += mass;
            if (f.to === undefined) dy[nS + nF + 1] += mass;
          }
        });
      },
      derived(t, y, out) {
        const env = envAt(t, y);
        a.derived.forEach((d, j) => (out[j] = env(d.id) / d.unit.si));
      },
      forcings(t, out) {
        const env = envAt(t, null);
        a.forcings.forEach((f, j) => (out[j] = env(f.id) / f.unit.si));
      }
    };
  };
}
