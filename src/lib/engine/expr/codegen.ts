/**
 * JavaScript source from expression trees. All values are SI numbers. Subexpressions that
 * read only static symbols (parameters no measure touches, constants) are hoisted out of
 * the right-hand side and computed once per parameter set; a power with a static base
 * and a varying exponent becomes exp(ln(base) * exponent) with the logarithm hoisted
 * (shared/design/engine-notes.md: `Math.pow` with a fractional exponent was half the time).
 */
import type { Ir } from './ir';
import { expandRateLaws } from './functions';

export interface CodegenContext {
  /** JavaScript name of a symbol (declared id, `t`). */
  name(symbol: string): string;
  /** True when the symbol is constant for a bound parameter set. */
  isStatic(symbol: string): boolean;
  /** Hoisted constant declarations, in order, as `const h3 = ...;`. */
  hoisted: string[];
  /** Memo of hoisted source text → hoisted name. */
  memo: Map<string, string>;
}

export function newContext(name: (s: string) => string, isStatic: (s: string) => boolean): CodegenContext {
  return { name, isStatic, hoisted: [], memo: new Map() };
}

const MATH_FN: Readonly<Record<string, string>> = Object.assign(Object.create(null), {
  exp: 'Math.exp',
  log: 'Math.log',
  log10: 'Math.log10',
  sqrt: 'Math.sqrt',
  abs: 'Math.abs',
  min: 'Math.min',
  max: 'Math.max',
  sin: 'Math.sin',
  cos: 'Math.cos',
  tanh: 'Math.tanh',
  floor: 'Math.floor',
  ceil: 'Math.ceil'
});

function isStaticIr(ir: Ir, ctx: CodegenContext): boolean {
  switch (ir.k) {
    case 'num':
      return true;
    case 'sym':
      return ir.name === 'pi' || ir.name === 'e' || (ir.name !== 't' && ctx.isStatic(ir.name));
    case 'un':
      return isStaticIr(ir.a, ctx);
    case 'bin':
      return isStaticIr(ir.a, ctx) && isStaticIr(ir.b, ctx);
    case 'call':
      return ir.args.every((a) => isStaticIr(a, ctx));
    case 'cond':
      return isStaticIr(ir.c, ctx) && isStaticIr(ir.a, ctx) && isStaticIr(ir.b, ctx);
  }
}

function literal(v: number): string {
  if (Object.is(v, -0)) return '0';
  const s = String(v);
  return v < 0 ? `(${s})` : s;
}

function hoist(src: string, ctx: CodegenContext): string {
  let h = ctx.memo.get(src);
  if (!h) {
    h = `h${ctx.hoisted.length}`;
    ctx.hoisted.push(`const ${h} = ${src};`);
    ctx.memo.set(src, h);
  }
  return h;
}

/** JavaScript for `ir` (rate laws expanded first). */
export function emit(ir: Ir, ctx: CodegenContext): string {
  return emitNode(expandRateLaws(ir), ctx, true);
}

function emitNode(ir: Ir, ctx: CodegenContext, top: boolean): string {
  // Hoist a whole static subtree (but not a bare literal or symbol).
  if (ir.k !== 'num' && ir.k !== 'sym' && isStaticIr(ir, ctx)) {
    return hoist(raw(ir, ctx), ctx);
  }
  void top;
  return raw(ir, ctx);
}

function raw(ir: Ir, ctx: CodegenContext): string {
  const e = (x: Ir) => emitNode(x, ctx, false);
  switch (ir.k) {
    case 'num':
      return literal(ir.v);
    case 'sym':
      if (ir.name === 'pi') return 'Math.PI';
      if (ir.name === 'e') return 'Math.E';
      return ctx.name(ir.name);
    case 'un':
      return ir.op === '-' ? `(-${e(ir.a)})` : `(${e(ir.a)} ? 0 : 1)`;
    case 'cond':
      return `(${e(ir.c)} ? ${e(ir.a)} : ${e(ir.b)})`;
    case 'call':
      return `${MATH_FN[ir.fn]}(${ir.args.map(e).join(', ')})`;
    case 'bin': {
      switch (ir.op) {
        case '+':
        case '-':
        case '*':
        case '/':
          return `(${e(ir.a)} ${ir.op} ${e(ir.b)})`;
        case '^':
          return power(ir.a, ir.b, ctx);
        case 'and':
          return `(${e(ir.a)} && ${e(ir.b)} ? 1 : 0)`;
        case 'or':
          return `(${e(ir.a)} || ${e(ir.b)} ? 1 : 0)`;
        case '==':
          return `(${e(ir.a)} === ${e(ir.b)} ? 1 : 0)`;
        case '!=':
          return `(${e(ir.a)} !== ${e(ir.b)} ? 1 : 0)`;
        default:
          return `(${e(ir.a)} ${ir.op} ${e(ir.b)} ? 1 : 0)`;
      }
    }
  }
}

function power(base: Ir, expo: Ir, ctx: CodegenContext): string {
  const b = emitNode(base, ctx, false);
  if (expo.k === 'num') {
    const v = expo.v;
    if (v === 1) return b;
    if (v === 2) return `sq(${b})`;
    if (v === 3) return `cube(${b})`;
    if (v === 0.5) return `Math.sqrt(${b})`;
    if (v === -1) return `(1 / ${b})`;
    return `Math.pow(${b}, ${literal(v)})`;
  }
  const x = emitNode(expo, ctx, false);
  if (isStaticIr(base, ctx)) {
    // base is hoisted (a name or a literal); so is its logarithm.
    const ln = hoist(`Math.log(${b})`, ctx);
    return `(${b} > 0 ? Math.exp(${ln} * ${x}) : Math.pow(${b}, ${x}))`;
  }
  return `Math.pow(${b}, ${x})`;
}

/** Helpers the generated code may call. */
export const PRELUDE = 'const sq = (x) => x * x;\nconst cube = (x) => x * x * x;\n';
