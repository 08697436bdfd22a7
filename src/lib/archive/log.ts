/**
 * The audit log: append-only entries, each carrying the digest of the one before it (a
 * hash chain), so that a changed, removed, reordered or inserted entry breaks the chain
 * at a place `verifyChain` names. Format `lakeledger.log/1`.
 */
import { digestOf } from '../engine/document/digest';

export const LOG_FORMAT = 'lakeledger.log/1';

export type LogAction = 'create' | 'revise' | 'run' | 'import' | 'export' | 'delete' | 'note';
export type SubjectKind = 'model' | 'scenario' | 'run' | 'sweep' | 'bundle' | 'ensemble' | 'observations' | 'calibration';

export interface LogEntry {
  format: typeof LOG_FORMAT;
  /** 1, 2, 3, … in the chain it was written to. */
  seq: number;
  /** ISO timestamp. */
  at: string;
  /** The user's own label for who did it. */
  by: string;
  action: LogAction;
  subject: { kind: SubjectKind; id: string; digest: string | null };
  note?: string;
  /** Digest of the previous entry, or null for the first. */
  prev: string | null;
  /** Digest of this entry without this field. */
  digest: string;
}

export type NewEntry = Pick<LogEntry, 'action' | 'subject' | 'by' | 'at'> & { note?: string };

export function entryDigest(e: Omit<LogEntry, 'digest'> | LogEntry): string {
  const { digest: _d, ...rest } = e as LogEntry;
  return digestOf(rest);
}

/** A new entry after `head` (the chain's last entry, or null for an empty chain). */
export function appendEntry(head: LogEntry | null, e: NewEntry): LogEntry {
  const body: Omit<LogEntry, 'digest'> = {
    format: LOG_FORMAT,
    seq: head ? head.seq + 1 : 1,
    at: e.at,
    by: e.by,
    action: e.action,
    subject: e.subject,
    ...(e.note !== undefined ? { note: e.note } : {}),
    prev: head ? head.digest : null
  };
  return { ...body, digest: entryDigest(body) };
}

export interface ChainFinding {
  /** Index in the list checked, and the entry's own seq when it has one. */
  index: number;
  seq?: number;
  code: 'entry_digest' | 'chain_broken' | 'seq_gap' | 'entry_shape';
  message: string;
}

/**
 * Checks every entry's digest and the links between them. `after` is the digest the
 * first entry must point to (null for a chain from its start; a bundle's log segment may
 * start in the middle of a chain, then its first `prev` is taken as given).
 */
export function verifyChain(entries: readonly unknown[], opts: { fromStart?: boolean } = {}): ChainFinding[] {
  const out: ChainFinding[] = [];
  let prev: LogEntry | null = null;
  entries.forEach((raw, index) => {
    const e = raw as LogEntry;
    if (!e || typeof e !== 'object' || e.format !== LOG_FORMAT || typeof e.digest !== 'string' || typeof e.seq !== 'number') {
      out.push({ index, code: 'entry_shape', message: `log entry ${index + 1} is not a ${LOG_FORMAT} entry` });
      prev = null;
      return;
    }
    const want = entryDigest(e);
    if (want !== e.digest) {
      out.push({ index, seq: e.seq, code: 'entry_digest', message: `log entry ${e.seq} (${e.action} ${e.subject?.kind} ${e.subject?.id}) was changed: its digest is ${short(e.digest)} but its content gives ${short(want)}` });
    }
    if (index === 0) {
      if (opts.fromStart && (e.prev !== null || e.seq !== 1)) {
        out.push({ index, seq: e.seq, code: 'chain_broken', message: `the log does not start at its first entry (entry ${e.seq} points back to ${short(e.prev)})` });
      }
    } else if (prev) {
      if (e.prev !== prev.digest) {
        out.push({ index, seq: e.seq, code: 'chain_broken', message: `log entry ${e.seq} does not follow entry ${prev.seq}: it points to ${short(e.prev)}, entry ${prev.seq} is ${short(prev.digest)} (an entry was removed, inserted or reordered)` });
      }
      if (e.seq !== prev.seq + 1) {
        out.push({ index, seq: e.seq, code: 'seq_gap', message: `log entry ${e.seq} follows entry ${prev.seq}: numbers must run on without a gap` });
      }
    }
    prev = e;
  });
  return out;
}

export function short(d: string | null | undefined): string {
  if (!d) return 'nothing';
  return d.startsWith('sha256:') ? `sha256:${d.slice(7, 19)}…` : d;
}
