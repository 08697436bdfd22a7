/**
 * Symbolic differentiation of expression trees, for the stiff solver's Jacobian.
 * Rules are the textbook ones (sum, product, quotient, chain rule; d/dx a^b in its general
 * form a^b (b' ln a + b a'/a)). Functions without a derivative everywhere (min, max, abs,
 * floor, ceil, conditionals, comparisons) return null: the caller then falls back to
 * finite differences.
 */
import { bin, num, type Ir } from './ir';
import { expandRateLaws } from './functions';

const isNum = (x: Ir, v?: number) => x.k === 'num' && (v === undefined || x.v === v);

function add(a: Ir, b: Ir): Ir {
  if (isNum(a, 0)) return b;
  if (isNum(b, 0)) return a;
  if (a.k === 'num' && b.k === 'num') return num(a.v + b.v);
  return bin('+', a, b);
}
function sub(a: Ir, b: Ir): Ir {
  if (isNum(b, 0)) return a;
  if (isNum(a, 0)) return neg(b);
  return bin('-', a, b);
}
function mul(a: Ir, b: Ir): Ir {
  if (isNum(a, 0) || isNum(b, 0)) return num(0);
  if (isNum(a, 1)) return b;
  if (isNum(b, 1)) return a;
  if (a.k === 'num' && b.k === 'num') return num(a.v * b.v);
  return bin('*', a, b);
}
function div(a: Ir, b: Ir): Ir {
  if (isNum(a, 0)) return num(0);
  if (isNum(b, 1)) return a;
  return bin('/', a, b);
}
function neg(a: Ir): Ir {
  if (a.k === 'num') return num(-a.v);
  return { k: 'un', op: '-', a };
}
const call = (fn: string, ...args: Ir[]): Ir => ({ k: 'call', fn, args });

function dependsOn(ir: Ir, x: string): boolean {
  switch (ir.k) {
    case 'num':
      return false;
    case 'sym':
      return ir.name === x;
    case 'un':
      return dependsOn(ir.a, x);
    case 'bin':
      return dependsOn(ir.a, x) || dependsOn(ir.b, x);
    case 'call':
      return ir.args.some((a) => dependsOn(a, x));
    case 'cond':
      return dependsOn(ir.c, x) || dependsOn(ir.a, x) || dependsOn(ir.b, x);
  }
}

/** d ir / d x, or null when a piece has no derivative formula. */
export function differentiate(ir: Ir, x: string): Ir | null {
  return d(expandRateLaws(ir), x);
}

function d(ir: Ir, x: string): Ir | null {
  if (!dependsOn(ir, x)) return num(0);
  switch (ir.k) {
    case 'num':
      return num(0);
    case 'sym':
      return num(ir.name === x ? 1 : 0);
    case 'un':
      if (ir.op === 'not') return null;
      {
        const da = d(ir.a, x);
        return da && neg(da);
      }
    case 'cond':
      return null;
    case 'bin': {
      const { a, b } = ir;
      switch (ir.op) {
        case '+':
        case '-': {
          const da = d(a, x);
          const db = d(b, x);
          if (!da || !db) return null;
          return ir.op === '+' ? add(da, db) : sub(da, db);
        }
        case '*': {
          const da = d(a, x);
          const db = d(b, x);
          if (!da || !db) return null;
          return add(mul(da, b), mul(a, db));
        }
        case '/': {
          const da = d(a, x);
          const db = d(b, x);
          if (!da || !db) return null;
          if (isNum(db, 0)) return div(da, b);
          return div(sub(mul(da, b), mul(a, db)), bin('^', b, num(2)));
        }
        case '^': {
          const da = d(a, x);
          const db = d(b, x);
          if (!da || !db) return null;
          if (isNum(db, 0)) {
            // d(a^c) = c a^(c-1) a'
            const c = b;
            const cm1 = c.k === 'num' ? num(c.v - 1) : sub(c, num(1));
            return mul(mul(c, bin('^', a, cm1)), da);
          }
          // d(a^b) = a^b (b' ln a + b a'/a)
          return mul(ir, add(mul(db, call('log', a)), div(mul(b, da), a)));
        }
        default:
          return null;
      }
    }
    case 'call': {
      if (ir.args.length !== 1) return null;
      const u = ir.args[0];
      const du = d(u, x);
      if (!du) return null;
      let outer: Ir;
      switch (ir.fn) {
        case 'exp':
          outer = ir;
          break;
        case 'log':
          outer = div(num(1), u);
          break;
        case 'log10':
          outer = div(num(1 / Math.LN10), u);
          break;
        case 'sqrt':
          outer = div(num(0.5), ir);
          break;
        case 'sin':
          outer = call('cos', u);
          break;
        case 'cos':
          outer = neg(call('sin', u));
          break;
        case 'tanh':
          outer = sub(num(1), bin('^', ir, num(2)));
          break;
        default:
          return null;
      }
      return mul(outer, du);
    }
  }
}
