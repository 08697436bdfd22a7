/**
 * Direct evaluation of an expression tree with plain JavaScript numbers (SI values).
 * Used at compile time for constant expressions (sizes, unit checks) and by tests; the
 * run itself uses generated code (expr/codegen.ts) with the same semantics.
 */
import type { Ir } from './ir';
import { expandRateLaws } from './functions';

const FN: Readonly<Record<string, (...a: number[]) => number>> = Object.assign(Object.create(null), {
  exp: Math.exp,
  log: Math.log,
  log10: Math.log10,
  sqrt: Math.sqrt,
  abs: Math.abs,
  min: Math.min,
  max: Math.max,
  sin: Math.sin,
  cos: Math.cos,
  tanh: Math.tanh,
  floor: Math.floor,
  ceil: Math.ceil
});

/** Evaluates `ir`; `env` returns each symbol's SI value (`t` included). */
export function evaluateIr(ir: Ir, env: (name: string) => number): number {
  const go = (n: Ir): number => {
    switch (n.k) {
      case 'num':
        return n.v;
      case 'sym':
        if (n.name === 'pi') return Math.PI;
        if (n.name === 'e') return Math.E;
        return env(n.name);
      case 'un':
        return n.op === '-' ? -go(n.a) : go(n.a) ? 0 : 1;
      case 'cond':
        return go(n.c) ? go(n.a) : go(n.b);
      case 'call':
        return FN[n.fn](...n.args.map(go));
      case 'bin': {
        const a = go(n.a);
        if (n.op === 'and') return a && go(n.b) ? 1 : 0;
        if (n.op === 'or') return a || go(n.b) ? 1 : 0;
        const b = go(n.b);
        switch (n.op) {
          case '+': return a + b;
          case '-': return a - b;
          case '*': return a * b;
          case '/': return a / b;
          case '^': return Math.pow(a, b);
          case '<': return a < b ? 1 : 0;
          case '<=': return a <= b ? 1 : 0;
          case '>': return a > b ? 1 : 0;
          case '>=': return a >= b ? 1 : 0;
          case '==': return a === b ? 1 : 0;
          case '!=': return a !== b ? 1 : 0;
        }
      }
    }
  };
  return go(expandRateLaws(ir));
}
