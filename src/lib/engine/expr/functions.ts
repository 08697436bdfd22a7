/**
 * The allow-list of functions an expression may call: arity, unit rule, and how each is
 * written in generated JavaScript. Rate laws of the trade (Monod saturation, inhibition,
 * Hill) are expanded into elementary operations before code generation.
 */
import { bin, num, type Ir } from './ir';

export type UnitRule =
  | 'dimensionless' // arguments and result dimensionless (exp, log, sin, ...)
  | 'sqrt' // result has half the argument's dimension
  | 'same' // every argument has one dimension; result too (abs, min, max)
  | 'power' // like `^`
  | 'saturation' // two arguments of one dimension, result dimensionless (monod, inhibit)
  | 'hill'; // like saturation, third argument dimensionless

export interface FunctionSpec {
  minArgs: number;
  maxArgs: number;
  unit: UnitRule;
  /** What the modeller reads in the function list. */
  description: string;
}

export const FUNCTIONS: Readonly<Record<string, FunctionSpec>> = Object.freeze(
  Object.assign(Object.create(null), {
    exp: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'e to the power x' },
    log: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'natural logarithm' },
    log10: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'base-10 logarithm' },
    sqrt: { minArgs: 1, maxArgs: 1, unit: 'sqrt', description: 'square root' },
    abs: { minArgs: 1, maxArgs: 1, unit: 'same', description: 'absolute value' },
    min: { minArgs: 2, maxArgs: 16, unit: 'same', description: 'smallest argument' },
    max: { minArgs: 2, maxArgs: 16, unit: 'same', description: 'largest argument' },
    pow: { minArgs: 2, maxArgs: 2, unit: 'power', description: 'pow(x, y) = x^y' },
    sin: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'sine (radians)' },
    cos: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'cosine (radians)' },
    tanh: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'hyperbolic tangent' },
    floor: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'round down' },
    ceil: { minArgs: 1, maxArgs: 1, unit: 'dimensionless', description: 'round up' },
    monod: {
      minArgs: 2,
      maxArgs: 2,
      unit: 'saturation',
      description: 'monod(x, k) = x/(k + x), saturation with half-saturation k (Monod 1949)'
    },
    inhibit: {
      minArgs: 2,
      maxArgs: 2,
      unit: 'saturation',
      description: 'inhibit(x, k) = k/(k + x), 1 at x = 0 falling to 1/2 at x = k'
    },
    hill: {
      minArgs: 3,
      maxArgs: 3,
      unit: 'hill',
      description: 'hill(x, k, n) = x^n/(k^n + x^n), sigmoid switch with steepness n (Hill 1910)'
    }
  } satisfies Record<string, FunctionSpec>)
);

export function isAllowedFunction(name: string): boolean {
  return Object.prototype.hasOwnProperty.call(FUNCTIONS, name);
}

/** Rewrites rate laws into elementary operations (after unit checking, before codegen). */
export function expandRateLaws(ir: Ir): Ir {
  switch (ir.k) {
    case 'num':
    case 'sym':
      return ir;
    case 'bin':
      return bin(ir.op, expandRateLaws(ir.a), expandRateLaws(ir.b));
    case 'un':
      return { k: 'un', op: ir.op, a: expandRateLaws(ir.a) };
    case 'cond':
      return { k: 'cond', c: expandRateLaws(ir.c), a: expandRateLaws(ir.a), b: expandRateLaws(ir.b) };
    case 'call': {
      const args = ir.args.map(expandRateLaws);
      switch (ir.fn) {
        case 'monod':
          return bin('/', args[0], bin('+', args[1], args[0]));
        case 'inhibit':
          return bin('/', args[1], bin('+', args[1], args[0]));
        case 'hill': {
          const xn = bin('^', args[0], args[2]);
          return bin('/', xn, bin('+', bin('^', args[1], args[2]), xn));
        }
        case 'pow':
          return bin('^', args[0], args[1]);
        default:
          return { k: 'call', fn: ir.fn, args };
      }
    }
  }
}

export const ZERO = num(0);
