/**
 * Unit inference over an expression tree. Every symbol has a unit; literals are
 * dimensionless; the engine evaluates in SI, so units equal up to a factor (`ug/L` and
 * `mg/m^3`, `1/yr` and `1/d`) need no conversion inside an expression, and a check of
 * dimensions is all that is required here. Conversions to and from the units the model
 * writes happen at the boundary (states in, rates out), with factors fixed at compile time.
 */
import type { Unit } from 'mathjs';
import { formatDims, isDimensionless, sameDims, type UnitInfo } from './math';
import { FUNCTIONS } from './functions';
import type { Ir } from './ir';
import { printIr } from './print';
import type { ExprIssue } from './parse';

/** What inference knows about a subtree. */
export interface Inferred {
  dims: number[];
  /** The value (SI) when the subtree is constant: literals, pi, e, parameters. */
  value?: number;
  /** The unit for messages, built from the operands' units as the model writes them. */
  unit: Unit | null;
  /** The unit as the model writes it, composed through the operators (`mg/m^3 · 1/d`). */
  text?: string;
  /** True when `text` is a single unit as written (no composition). */
  plain?: boolean;
}

export interface SymbolUnit {
  info: UnitInfo;
  /** SI value, for parameters (needed for exponents on a base with a unit). */
  value?: number;
}

const TIME_DIMS = [0, 0, 1, 0, 0, 0, 0, 0, 0];

/**
 * A unit for a message, as the model writes it (never the library's canonical form such
 * as `Hz` for `1/d`): a symbol's own unit, or the composition of its operands' units with
 * the SI dimension beside it.
 */
export function describeUnit(x: Inferred): string {
  if (isDimensionless(x.dims) && (!x.text || x.text === '1')) return '1 (dimensionless)';
  if (x.text && x.plain) return x.text;
  if (x.text) return `${x.text} (= ${formatDims(x.dims)})`;
  return formatDims(x.dims);
}

const wrap = (t: string | undefined) => (t === undefined ? '?' : /^[A-Za-z0-9_^]+$/.test(t) ? t : `(${t})`);

function composeText(op: '*' | '/', a: Inferred, b: Inferred): string | undefined {
  const ta = isDimensionless(a.dims) && (!a.text || a.text === '1') ? undefined : a.text;
  const tb = isDimensionless(b.dims) && (!b.text || b.text === '1') ? undefined : b.text;
  if (op === '*') {
    if (ta && tb) return `${wrap(ta)} · ${wrap(tb)}`;
    return ta ?? tb;
  }
  if (ta && tb) return `${wrap(ta)} / ${wrap(tb)}`;
  if (tb) return `1 / ${wrap(tb)}`;
  return ta;
}

function dimless(value?: number): Inferred {
  return { dims: new Array(9).fill(0), value, unit: null };
}

function combine(a: Unit | null, b: Unit | null, op: 'multiply' | 'divide'): Unit | null {
  try {
    if (a && b) return (op === 'multiply' ? a.multiply(b) : a.divide(b)) as Unit;
    if (a) return a;
    if (b) return op === 'multiply' ? b : upow(b, -1);
  } catch {
    /* messages fall back to dimension vectors */
  }
  return null;
}

// mathjs' typings declare Unit.pow(Unit); at run time it takes a number.
function upow(u: Unit, p: number): Unit {
  return (u as unknown as { pow(p: number): Unit }).pow(p);
}

function powUnit(u: Unit | null, p: number): Unit | null {
  try {
    return u ? upow(u, p) : null;
  } catch {
    return null;
  }
}

/**
 * Infers the unit of `ir`. `lookup` gives each declared symbol's unit (undefined: unknown,
 * reported elsewhere). Issues carry code `unit_mismatch` or `exponent_not_constant`.
 */
export function inferUnits(
  ir: Ir,
  lookup: (name: string) => SymbolUnit | undefined,
  issues: ExprIssue[]
): Inferred | null {
  const go = (n: Ir): Inferred | null => {
    switch (n.k) {
      case 'num':
        return dimless(n.v);
      case 'sym': {
        if (n.name === 't') return { dims: [...TIME_DIMS], unit: null };
        if (n.name === 'pi') return dimless(Math.PI);
        if (n.name === 'e') return dimless(Math.E);
        const s = lookup(n.name);
        if (!s) return null;
        return { dims: [...s.info.dims], value: s.value, unit: s.info.unit, text: s.info.text, plain: true };
      }
      case 'un': {
        const a = go(n.a);
        if (!a) return null;
        if (n.op === 'not') return dimless();
        return { dims: a.dims, value: a.value === undefined ? undefined : -a.value, unit: a.unit, text: a.text, plain: a.plain };
      }
      case 'cond': {
        const c = go(n.c);
        const a = go(n.a);
        const b = go(n.b);
        if (!c || !a || !b) return null;
        if (!sameDims(a.dims, b.dims)) {
          issues.push(mismatch('the two branches of', n, n.a, a, n.b, b));
          return null;
        }
        return { dims: a.dims, unit: a.unit ?? b.unit, text: a.text ?? b.text, plain: a.plain && b.plain && a.text === b.text };
      }
      case 'bin':
        return binary(n, go);
      case 'call':
        return call(n, go);
    }
  };

  const binary = (n: Extract<Ir, { k: 'bin' }>, rec: (n: Ir) => Inferred | null): Inferred | null => {
    const a = rec(n.a);
    const b = rec(n.b);
    if (!a || !b) return null;
    const both = a.value !== undefined && b.value !== undefined;
    switch (n.op) {
      case '+':
      case '-':
        if (!sameDims(a.dims, b.dims)) {
          issues.push(mismatch(n.op === '+' ? 'adding' : 'subtracting', n, n.a, a, n.b, b));
          return null;
        }
        return {
          dims: a.dims,
          value: both ? (n.op === '+' ? a.value! + b.value! : a.value! - b.value!) : undefined,
          unit: a.unit ?? b.unit,
          text: a.text ?? b.text,
          plain: a.plain && (b.plain ?? true) && (a.text === b.text || b.text === undefined)
        };
      case '*':
      case '/':
        return {
          dims: a.dims.map((x, i) => (n.op === '*' ? x + b.dims[i] : x - b.dims[i])),
          value: both ? (n.op === '*' ? a.value! * b.value! : a.value! / b.value!) : undefined,
          unit: combine(a.unit, b.unit, n.op === '*' ? 'multiply' : 'divide'),
          text: composeText(n.op, a, b),
          plain: (isDimensionless(a.dims) && a.text === undefined && b.plain && n.op === '*') || (isDimensionless(b.dims) && b.text === undefined && a.plain) || false
        };
      case '^':
        return power(n, n.a, a, n.b, b);
      case '<':
      case '<=':
      case '>':
      case '>=':
      case '==':
      case '!=':
        if (!sameDims(a.dims, b.dims)) {
          issues.push(mismatch('comparing', n, n.a, a, n.b, b));
          return null;
        }
        return dimless();
      case 'and':
      case 'or':
        return dimless();
    }
  };

  const power = (n: Ir, base: Ir, a: Inferred, expo: Ir, b: Inferred): Inferred | null => {
    if (!isDimensionless(b.dims)) {
      issues.push({
        code: 'unit_mismatch',
        message: `the exponent \`${printIr(expo)}\` in \`${printIr(n)}\` must be dimensionless, but its unit is ${describeUnit(b)}`
      });
      return null;
    }
    if (isDimensionless(a.dims)) {
      const v = a.value !== undefined && b.value !== undefined ? Math.pow(a.value, b.value) : undefined;
      return dimless(v);
    }
    if (b.value === undefined) {
      issues.push({
        code: 'exponent_not_constant',
        message: `\`${printIr(base)}\` has the unit ${describeUnit(a)}, so its exponent \`${printIr(expo)}\` must be a number or a parameter`
      });
      return null;
    }
    const p = b.value;
    return {
      dims: a.dims.map((x) => x * p),
      value: a.value !== undefined ? Math.pow(a.value, p) : undefined,
      unit: powUnit(a.unit, p),
      text: p === 1 ? a.text : `${wrap(a.text)}^${Math.round(p * 1000) / 1000}`,
      plain: p === 1 && a.plain
    };
  };

  const call = (n: Extract<Ir, { k: 'call' }>, rec: (n: Ir) => Inferred | null): Inferred | null => {
    const args = n.args.map(rec);
    if (args.some((a) => a === null)) return null;
    const xs = args as Inferred[];
    const spec = FUNCTIONS[n.fn];
    const allConst = xs.every((x) => x.value !== undefined);
    switch (spec.unit) {
      case 'dimensionless': {
        const bad = xs.findIndex((x) => !isDimensionless(x.dims));
        if (bad >= 0) {
          issues.push({
            code: 'unit_mismatch',
            message: `the argument of \`${n.fn}\` must be dimensionless, but \`${printIr(n.args[bad])}\` has the unit ${describeUnit(xs[bad])} (divide it by a reference value with the same unit)`
          });
          return null;
        }
        return dimless();
      }
      case 'sqrt':
        return {
          dims: xs[0].dims.map((x) => x / 2),
          value: allConst ? Math.sqrt(xs[0].value!) : undefined,
          unit: powUnit(xs[0].unit, 0.5),
          text: xs[0].text ? `sqrt(${xs[0].text})` : undefined
        };
      case 'same': {
        for (let i = 1; i < xs.length; i++) {
          if (!sameDims(xs[0].dims, xs[i].dims)) {
            issues.push(mismatch(`the arguments of \`${n.fn}\`:`, n, n.args[0], xs[0], n.args[i], xs[i]));
            return null;
          }
        }
        const first = xs.find((x) => x.text);
        return { dims: xs[0].dims, unit: xs.find((x) => x.unit)?.unit ?? null, text: first?.text, plain: first?.plain };
      }
      case 'power':
        return power(n, n.args[0], xs[0], n.args[1], xs[1]);
      case 'saturation':
      case 'hill': {
        if (!sameDims(xs[0].dims, xs[1].dims)) {
          issues.push(mismatch(`the arguments of \`${n.fn}\`:`, n, n.args[0], xs[0], n.args[1], xs[1]));
          return null;
        }
        if (spec.unit === 'hill' && !isDimensionless(xs[2].dims)) {
          issues.push({
            code: 'unit_mismatch',
            message: `the steepness \`${printIr(n.args[2])}\` of \`hill\` must be dimensionless, but its unit is ${describeUnit(xs[2])}`
          });
          return null;
        }
        return dimless();
      }
    }
  };

  return go(ir);
}

function mismatch(what: string, whole: Ir, l: Ir, a: Inferred, r: Ir, b: Inferred): ExprIssue {
  return {
    code: 'unit_mismatch',
    message: `unit mismatch ${what} \`${printIr(l)}\` (${describeUnit(a)}) and \`${printIr(r)}\` (${describeUnit(b)}) in \`${printIr(whole)}\``
  };
}
