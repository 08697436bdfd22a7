/**
 * The audit log's hash chain (common practice for tamper-evident logs: each entry carries
 * the SHA-256 digest of the one before it; digests over RFC 8785 canonical JSON).
 */
import { describe, expect, it } from 'vitest';
import { appendEntry, verifyChain, type LogEntry } from '../../src/lib/archive/log';

function chain(n: number): LogEntry[] {
  const out: LogEntry[] = [];
  let head: LogEntry | null = null;
  for (let i = 0; i < n; i++) {
    head = appendEntry(head, { action: i === 0 ? 'create' : 'run', subject: { kind: i === 0 ? 'model' : 'run', id: `x${i}`, digest: null }, by: 'tester', at: `2027-01-0${i + 1}T00:00:00.000Z` });
    out.push(head);
  }
  return out;
}

describe('appendEntry and verifyChain', () => {
  it('a fresh chain verifies from its start', () => {
    const c = chain(5);
    expect(c.map((e) => e.seq)).toEqual([1, 2, 3, 4, 5]);
    expect(c[0].prev).toBeNull();
    expect(c[3].prev).toBe(c[2].digest);
    expect(verifyChain(c, { fromStart: true })).toEqual([]);
  });

  it('detects a changed entry and names it', () => {
    const c = chain(4);
    c[2] = { ...c[2], note: 'edited afterwards' };
    const f = verifyChain(c);
    expect(f.map((x) => [x.code, x.seq])).toContainEqual(['entry_digest', 3]);
  });

  it('detects a removed entry', () => {
    const c = chain(4);
    c.splice(1, 1);
    const f = verifyChain(c);
    expect(f.map((x) => x.code)).toContain('chain_broken');
    expect(f.map((x) => x.code)).toContain('seq_gap');
  });

  it('detects reordered entries', () => {
    const c = chain(4);
    [c[1], c[2]] = [c[2], c[1]];
    expect(verifyChain(c).some((x) => x.code === 'chain_broken')).toBe(true);
  });

  it('detects an inserted entry, even one with a valid digest of its own', () => {
    const c = chain(3);
    const forged = appendEntry(c[0], { action: 'delete', subject: { kind: 'run', id: 'x1', digest: null }, by: 'someone', at: '2027-01-09T00:00:00.000Z' });
    c.splice(1, 0, forged);
    const f = verifyChain(c);
    expect(f.some((x) => x.code === 'chain_broken' || x.code === 'seq_gap')).toBe(true);
  });

  it('refuses a chain that does not start at entry 1 when asked to check from the start', () => {
    const c = chain(3).slice(1);
    expect(verifyChain(c, { fromStart: true }).map((x) => x.code)).toContain('chain_broken');
    expect(verifyChain(c)).toEqual([]);
  });

  it('reports something that is not a log entry', () => {
    expect(verifyChain([{ hello: 1 }]).map((x) => x.code)).toEqual(['entry_shape']);
  });
});
