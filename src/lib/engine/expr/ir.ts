/**
 * The engine's own expression tree, made once from mathjs' parse tree after the
 * allow-list check. Unit inference, differentiation and code generation all work on it.
 */
export type BinaryOp = '+' | '-' | '*' | '/' | '^' | '<' | '<=' | '>' | '>=' | '==' | '!=' | 'and' | 'or';
export type UnaryOp = '-' | 'not';

export type Ir =
  | { k: 'num'; v: number }
  | { k: 'sym'; name: string }
  | { k: 'bin'; op: BinaryOp; a: Ir; b: Ir }
  | { k: 'un'; op: UnaryOp; a: Ir }
  | { k: 'call'; fn: string; args: Ir[] }
  | { k: 'cond'; c: Ir; a: Ir; b: Ir };

export const num = (v: number): Ir => ({ k: 'num', v });
export const sym = (name: string): Ir => ({ k: 'sym', name });
export const bin = (op: BinaryOp, a: Ir, b: Ir): Ir => ({ k: 'bin', op, a, b });

/** Symbols the tree reads (declared ids and `t`; not `pi`/`e`). */
export function symbolsOf(ir: Ir, out: Set<string> = new Set()): Set<string> {
  switch (ir.k) {
    case 'sym':
      out.add(ir.name);
      break;
    case 'bin':
      symbolsOf(ir.a, out);
      symbolsOf(ir.b, out);
      break;
    case 'un':
      symbolsOf(ir.a, out);
      break;
    case 'call':
      for (const a of ir.args) symbolsOf(a, out);
      break;
    case 'cond':
      symbolsOf(ir.c, out);
      symbolsOf(ir.a, out);
      symbolsOf(ir.b, out);
      break;
  }
  return out;
}

/** Replaces symbols by trees (used to inline derived quantities before differentiating). */
export function substitute(ir: Ir, map: (name: string) => Ir | undefined): Ir {
  switch (ir.k) {
    case 'num':
      return ir;
    case 'sym':
      return map(ir.name) ?? ir;
    case 'bin':
      return { k: 'bin', op: ir.op, a: substitute(ir.a, map), b: substitute(ir.b, map) };
    case 'un':
      return { k: 'un', op: ir.op, a: substitute(ir.a, map) };
    case 'call':
      return { k: 'call', fn: ir.fn, args: ir.args.map((a) => substitute(a, map)) };
    case 'cond':
      return { k: 'cond', c: substitute(ir.c, map), a: substitute(ir.a, map), b: substitute(ir.b, map) };
  }
}
