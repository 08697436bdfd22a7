/**
 * Revisions in words for the Build screen's save button and history panel.
 */
import type { CommitResult, Revision } from '$lib/storage/types';
import { countWords } from './problem-index';
// One way of shortening a digest on every screen: `sha256:` and its first 12 hex digits.
import { shortDigest } from '../library/library-words';

export { shortDigest };

/** An ISO timestamp as `2027-03-01 14:05 UTC` (the app keeps time in UTC). */
export function formatSavedAt(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return `${d.toISOString().slice(0, 10)} ${d.toISOString().slice(11, 16)} UTC`;
}

export interface RevisionRow {
  number: number;
  date: string;
  digest: string;
  fullDigest: string;
  note: string;
}

export function revisionRow(r: Revision): RevisionRow {
  return { number: r.number, date: formatSavedAt(r.savedAt), digest: shortDigest(r.digest), fullDigest: r.digest, note: r.note ?? '' };
}

/** What the save button reports after `commit`. */
export function commitWords(result: CommitResult): { ok: boolean; text: string } {
  if (result.ok) {
    const { number, digest } = result.revision;
    return result.unchanged
      ? { ok: true, text: `No new revision: revision ${number} (${shortDigest(digest)}) already holds this document.` }
      : { ok: true, text: `Saved as revision ${number}, digest ${shortDigest(digest)}.` };
  }
  if (result.problems.length === 0) return { ok: false, text: 'Not saved: the library refused the draft.' };
  const errors = result.problems.filter((p) => p.severity === 'error').length;
  const warnings = result.problems.length - errors;
  return { ok: false, text: `Not saved: the draft has ${countWords(errors, warnings).toLowerCase()}. Fix the errors listed under Problems, then save again.` };
}
