/** Writes an expression tree back as text (for messages and the balance equations). */
import type { Ir } from './ir';

const PREC: Record<string, number> = {
  or: 1,
  and: 2,
  '<': 3, '<=': 3, '>': 3, '>=': 3, '==': 3, '!=': 3,
  '+': 4, '-': 4,
  '*': 5, '/': 5,
  '^': 7
};

export function printIr(ir: Ir, parentPrec = 0): string {
  switch (ir.k) {
    case 'num':
      return String(ir.v);
    case 'sym':
      return ir.name;
    case 'un': {
      const inner = printIr(ir.a, 6);
      const s = ir.op === 'not' ? `not ${inner}` : `-${inner}`;
      return parentPrec > 6 ? `(${s})` : s;
    }
    case 'bin': {
      const p = PREC[ir.op];
      // `^` is right-associative; `-` and `/` are left-associative.
      const left = printIr(ir.a, ir.op === '^' ? p + 1 : p);
      const right = printIr(ir.b, ir.op === '^' ? p : p + 1);
      const s = ir.op === '^' ? `${left}^${right}` : `${left} ${ir.op} ${right}`;
      return p < parentPrec ? `(${s})` : s;
    }
    case 'call':
      return `${ir.fn}(${ir.args.map((a) => printIr(a)).join(', ')})`;
    case 'cond': {
      const s = `${printIr(ir.c, 1)} ? ${printIr(ir.a, 1)} : ${printIr(ir.b, 1)}`;
      return parentPrec > 0 ? `(${s})` : s;
    }
  }
}
