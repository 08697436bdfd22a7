/**
 * Completion of symbol names in expression fields: the word at the caret, the candidates
 * that fit it (declared ids with their kind and unit, the allowed functions, `t`, `pi`,
 * `e`), and the text after accepting one. Pure functions; the combobox only shows them.
 */
import { FUNCTIONS } from '$lib/engine/expr/functions';
import { SECTIONS, type Section } from './field-paths';

export type CandidateKind = 'parameter' | 'forcing' | 'state' | 'derived' | 'function' | 'constant';

export interface Candidate {
  name: string;
  kind: CandidateKind;
  /** The unit (symbols) or what it does (functions, constants). */
  detail: string;
  /** The text put in place of the word: `name`, or `name(` for a function. */
  insert: string;
}

export interface WordRange {
  start: number;
  end: number;
  /** The part of the word before the caret: what the candidates are filtered by. */
  prefix: string;
}

const WORD_CHAR = /[A-Za-z0-9_]/;

/**
 * The identifier being typed at `caret`, or null when the caret is not in one (or in a
 * number such as `1e5` or `2.5`). The range covers the whole word, also after the caret.
 */
export function wordAt(text: string, caret: number): WordRange | null {
  let start = caret;
  while (start > 0 && WORD_CHAR.test(text[start - 1])) start--;
  let end = caret;
  while (end < text.length && WORD_CHAR.test(text[end])) end++;
  if (start === caret) return null;
  if (/[0-9]/.test(text[start])) return null;
  // `1.5e3`: the `e3` after a digit and a point is part of a number, not a name.
  if (start > 0 && text[start - 1] === '.') return null;
  return { start, end, prefix: text.slice(start, caret) };
}

/** Which symbols an expression field may use (as the engine allows them). */
export interface ExpressionContext {
  kinds: readonly ('parameter' | 'forcing' | 'state' | 'derived')[];
  /** `t` (days since the time origin) is offered. */
  time: boolean;
  /** The item's own id, never offered (a derived quantity cannot read itself). */
  self?: string;
}

/** The fields with expressions and what the engine lets each of them read. */
export const EXPRESSION_CONTEXTS = {
  forcing: { kinds: ['parameter'], time: true },
  size: { kinds: ['parameter'], time: false },
  derived: { kinds: ['parameter', 'forcing', 'state', 'derived'], time: true },
  rate: { kinds: ['parameter', 'forcing', 'state', 'derived'], time: true }
} as const satisfies Record<string, ExpressionContext>;

const KIND_OF: Readonly<Record<Section, CandidateKind>> = {
  parameters: 'parameter',
  forcings: 'forcing',
  states: 'state',
  derived: 'derived',
  flows: 'function' // flows are not symbols of expressions; never used
};

/** The candidates a field may offer, from the draft (valid or not). */
export function candidatesFor(doc: unknown, context: ExpressionContext): Candidate[] {
  const out: Candidate[] = [];
  const seen = new Set<string>();
  const d = (doc ?? {}) as Record<string, unknown>;
  for (const section of SECTIONS) {
    const kind = KIND_OF[section];
    if (section === 'flows' || !(context.kinds as readonly string[]).includes(kind)) continue;
    const list = d[section];
    if (!Array.isArray(list)) continue;
    for (const item of list) {
      if (typeof item !== 'object' || item === null) continue;
      const { id, unit } = item as Record<string, unknown>;
      if (typeof id !== 'string' || !/^[A-Za-z_][A-Za-z0-9_]*$/.test(id) || id === context.self || seen.has(id)) continue;
      seen.add(id);
      out.push({ name: id, kind, detail: typeof unit === 'string' ? unit : '', insert: id });
    }
  }
  if (context.time) out.push({ name: 't', kind: 'constant', detail: 'days since the time origin', insert: 't' });
  out.push({ name: 'pi', kind: 'constant', detail: '3.14159…', insert: 'pi' });
  out.push({ name: 'e', kind: 'constant', detail: '2.71828…', insert: 'e' });
  for (const [name, spec] of Object.entries(FUNCTIONS)) {
    out.push({ name, kind: 'function', detail: spec.description, insert: `${name}(` });
  }
  return out;
}

/**
 * The candidates that fit `prefix`, best first: the name itself, names starting with it, then
 * starting with it in other case, then containing it; symbols before functions and
 * constants, shorter before longer. Nothing when the only fit is the word itself.
 */
export function filterCandidates(prefix: string, all: readonly Candidate[], limit = 8): Candidate[] {
  if (prefix === '') return [];
  const lower = prefix.toLowerCase();
  const rank = (c: Candidate): number => {
    if (c.name === prefix) return 0;
    if (c.name.startsWith(prefix)) return 1;
    if (c.name.toLowerCase().startsWith(lower)) return 2;
    if (prefix.length >= 2 && c.name.toLowerCase().includes(lower)) return 3;
    return -1;
  };
  const group = (c: Candidate) => (c.kind === 'function' || c.kind === 'constant' ? 1 : 0);
  const hits = all
    .map((c) => ({ c, r: rank(c) }))
    .filter((x) => x.r >= 0)
    .sort((a, b) => a.r - b.r || group(a.c) - group(b.c) || a.c.name.length - b.c.name.length || a.c.name.localeCompare(b.c.name))
    .map((x) => x.c)
    .slice(0, limit);
  if (hits.length === 1 && hits[0].name === prefix && hits[0].kind !== 'function') return [];
  return hits;
}

/** The text and caret after putting `candidate` in place of the word. */
export function acceptCandidate(text: string, range: WordRange, candidate: Candidate): { text: string; caret: number } {
  let insert = candidate.insert;
  let after = text.slice(range.end);
  // A function whose parenthesis is already there gets no second one.
  if (insert.endsWith('(') && after.startsWith('(')) {
    insert = insert.slice(0, -1);
    after = after.slice(1);
    const caret = range.start + insert.length + 1;
    return { text: text.slice(0, range.start) + insert + '(' + after, caret };
  }
  return { text: text.slice(0, range.start) + insert + after, caret: range.start + insert.length };
}
