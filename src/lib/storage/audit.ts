/**
 * The library's audit log over a Dexie table: every create, revise, run, import, export,
 * delete and note is an append-only entry carrying the digest of the entry before it (the
 * hash chain of `lakeledger.log/1`, archive/log.ts). `append` joins the transaction it is
 * called in, so an entry is written with the change it records or not at all. Nothing here
 * rewrites or removes an entry; `verify` rechecks every digest and link.
 */
import type { Table } from 'dexie';
import { appendEntry, verifyChain, type ChainFinding, type LogAction, type LogEntry, type SubjectKind } from '$lib/archive/log';

export interface AuditDeps {
  now: () => string;
  /** The user's own label for who did it (a setting of the app; '' when none was given). */
  who: () => string;
}

export interface AuditLog {
  /** Appends one entry after the chain's head. Call inside the transaction of the change. */
  append(action: LogAction, subject: { kind: SubjectKind; id: string; digest: string | null }, note?: string): Promise<LogEntry>;
  /** Every entry, oldest first. */
  list(): Promise<LogEntry[]>;
  head(): Promise<LogEntry | null>;
  /** Entries about one subject (kind and id), oldest first. */
  about(kind: SubjectKind, id: string): Promise<LogEntry[]>;
  /** Checks every entry's digest and every link from the first entry on. */
  verify(): Promise<ChainFinding[]>;
}

export function createAuditLog(table: Table<LogEntry, number>, deps: AuditDeps): AuditLog {
  const head = async () => (await table.orderBy('seq').last()) ?? null;
  return {
    async append(action, subject, note) {
      const entry = appendEntry(await head(), { action, subject, by: deps.who(), at: deps.now(), ...(note ? { note } : {}) });
      await table.add(entry);
      return entry;
    },
    list: () => table.orderBy('seq').toArray(),
    head,
    async about(kind, id) {
      return (await table.orderBy('seq').toArray()).filter((e) => e.subject.kind === kind && e.subject.id === id);
    },
    async verify() {
      return verifyChain(await table.orderBy('seq').toArray(), { fromStart: true });
    }
  };
}
