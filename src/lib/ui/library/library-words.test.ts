import { describe, expect, it } from 'vitest';
import {
  deletionWords,
  draftWords,
  formatChange,
  problemLine,
  refusalWords,
  revisionWords,
  shortDigest,
  titleProblem
} from './library-words';

describe('library words', () => {
  it('shortDigest keeps the algorithm and the first 12 hex digits', () => {
    expect(shortDigest('sha256:0123456789abcdef0123')).toBe('sha256:0123456789ab');
    expect(shortDigest(null)).toBe('');
  });

  it('revisionWords and draftWords say the state in words', () => {
    expect(revisionWords({ head: 3 })).toBe('revision 3');
    expect(revisionWords({ head: 0 })).toBe('not saved yet');
    expect(draftWords({ dirty: true })).toBe('draft changed');
    expect(draftWords({ dirty: false })).toBe('no draft changes');
  });

  it('formatChange gives day, month, year and time in the time zone given', () => {
    expect(formatChange('2027-03-01T09:05:00.000Z', 'UTC')).toBe('1 Mar 2027, 09:05');
    expect(formatChange('not a date')).toBe('unknown');
  });

  it('deletionWords says what goes with the entry: its draft (when changed) and its revisions', () => {
    expect(deletionWords({ title: 'Lake A', head: 3, dirty: true })).toBe("Deleted 'Lake A' with its draft and 3 revisions.");
    expect(deletionWords({ title: 'Lake A', head: 1, dirty: false })).toBe("Deleted 'Lake A' with its 1 revision.");
  });

  it('problemLine names the path, the id and what is wrong', () => {
    expect(problemLine({ severity: 'error', code: 'duplicate_key', path: 'states[0].id', message: "the key 'id' appears twice" })).toBe(
      "states[0].id: the key 'id' appears twice"
    );
    expect(problemLine({ severity: 'error', code: 'unknown_state', path: 'flows[0].to', id: 'load', message: 'unknown state' })).toBe(
      'flows[0].to (load): unknown state'
    );
    expect(problemLine({ severity: 'error', code: 'json_syntax', path: '', message: 'not valid JSON' })).toBe('the whole file: not valid JSON');
  });

  it('refusalWords counts the errors and says nothing was added', () => {
    const p = { severity: 'error' as const, code: 'x', path: '', message: 'm' };
    expect(refusalWords('bad.json', [p, { ...p, severity: 'warning' }])).toBe('bad.json was not imported, nothing was added: 1 problem.');
  });

  it('titleProblem refuses an empty or overlong title', () => {
    expect(titleProblem('  ')).toMatch(/empty/);
    expect(titleProblem('x'.repeat(201))).toMatch(/200/);
    expect(titleProblem('Lake B')).toBeNull();
  });
});
