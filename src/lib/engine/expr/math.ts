/**
 * The engine's own mathjs instance: the expression parser and the unit library.
 * mathjs is used to parse and to reason about units only; it is never called while a
 * run integrates (the right-hand side is generated JavaScript, see expr/codegen.ts).
 */
import { create, all, type MathJsInstance, type Unit } from 'mathjs';

let instance: MathJsInstance | null = null;

/** The trade's short units that mathjs lacks, defined on the engine's instance only. */
const EXTRA_UNITS: ReadonlyArray<[string, string]> = [
  ['d', '1 day'],
  ['yr', '365.25 day'],
  ['ha', '10000 m^2']
];

export function engineMath(): MathJsInstance {
  if (instance) return instance;
  const m = create(all, {});
  for (const [name, def] of EXTRA_UNITS) {
    if (!m.Unit.isValuelessUnit(name)) m.createUnit(name, def);
  }
  instance = m;
  return m;
}

/**
 * Temperature units are index quantities: the unit check treats them as plain numbers
 * (so `theta^(T - 20)` checks) and no offset conversion is ever applied.
 */
export const PLAIN_UNITS: ReadonlySet<string> = new Set(['degC', 'degF', 'celsius', 'fahrenheit']);

/** A unit as the engine reasons about it: its dimension vector and the factor to SI. */
export interface UnitInfo {
  /** The unit string as the model writes it. */
  text: string;
  /** Exponents of the mathjs base dimensions (mass, length, time, ...). */
  dims: number[];
  /** Multiply a value in this unit by `si` to get the SI value. */
  si: number;
  /** The mathjs unit (valueless), for arithmetic in messages; null for dimensionless. */
  unit: Unit | null;
}

const DIMENSIONLESS_DIMS = (): number[] => new Array(9).fill(0);

export function dimensionless(text = '1'): UnitInfo {
  return { text, dims: DIMENSIONLESS_DIMS(), si: 1, unit: null };
}

/** Parses a unit string; returns an error message when it is not a unit. */
export function parseUnit(text: string): UnitInfo | { error: string } {
  const s = text.trim();
  if (s === '' ) return { error: 'empty unit (write 1 for dimensionless)' };
  if (s === '1' || PLAIN_UNITS.has(s)) return dimensionless(s);
  const m = engineMath();
  // `1/d`, `1/yr`: mathjs reads a leading 1 as a value, so invert the rest instead.
  const reciprocal = /^1\s*\/\s*(.+)$/.exec(s);
  const body = reciprocal ? reciprocal[1].replace(/^\((.*)\)$/, '$1') : s;
  try {
    const u = m.unit(body);
    if (u.value !== null && u.value !== undefined) {
      // `2 m` parses as a unit with a value: not a unit string.
      return { error: `'${s}' is a quantity, not a unit` };
    }
    const si = m.unit(1, body).toSI().value as unknown as number;
    const dims = [...u.dimensions];
    if (dims[4] !== 0) {
      return { error: `temperature unit '${s}' inside a compound unit is not supported (use degC alone)` };
    }
    if (!reciprocal) return { text: s, dims, si, unit: u };
    return {
      text: s,
      dims: dims.map((x) => -x),
      si: 1 / si,
      unit: (u as unknown as { pow(p: number): Unit }).pow(-1)
    };
  } catch (e) {
    return { error: `'${s}' is not a unit (${(e as Error).message})` };
  }
}

export function sameDims(a: number[], b: number[]): boolean {
  for (let i = 0; i < a.length; i++) if (Math.abs(a[i] - b[i]) > 1e-12) return false;
  return true;
}

export function isDimensionless(d: number[]): boolean {
  return d.every((x) => Math.abs(x) < 1e-12);
}

const BASE_SYMBOLS = ['kg', 'm', 's', 'A', 'K', 'cd', 'mol', 'rad', 'bit'];

/** A dimension vector written with SI base units, e.g. `kg m^-3 s^-1`. */
export function formatDims(d: number[]): string {
  const parts: string[] = [];
  d.forEach((x, i) => {
    if (Math.abs(x) < 1e-12) return;
    const r = Math.round(x * 1000) / 1000;
    parts.push(r === 1 ? BASE_SYMBOLS[i] : `${BASE_SYMBOLS[i]}^${r}`);
  });
  return parts.length ? parts.join(' ') : '1';
}
