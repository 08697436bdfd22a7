import { describe, expect, test } from 'vitest';
import type { Revision } from '$lib/storage/types';
import { commitWords, formatSavedAt, revisionRow, shortDigest } from './revisions';

const revision: Revision = {
  entryKey: 'k',
  number: 3,
  digest: 'sha256:0123456789abcdef0123456789abcdef0123456789abcdef0123456789abcdef',
  doc: {} as Revision['doc'],
  savedAt: '2027-03-01T14:05:09.000Z',
  note: 'lower release'
};

describe('revisions in words', () => {
  test('shortDigest(digest) is the algorithm and the first 12 hex digits', () => {
    expect(shortDigest(revision.digest)).toBe('sha256:0123456789ab');
    expect(shortDigest(null)).toBe('');
  });

  test('formatSavedAt(iso) is a UTC date and time', () => {
    expect(formatSavedAt(revision.savedAt)).toBe('2027-03-01 14:05 UTC');
    expect(formatSavedAt('not a date')).toBe('not a date');
  });

  test('revisionRow(revision) holds number, date, short digest and note', () => {
    expect(revisionRow(revision)).toEqual({ number: 3, date: '2027-03-01 14:05 UTC', digest: 'sha256:0123456789ab', fullDigest: revision.digest, note: 'lower release' });
  });

  test('commitWords says the new revision and digest, an unchanged draft, or what blocks the save', () => {
    expect(commitWords({ ok: true, revision, unchanged: false })).toEqual({ ok: true, text: 'Saved as revision 3, digest sha256:0123456789ab.' });
    expect(commitWords({ ok: true, revision, unchanged: true }).text).toBe('No new revision: revision 3 (sha256:0123456789ab) already holds this document.');
    const blocked = commitWords({
      ok: false,
      problems: [
        { severity: 'error', code: 'unit_mismatch', path: 'flows[0].rate', message: 'x' },
        { severity: 'warning', code: 'unknown_field', path: 'x', message: 'y' }
      ]
    });
    expect(blocked).toEqual({ ok: false, text: 'Not saved: the draft has 1 error and 1 warning. Fix the errors listed under Problems, then save again.' });
  });
});
