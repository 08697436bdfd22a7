/**
 * The draft's problems arranged for the Build screen: by control (to show each at its
 * field), and as a summary list (errors first, then warnings, each in document order)
 * whose entries say where in words and which control to jump to.
 */
import type { Problem } from '$lib/engine/document/types';
import { describePlace, fieldForPath, type FieldPlace } from './field-paths';

export interface SummaryEntry {
  problem: Problem;
  /** `Flow phySettle, rate`. */
  place: string;
  /** The control to focus, or null for a problem about the whole document. */
  target: FieldPlace | null;
  /** A key unique within the summary. */
  key: string;
}

export interface ProblemIndex {
  /** Problems shown at each control (DOM id). */
  byField: Map<string, Problem[]>;
  /** Problems inside each forcing table, by the control that stands for the table. */
  byContainer: Map<string, Problem[]>;
  summary: SummaryEntry[];
  errors: number;
  warnings: number;
}

function push<K, V>(map: Map<K, V[]>, key: K, value: V): void {
  const list = map.get(key);
  if (list) list.push(value);
  else map.set(key, [value]);
}

export function indexProblems(problems: readonly Problem[], doc: unknown): ProblemIndex {
  const byField = new Map<string, Problem[]>();
  const byContainer = new Map<string, Problem[]>();
  const errors: SummaryEntry[] = [];
  const warnings: SummaryEntry[] = [];
  problems.forEach((problem, i) => {
    const target = fieldForPath(problem.path);
    if (target) {
      push(byField, target.field, problem);
      if (target.container) push(byContainer, target.container, problem);
    }
    const entry = { problem, place: describePlace(problem.path, doc), target, key: `${i}:${problem.code}:${problem.path}` };
    (problem.severity === 'error' ? errors : warnings).push(entry);
  });
  return { byField, byContainer, summary: [...errors, ...warnings], errors: errors.length, warnings: warnings.length };
}

/** "2 errors and 1 warning", "No problems". */
export function countWords(errors: number, warnings: number): string {
  const e = `${errors} error${errors === 1 ? '' : 's'}`;
  const w = `${warnings} warning${warnings === 1 ? '' : 's'}`;
  if (errors === 0 && warnings === 0) return 'No problems';
  if (warnings === 0) return e;
  if (errors === 0) return w;
  return `${e} and ${w}`;
}

/**
 * Engine messages mark symbols with backticks (`kDIP`); the screen shows those parts in
 * code type. Splits a message into plain and code pieces.
 */
export function messageParts(message: string): { text: string; code: boolean }[] {
  const parts: { text: string; code: boolean }[] = [];
  const pieces = message.split('`');
  // An odd number of backticks leaves the last one as written.
  const closed = pieces.length % 2 === 1;
  pieces.forEach((text, i) => {
    const code = i % 2 === 1 && (closed || i < pieces.length - 1);
    if (!code && i > 0 && !closed && i === pieces.length - 1) text = '`' + text;
    if (text) parts.push({ text, code });
  });
  return parts;
}
