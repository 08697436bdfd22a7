/**
 * The Uncertainty screen's arithmetic, as pure functions: which members of a design are
 * still to run and how to share them among workers, the percentile bands of each role's
 * series over time, and per scenario and indicator the distribution of the members' values,
 * the share of parameter sets meeting a target (with its Wilson interval) and the paired
 * difference against the baseline (the first scenario).
 *
 * Everything is over the members that ran to the end with the mass closed; the others are
 * counted and listed (`problemsOf`), never dropped silently. Percentiles are the engine's
 * (Hyndman & Fan type 7).
 */
import { percentileSorted, summarize, type Summary } from '$lib/engine/uncertainty/summaries';
import { shareMeeting, type Share } from '$lib/engine/uncertainty/share';
import { pairedDifference } from '$lib/engine/uncertainty/paired';
import type { MemberRun } from '$lib/worker/protocol';
import type { BandRecord } from '$lib/archive/records';

/** Members by number in the design; each holds one run per scenario (in the chosen order). */
export type MemberMap = ReadonlyMap<number, readonly MemberRun[]>;

export const DEFAULT_MEMBERS = 100;
export const DEFAULT_SEED = 20270101;
export const MAX_MEMBERS = 2000;

/** The members 0 … n−1 not yet in `done`, in order. */
export function remainingMembers(n: number, done: { has(j: number): boolean }): number[] {
  const out: number[] = [];
  for (let j = 0; j < n; j++) if (!done.has(j)) out.push(j);
  return out;
}

/**
 * Shares `members` among `workers` jobs, round-robin (member j to job j mod k), so that
 * the members done at any moment are close to the first ones; empty jobs are left out.
 */
export function splitMembers(members: readonly number[], workers: number): number[][] {
  const k = Math.max(1, Math.floor(workers));
  const jobs: number[][] = Array.from({ length: k }, () => []);
  members.forEach((m, i) => jobs[i % k].push(m));
  return jobs.filter((j) => j.length > 0);
}

/** A member run counts in the summaries when it ran to the end and its mass closed. */
export const counts = (r: MemberRun | undefined): boolean => !!r && r.status === 'ok' && r.closed;

/** Percentile bands of one role's series over time (the record's type: stored as it is). */
export type Band = BandRecord;

/** Percentile bands of one role's series of scenario `si`, point by point over the grid. */
export function bandOf(members: MemberMap, si: number, role: string, gridDays: number): Band {
  const rows: number[][] = [];
  for (const runs of members.values()) {
    const r = runs[si];
    if (r && counts(r) && r.series?.[role]) rows.push(r.series[role]);
  }
  const len = rows.reduce((a, r) => Math.max(a, r.length), 0);
  const band: Band = { days: [], p05: [], p25: [], p50: [], p75: [], p95: [], members: rows.length };
  const col: number[] = [];
  for (let i = 0; i < len; i++) {
    col.length = 0;
    for (const r of rows) if (i < r.length && Number.isFinite(r[i])) col.push(r[i]);
    col.sort((a, b) => a - b);
    band.days.push(i * gridDays);
    band.p05.push(percentileSorted(col, 0.05));
    band.p25.push(percentileSorted(col, 0.25));
    band.p50.push(percentileSorted(col, 0.5));
    band.p75.push(percentileSorted(col, 0.75));
    band.p95.push(percentileSorted(col, 0.95));
  }
  return band;
}

/** The values of one indicator of scenario `si`, member by member (null where a member does not count). */
export function valuesOf(members: MemberMap, si: number, key: string): Map<number, number | null> {
  const out = new Map<number, number | null>();
  for (const [j, runs] of members) {
    const r = runs[si];
    const v = r && counts(r) ? r.values[key] : null;
    out.set(j, typeof v === 'number' && Number.isFinite(v) ? v : null);
  }
  return out;
}

export interface IndicatorStats {
  /** Members with a value. */
  n: number;
  summary: Summary;
  /** Null without a target. */
  share: Share | null;
  /** Against the first scenario, member by member (null on the first scenario itself). */
  paired: { n: number; summary: Summary } | null;
}

/**
 * Distribution, share meeting the target and paired difference of indicator `key` for
 * scenario `si`. `direction`: `below` for an upper limit (chlorophyll, phosphorus),
 * `above` for a lower limit (Secchi depth).
 */
export function indicatorStats(
  members: MemberMap,
  si: number,
  key: string,
  target: number | null,
  direction: 'below' | 'above'
): IndicatorStats {
  const mine = valuesOf(members, si, key);
  const vals = [...mine.values()].filter((v): v is number => v !== null);
  let paired: IndicatorStats['paired'] = null;
  if (si > 0) {
    const base = valuesOf(members, 0, key);
    const order = [...mine.keys()].sort((a, b) => a - b);
    const pd = pairedDifference(order.map((j) => mine.get(j) ?? null), order.map((j) => base.get(j) ?? null));
    paired = { n: pd.n, summary: pd.summary };
  }
  return {
    n: vals.length,
    summary: summarize(vals),
    share: target === null || !Number.isFinite(target) ? null : shareMeeting(vals, target, direction),
    paired
  };
}

export interface MemberProblemRow {
  member: number;
  scenario: number;
  kind: 'failed' | 'not closed';
  code: string;
  message: string;
}

/** Every member run that does not count, in member order then scenario order. */
export function problemsOf(members: MemberMap): MemberProblemRow[] {
  const rows: MemberProblemRow[] = [];
  for (const j of [...members.keys()].sort((a, b) => a - b)) {
    members.get(j)!.forEach((r, si) => {
      if (counts(r)) return;
      rows.push({ member: j, scenario: si, kind: r.status === 'failed' ? 'failed' : 'not closed', code: r.code ?? (r.status === 'failed' ? 'failed' : 'closure_failed'), message: r.message ?? '' });
    });
  }
  return rows;
}

export interface MemberWarningRow {
  member: number;
  scenario: number;
  code: string;
  id: string | null;
  message: string;
}

/** Warnings of member runs that count (e.g. a state fell to the absolute tolerance and grew again), in member then scenario order. */
export function memberWarningsOf(members: MemberMap): MemberWarningRow[] {
  const rows: MemberWarningRow[] = [];
  for (const j of [...members.keys()].sort((a, b) => a - b)) {
    members.get(j)!.forEach((r, si) => {
      if (!counts(r)) return;
      for (const w of r.warnings ?? []) rows.push({ member: j, scenario: si, code: w.code, id: w.id ?? null, message: w.message });
    });
  }
  return rows;
}

/** Runs that count, per scenario. */
export function countedPerScenario(members: MemberMap, scenarios: number): number[] {
  const out = new Array<number>(scenarios).fill(0);
  for (const runs of members.values()) runs.forEach((r, si) => counts(r) && si < scenarios && out[si]++);
  return out;
}

/**
 * Time left from the pace so far: (elapsed / done) × left. Null until a member is done in
 * this sitting (a resumed ensemble measures its own pace).
 */
export function timeLeftMs(doneNow: number, elapsedMs: number, left: number): number | null {
  if (doneNow <= 0 || elapsedMs <= 0) return null;
  return (elapsedMs / doneNow) * left;
}

/** "about 2 min 10 s", "about 40 s", "under 5 s". */
export function durationWords(ms: number | null): string {
  if (ms === null || !Number.isFinite(ms)) return 'working out the time left…';
  const s = Math.round(ms / 1000);
  if (s < 5) return 'under 5 s';
  if (s < 60) return `about ${s} s`;
  const m = Math.floor(s / 60);
  return `about ${m} min${s % 60 ? ` ${s % 60} s` : ''}`;
}

/** A share as a whole per cent, "35 %". */
export function percentWords(x: number): string {
  if (!Number.isFinite(x)) return '–';
  return `${Math.round(x * 100)} %`;
}

/** Parses a member count: whole, 2 … MAX_MEMBERS. */
export function parseMembers(text: string): number | string {
  const n = Number(text.trim());
  if (!Number.isInteger(n) || n < 2 || n > MAX_MEMBERS) return `Members: a whole number from 2 to ${MAX_MEMBERS}.`;
  return n;
}

/** Parses a seed: whole, 0 … 4294967295. */
export function parseSeed(text: string): number | string {
  const t = text.trim();
  const n = Number(t);
  if (t === '' || !Number.isInteger(n) || n < 0 || n > 0xffffffff) return 'Seed: a whole number from 0 to 4294967295.';
  return n;
}

/** Parses a target: empty is none; otherwise a finite number. */
export function parseTarget(text: string): number | null | string {
  const t = text.trim();
  if (t === '') return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : 'The target must be a number.';
}
