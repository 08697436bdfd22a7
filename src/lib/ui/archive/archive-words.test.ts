import { describe, expect, it } from 'vitest';
import type { LogEntry } from '$lib/archive/log';
import { entryWords, importWords, reproductionWords } from './archive-words';

const entry = (over: Partial<LogEntry> = {}): LogEntry => ({
  format: 'lakeledger.log/1',
  seq: 3,
  at: '2027-03-01T09:05:00.000Z',
  by: 'A. Limnologist',
  action: 'run',
  subject: { kind: 'run', id: 'run_0123456789abcdef', digest: 'sha256:00' },
  note: 'Baseline: ok',
  prev: null,
  digest: 'sha256:11',
  ...over
});

describe('archive words', () => {
  it('a log entry: when in UTC, who (or that no name was given), what with its note', () => {
    expect(entryWords(entry())).toEqual({ when: '2027-03-01 09:05 UTC', who: 'A. Limnologist', what: 'ran run run_0123456789abcdef (Baseline: ok)' });
    expect(entryWords(entry({ by: ' ', action: 'delete', note: undefined })).who).toBe('no name given');
    expect(entryWords(entry({ action: 'delete', note: undefined })).what).toBe('deleted run run_0123456789abcdef');
  });

  it('a reproduction: identical, within tolerance, or differs, with the differences', () => {
    expect(reproductionWords({ identical: true, withinTolerance: true, tolerance: 1e-5, differences: [], run: null }, 'e1').verdict).toBe('identical');
    const w = reproductionWords({ identical: false, withinTolerance: true, tolerance: 1e-5, differences: ['engine version: archived e0, now e1'], run: null }, 'e1');
    expect(w).toMatchObject({ verdict: 'within' });
    expect(w.text).toContain('engine version: archived e0, now e1');
    expect(reproductionWords({ identical: false, withinTolerance: false, tolerance: 1e-5, differences: ['status: archived ok, now failed'], run: null }, 'e1').text).toMatch(/^The rerun differs: status/);
  });

  it('an import: what it added, that it had all, or why it refused', () => {
    const item = (kind: 'model' | 'run', id: string) => ({ kind, id, digest: 'd', outcome: 'add' as const });
    expect(importWords({ ok: true, reason: null, findings: [], plan: { items: [], ok: true, added: [item('model', 'm'), item('run', 'r')], skipped: [], conflicts: [] } })).toBe('Imported 2 documents (model m, run r). The import is in the log.');
    expect(importWords({ ok: true, reason: null, findings: [], plan: { items: [], ok: true, added: [], skipped: [item('run', 'r')], conflicts: [] } })).toMatch(/^Nothing new/);
    expect(importWords({ ok: false, reason: 'invalid', findings: [{ code: 'digest_mismatch', message: 'x' }], plan: null })).toMatch(/fails its checks \(1 problem\)/);
  });
});
