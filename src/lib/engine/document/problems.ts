/**
 * Problems found in documents: a stable code, where (JSON path, item id) and words a
 * modeller understands. The codes are listed in DEVELOPERS.md; tests check codes.
 */
import type { Problem } from './types';

export class ProblemList {
  readonly items: Problem[] = [];
  constructor(private readonly document: 'model' | 'scenario') {}

  error(code: string, path: string, message: string, id?: string): void {
    this.items.push({ severity: 'error', code, path, message, document: this.document, ...(id ? { id } : {}) });
  }
  warning(code: string, path: string, message: string, id?: string): void {
    this.items.push({ severity: 'warning', code, path, message, document: this.document, ...(id ? { id } : {}) });
  }
  get hasErrors(): boolean {
    return this.items.some((p) => p.severity === 'error');
  }
}

export function hasErrors(problems: readonly Problem[]): boolean {
  return problems.some((p) => p.severity === 'error');
}

/** A problem as one line: `flows[3].rate (uptake): unknown symbol ...`. */
export function formatProblem(p: Problem, file?: string): string {
  const where = `${file ? `${file}: ` : ''}${p.path || '(document)'}${p.id ? ` (${p.id})` : ''}`;
  return `${p.severity}: ${where}: ${p.message} [${p.code}]`;
}

/** Levenshtein distance, for "did you mean" suggestions. */
export function editDistance(a: string, b: string): number {
  const m = a.length;
  const n = b.length;
  let prev = new Array(n + 1);
  let cur = new Array(n + 1);
  for (let j = 0; j <= n; j++) prev[j] = j;
  for (let i = 1; i <= m; i++) {
    cur[0] = i;
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
    }
    [prev, cur] = [cur, prev];
  }
  return prev[n];
}

/** The closest candidate within a sensible distance, or undefined. */
export function nearest(word: string, candidates: Iterable<string>): string | undefined {
  let best: string | undefined;
  let bestD = Infinity;
  const lw = word.toLowerCase();
  for (const c of candidates) {
    const d = editDistance(lw, c.toLowerCase());
    if (d < bestD) {
      bestD = d;
      best = c;
    }
  }
  // Short names are close to everything: one letter gets no suggestion, two or three one edit.
  const limit = word.length <= 1 ? 0 : word.length <= 3 ? 1 : Math.max(2, Math.floor(word.length / 3));
  return best !== undefined && bestD <= limit ? best : undefined;
}

export function didYouMean(word: string, candidates: Iterable<string>): string {
  const n = nearest(word, candidates);
  return n ? `; did you mean \`${n}\`?` : '';
}
