/**
 * Expression parsing: mathjs parses, then an allow-list of OPERATORS and functions (not of
 * node kinds: mathjs reads `50%`, `a mod b`, `x to cm`, `k'` and `k1 Xa` as operators)
 * turns the parse tree into the engine's own tree (expr/ir.ts), or into problems that
 * name the construct.
 */
import type { MathNode } from 'mathjs';
import { engineMath } from './math';
import { FUNCTIONS, isAllowedFunction } from './functions';
import type { BinaryOp, Ir } from './ir';

export interface ExprIssue {
  code: string;
  message: string;
}

export type ParseResult = { ok: true; ir: Ir } | { ok: false; issues: ExprIssue[] };

const BINARY: Readonly<Record<string, BinaryOp>> = Object.assign(Object.create(null), {
  add: '+',
  subtract: '-',
  multiply: '*',
  divide: '/',
  pow: '^',
  smaller: '<',
  smallerEq: '<=',
  larger: '>',
  largerEq: '>=',
  equal: '==',
  unequal: '!=',
  and: 'and',
  or: 'or'
});

/** What a refused operator is, in words. */
const REFUSED_OPERATORS: Readonly<Record<string, string>> = Object.assign(Object.create(null), {
  mod: 'the modulo operator',
  to: 'unit conversion (`to`/`in`)',
  ctranspose: 'the transpose operator `\'`',
  transpose: 'the transpose operator',
  factorial: 'the factorial `!`',
  dotMultiply: 'element-wise `.*`',
  dotDivide: 'element-wise `./`',
  dotPow: 'element-wise `.^`',
  xor: '`xor`',
  bitAnd: 'bitwise `&`',
  bitOr: 'bitwise `|`',
  bitXor: 'bitwise `^|`',
  bitNot: 'bitwise `~`',
  leftShift: '`<<`',
  rightArithShift: '`>>`',
  rightLogShift: '`>>>`',
  nullish: '`??`'
});

const NODE_WORDS: Readonly<Record<string, string>> = Object.assign(Object.create(null), {
  AssignmentNode: 'an assignment',
  FunctionAssignmentNode: 'a function definition',
  BlockNode: 'several statements',
  AccessorNode: 'property or index access',
  IndexNode: 'an index',
  ArrayNode: 'a matrix or list',
  ObjectNode: 'an object',
  RangeNode: 'a range',
  RelationalNode: 'a chained comparison (write `(a < b) and (b < c)`)'
});

/** Longest expression accepted, in characters (a rate law of the trade is well under 500). */
export const MAX_EXPRESSION_CHARS = 2000;
/** Deepest nesting of brackets accepted in an expression. */
export const MAX_EXPRESSION_DEPTH = 32;

export function parseExpression(source: string): ParseResult {
  if (typeof source !== 'string' || source.trim() === '') {
    return { ok: false, issues: [{ code: 'empty_expression', message: 'the expression is empty' }] };
  }
  if (source.length > MAX_EXPRESSION_CHARS) {
    return { ok: false, issues: [{ code: 'expression_too_long', message: `the expression is ${source.length} characters long; at most ${MAX_EXPRESSION_CHARS} are allowed (split it into derived quantities)` }] };
  }
  let depth = 0;
  for (let k = 0; k < source.length; k++) {
    const c = source[k];
    if (c === '(' || c === '[' || c === '{') depth++;
    else if (c === ')' || c === ']' || c === '}') depth--;
    if (depth > MAX_EXPRESSION_DEPTH) {
      return { ok: false, issues: [{ code: 'expression_too_deep', message: `brackets are nested more than ${MAX_EXPRESSION_DEPTH} deep (at character ${k + 1}); split the expression into derived quantities` }] };
    }
  }
  // mathjs reads `#` as a comment and `0x1F`/`0b101`/`0o17` as numbers: neither belongs in a rate.
  const hash = source.indexOf('#');
  if (hash >= 0) {
    return { ok: false, issues: [{ code: 'forbidden_construct', message: `\`#\` (a comment) is not allowed in an expression (at character ${hash + 1})` }] };
  }
  const radix = /(^|[^A-Za-z0-9_.])0[xXbBoO][0-9A-Fa-f]/.exec(source);
  if (radix) {
    return { ok: false, issues: [{ code: 'forbidden_construct', message: `hexadecimal, binary and octal numbers are not allowed (\`${radix[0].trim()}…\`); write decimal numbers` }] };
  }
  let node: MathNode;
  try {
    node = engineMath().parse(source);
  } catch (e) {
    const msg = (e as Error).message.replace(/^SyntaxError:\s*/, '');
    return { ok: false, issues: [{ code: 'syntax_error', message: `syntax error: ${msg}` }] };
  }
  const issues: ExprIssue[] = [];
  const ir = convert(node, issues);
  return issues.length || !ir ? { ok: false, issues } : { ok: true, ir };
}

function text(node: MathNode): string {
  try {
    return node.toString();
  } catch {
    return node.type;
  }
}

// mathjs node fields are read through this narrow view to keep the conversion typed.
interface AnyNode {
  type: string;
  value?: unknown;
  name?: string;
  op?: string;
  fn?: string | { name?: string; type?: string };
  args?: MathNode[];
  implicit?: boolean;
  isPercentage?: boolean;
  content?: MathNode;
  condition?: MathNode;
  trueExpr?: MathNode;
  falseExpr?: MathNode;
}

function convert(node: MathNode, issues: ExprIssue[]): Ir | null {
  const n = node as unknown as AnyNode;
  switch (n.type) {
    case 'ConstantNode': {
      if (typeof n.value === 'number' && Number.isFinite(n.value)) return { k: 'num', v: n.value };
      issues.push({
        code: 'forbidden_construct',
        message: `${typeof n.value === 'string' ? 'a string' : 'the constant'} ${text(node)} is not allowed; expressions use numbers and declared symbols`
      });
      return null;
    }
    case 'SymbolNode':
      return { k: 'sym', name: String(n.name) };
    case 'ParenthesisNode':
      return convert(n.content as MathNode, issues);
    case 'ConditionalNode': {
      const c = convert(n.condition as MathNode, issues);
      const a = convert(n.trueExpr as MathNode, issues);
      const b = convert(n.falseExpr as MathNode, issues);
      return c && a && b ? { k: 'cond', c, a, b } : null;
    }
    case 'OperatorNode': {
      const fn = String(n.fn);
      const args = n.args ?? [];
      if (n.implicit) {
        issues.push({
          code: 'implicit_multiplication',
          message: `write \`*\` between \`${text(args[0])}\` and \`${text(args[1])}\``
        });
        args.forEach((a) => convert(a, issues));
        return null;
      }
      if (n.isPercentage) {
        issues.push({ code: 'forbidden_operator', message: `percentages (\`${text(node)}\`) are not allowed; write the fraction, e.g. 0.5 for 50%` });
        return null;
      }
      if (fn === 'unaryMinus' || fn === 'unaryPlus' || fn === 'not') {
        const a = convert(args[0], issues);
        if (!a) return null;
        if (fn === 'unaryPlus') return a;
        return { k: 'un', op: fn === 'not' ? 'not' : '-', a };
      }
      const op = BINARY[fn];
      if (op && args.length === 2) {
        const a = convert(args[0], issues);
        const b = convert(args[1], issues);
        return a && b ? { k: 'bin', op, a, b } : null;
      }
      const what = REFUSED_OPERATORS[fn] ?? `the operator \`${n.op}\``;
      issues.push({
        code: 'forbidden_operator',
        message: `${what} is not allowed (in \`${text(node)}\`); allowed: + - * / ^, comparisons, and, or, not, a ? b : c`
      });
      return null;
    }
    case 'FunctionNode': {
      const f = n.fn as { name?: string; type?: string } | undefined;
      if (!f || f.type !== 'SymbolNode' || typeof f.name !== 'string') {
        issues.push({ code: 'forbidden_construct', message: `calling \`${text(node)}\` is not allowed` });
        return null;
      }
      const name = f.name;
      const args = n.args ?? [];
      if (!isAllowedFunction(name)) {
        issues.push({
          code: 'unknown_function',
          message: `unknown function \`${name}\`; allowed: ${Object.keys(FUNCTIONS).join(', ')} (if \`${name}\` is a symbol, write \`${name} * (…)\`)`
        });
        return null;
      }
      const spec = FUNCTIONS[name];
      if (args.length < spec.minArgs || args.length > spec.maxArgs) {
        const want = spec.minArgs === spec.maxArgs ? `${spec.minArgs}` : `${spec.minArgs} to ${spec.maxArgs}`;
        issues.push({
          code: 'wrong_arity',
          message: `\`${name}\` takes ${want} argument${want === '1' ? '' : 's'}, got ${args.length}`
        });
        return null;
      }
      const conv = args.map((a) => convert(a, issues));
      if (conv.some((a) => a === null)) return null;
      return { k: 'call', fn: name, args: conv as Ir[] };
    }
    default: {
      const what = NODE_WORDS[n.type] ?? `the construct ${n.type}`;
      issues.push({ code: 'forbidden_construct', message: `${what} is not allowed: \`${text(node)}\`` });
      return null;
    }
  }
}
