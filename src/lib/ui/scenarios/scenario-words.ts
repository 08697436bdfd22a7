/**
 * The Scenarios screen's words that are not a measure's sentence: revisions, runs to start
 * from, ramps and costs.
 */
import type { ScenarioCommitResult, ScenarioRevision, StoredRunSummary } from '$lib/storage/types';
import { shortDigest } from '../library/library-words';
import { formatSavedAt } from '../build/revisions';
import { numberWords } from '$lib/scenario/words';

export { shortDigest, formatSavedAt };

/** What Save revision reports. */
export function scenarioCommitWords(r: ScenarioCommitResult): { ok: boolean; text: string } {
  if (r.ok) {
    const { number, digest } = r.revision;
    return r.unchanged
      ? { ok: true, text: `No new revision: revision ${number} (${shortDigest(digest)}) already holds this scenario.` }
      : { ok: true, text: `Saved as revision ${number}, digest ${shortDigest(digest)}.` };
  }
  const errors = r.problems.filter((p) => p.severity === 'error').length;
  return { ok: false, text: `Not saved: the draft has ${errors} error${errors === 1 ? '' : 's'}. Fix them (listed under Problems), then save again.` };
}

export interface RevisionLine {
  number: number;
  date: string;
  digest: string;
  fullDigest: string;
  note: string;
  measures: number;
}

export function revisionLine(r: ScenarioRevision): RevisionLine {
  return { number: r.number, date: formatSavedAt(r.savedAt), digest: shortDigest(r.digest), fullDigest: r.digest, note: r.note ?? '', measures: (r.doc.measures ?? []).length };
}

/** Stored runs a scenario may start from: finished ones only, newest first, in words. */
export function startRunOptions(runs: readonly StoredRunSummary[]): { id: string; text: string }[] {
  return runs
    .filter((r) => r.status === 'ok')
    .map((r) => ({ id: r.id, text: `start from the end of run “${r.scenarioTitle}” (${formatSavedAt(r.startedAt)}), spin-up` }));
}

/** Ramps are edited in years (of 365 days) or days. */
export const DAYS_PER_YEAR = 365;

export function rampUnitFor(days: unknown): 'years' | 'days' {
  return typeof days === 'number' && days > 0 && days % (DAYS_PER_YEAR / 2) === 0 ? 'years' : 'days';
}

/** A sum of costs by currency: `EUR 2,610,000`; `EUR 10,000 + SEK 5,000`. */
export function costTotalWords(costs: unknown): string {
  const by = new Map<string, number>();
  for (const c of Array.isArray(costs) ? costs : []) {
    const row = c as { amount?: unknown; currency?: unknown };
    if (typeof row.amount === 'number' && Number.isFinite(row.amount) && typeof row.currency === 'string') by.set(row.currency, (by.get(row.currency) ?? 0) + row.amount);
  }
  if (by.size === 0) return 'no costs entered';
  return [...by].map(([cur, x]) => `${cur} ${x.toLocaleString('en-GB', { maximumFractionDigits: 2 })}`).join(' + ');
}

/** How a catalogue's cost basis reads beside the amount of one measure. */
export function costBasisWords(costUnit: string, repeatCount: number | undefined): string {
  const m = /^([A-Z]{3})(?: per (.+))?$/.exec(costUnit);
  if (!m || !m[2]) return 'Enter the total for the scenario.';
  const n = repeatCount && repeatCount > 1 ? repeatCount : 1;
  return `Usually reckoned in ${m[1]} per ${m[2]}; enter the total for the scenario${n > 1 ? ` (${numberWords(n)} ${m[2]}s)` : ''}.`;
}
