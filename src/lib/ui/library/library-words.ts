/**
 * What the Models page says about entries, in words: pure functions, so tests can check
 * the words and every part of the page says a thing the same way.
 */
import type { Problem } from '$lib/engine/document/types';
import type { ModelEntry } from '$lib/storage/types';

/** `sha256:` and the first 12 hex digits: enough to tell revisions apart at a glance. */
export function shortDigest(digest: string | null | undefined): string {
  if (!digest) return '';
  const [algo, hex] = digest.includes(':') ? digest.split(':', 2) : ['sha256', digest];
  return `${algo}:${hex.slice(0, 12)}`;
}

/** "revision 3" or "not saved yet". */
export function revisionWords(entry: Pick<ModelEntry, 'head'>): string {
  return entry.head > 0 ? `revision ${entry.head}` : 'not saved yet';
}

/** The draft's state in words (never a colour alone): "draft changed" or "no draft changes". */
export function draftWords(entry: Pick<ModelEntry, 'dirty'>): string {
  return entry.dirty ? 'draft changed' : 'no draft changes';
}

const ORIGINS: Record<ModelEntry['origin'], string> = {
  example: 'example',
  empty: 'started empty',
  import: 'imported',
  duplicate: 'copy'
};

export function originWords(origin: ModelEntry['origin']): string {
  return ORIGINS[origin] ?? origin;
}

/** "1 Mar 2027, 09:00" in the reader's time zone (or the one given, for tests). */
export function formatChange(iso: string, timeZone?: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return 'unknown';
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', ...(timeZone ? { timeZone } : {}) }).format(d);
}

/** "Deleted 'X' with its draft and 3 revisions." — what went with the entry. */
export function deletionWords(entry: Pick<ModelEntry, 'title' | 'head' | 'dirty'>): string {
  const n = entry.head;
  const revisions = `${n} revision${n === 1 ? '' : 's'}`;
  return entry.dirty ? `Deleted '${entry.title}' with its draft and ${revisions}.` : `Deleted '${entry.title}' with its ${revisions}.`;
}

/** One problem of a refused file: "states[0].id (TP): the key 'id' appears twice …". */
export function problemLine(p: Problem): string {
  const where = p.path || 'the whole file';
  return `${where}${p.id ? ` (${p.id})` : ''}: ${p.message}`;
}

/** "f.json was not imported, nothing was added: 2 problems." */
export function refusalWords(fileName: string, problems: readonly Problem[]): string {
  const errors = problems.filter((p) => p.severity === 'error').length;
  return `${fileName} was not imported, nothing was added: ${errors} problem${errors === 1 ? '' : 's'}.`;
}

/** Why a typed title cannot be used, or null. */
export function titleProblem(title: string): string | null {
  if (!title.trim()) return 'A title cannot be empty.';
  if (title.trim().length > 200) return 'A title can have at most 200 characters.';
  return null;
}
