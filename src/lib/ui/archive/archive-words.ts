/**
 * The archive in words: a log entry as a line a reader follows ("2027-03-01 09:00 UTC ·
 * A. Limnologist · ran run_… (Baseline: ok, …)"), a reproduction's verdict, a bundle
 * import's report. Pure functions, so the screen and its tests word things alike.
 */
import type { LogEntry } from '$lib/archive/log';
import type { Reproduction } from '$lib/archive/reproduce';
import type { ImportReport } from '$lib/storage/types';

const VERBS: Record<LogEntry['action'], string> = {
  create: 'created',
  revise: 'revised',
  run: 'ran',
  import: 'imported',
  export: 'exported',
  delete: 'deleted',
  note: 'noted on'
};

export function entryWords(e: LogEntry): { when: string; who: string; what: string } {
  const when = `${e.at.slice(0, 16).replace('T', ' ')} UTC`;
  const who = e.by.trim() || 'no name given';
  const what = `${VERBS[e.action] ?? e.action} ${e.subject.kind} ${e.subject.id}${e.note ? ` (${e.note})` : ''}`;
  return { when, who, what };
}

export function reproductionWords(r: Reproduction, engineNow: string): { verdict: 'identical' | 'within' | 'differs'; text: string } {
  if (r.identical) return { verdict: 'identical', text: `Identical: the rerun with engine ${engineNow} gives every number of the archived run bit for bit.` };
  if (r.withinTolerance)
    return { verdict: 'within', text: `Not identical, but within the tolerance of ${r.tolerance.toExponential(1)} (10 × the run's rtol): ${r.differences.join('; ')}.` };
  return { verdict: 'differs', text: `The rerun differs: ${r.differences.join('; ')}.` };
}

/** What a verify checked, in words: "3 revisions, 4 run records, 1 ensemble and 12 log entries". */
export function checkedWords(c: { revisions: number; runs: number; sweeps: number; ensembles?: number; observations?: number; calibrations?: number; entries: number }): string {
  const n = (k: number, one: string, many: string) => `${k} ${k === 1 ? one : many}`;
  const parts = [n(c.revisions, 'revision', 'revisions'), n(c.runs, 'run record', 'run records')];
  if (c.sweeps) parts.push(n(c.sweeps, 'sweep', 'sweeps'));
  if (c.ensembles) parts.push(n(c.ensembles, 'ensemble', 'ensembles'));
  if (c.observations) parts.push(n(c.observations, 'observation set', 'observation sets'));
  if (c.calibrations) parts.push(n(c.calibrations, 'calibration', 'calibrations'));
  return `${parts.join(', ')} and ${n(c.entries, 'log entry', 'log entries')}`;
}

export function importWords(r: ImportReport): string {
  if (r.ok && r.plan) {
    const added = r.plan.added.length;
    const skipped = r.plan.skipped.length;
    if (added === 0) return `Nothing new: the library has all ${skipped} documents of this bundle already.`;
    return `Imported ${added} document${added === 1 ? '' : 's'} (${r.plan.added.map((i) => `${i.kind} ${i.id}`).join(', ')})${skipped ? `; ${skipped} the library had already` : ''}. The import is in the log.`;
  }
  if (r.reason === 'invalid') return `Refused, nothing was written: the bundle fails its checks (${r.findings.length} problem${r.findings.length === 1 ? '' : 's'}).`;
  const n = r.plan?.conflicts.length ?? 0;
  return `Refused, nothing was written: ${n} document${n === 1 ? '' : 's'} of the bundle conflict${n === 1 ? 's' : ''} with the library (same id, other content).`;
}
