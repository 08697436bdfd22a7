/**
 * Numbers typed as text. A number field stores a number in the draft when the text reads
 * as a finite decimal number, and otherwise the text itself (the draft stays JSON and may
 * be invalid), so that the engine reports `not_a_number` at that field in its own words.
 */

/** Plain decimal notation with an optional exponent: `3.8e6`, `-0.5`, `.25`, `1.`. */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** What a number field puts into the draft: a number, the text as typed, or nothing (empty). */
export type NumberEntry = { kind: 'number'; value: number } | { kind: 'text'; value: string } | { kind: 'empty' };

export function parseNumberText(text: string): NumberEntry {
  const s = text.trim();
  if (s === '') return { kind: 'empty' };
  if (DECIMAL.test(s)) {
    const value = Number(s);
    if (Number.isFinite(value)) return { kind: 'number', value };
  }
  return { kind: 'text', value: text };
}

/** The text a number field shows for a draft value (a number, a string typed earlier, or nothing). */
export function numberFieldText(value: unknown): string {
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') return value;
  if (value === undefined || value === null) return '';
  return JSON.stringify(value);
}

/**
 * True when the text being typed already stands for `value`, so the field keeps the text
 * as typed (`1.` or `1.50` while the draft holds 1.5) instead of rewriting it.
 */
export function textMatchesValue(text: string, value: unknown): boolean {
  const entry = parseNumberText(text);
  if (entry.kind === 'number') return entry.value === value;
  if (entry.kind === 'empty') return value === undefined;
  return entry.value === value;
}
