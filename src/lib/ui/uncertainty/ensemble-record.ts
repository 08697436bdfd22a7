/**
 * Storing and reopening an ensemble of the Uncertainty screen, as pure functions: the
 * archive's `lakeledger.ensemble-record/1` from the page's state (`ensembleRecordOf`), the
 * page's state again from a record (`restoreEnsemble`), which bands to draw (`bandFor`:
 * from the members' series when they are there, else the stored bands), why a reopened
 * ensemble cannot be resumed (`resumeRefusal`), and the words of the list.
 *
 * A record keeps every member's run under every scenario with its status, closure, code
 * and indicator values, so shares for any target, paired differences and the list of
 * members that do not count work after reopening; the members' series are kept only by
 * choice (`keepSeries`): without them the record carries the bands computed from them
 * (`bandOf` over the members that ran and closed), and the ensemble cannot be resumed,
 * since new members could not be joined into bands whose members are gone.
 */
import { digestOf } from '$lib/engine/document/digest';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { ENGINE_VERSION } from '$lib/engine/version';
import { ENSEMBLE_AUTO_START } from '$lib/engine';
import { uncertainInputs } from '$lib/engine/uncertainty/lhs';
import { withCalibratedRanges } from '$lib/engine/uncertainty/ranges';
import { ENSEMBLE_RECORD_FORMAT, type BandRecord, type CalibrationRecord, type EnsembleMemberRecord, type EnsembleRecord } from '$lib/archive/records';
import type { EnsembleColumn, MemberRun } from '$lib/worker/protocol';
import { formatBytes } from '../storage-status/storage-words';
import { bandOf, type Band, type MemberMap } from './ensemble-view';

export type RoleInfo = { id: string; label: string; unit: string };
export type Sampled = { parameters: string[]; states: string[] };

/** What the page holds of an ensemble, as far as a record needs it. */
export interface EnsembleState {
  model: ModelDoc;
  /** In the ensemble's order: the baseline first. */
  scenarios: readonly { title: string; doc: ScenarioDoc }[];
  n: number;
  seed: number;
  members: MemberMap;
  columns: readonly EnsembleColumn[];
  roles: Readonly<Record<string, RoleInfo>>;
  gridDays: number;
  /** The inputs drawn; null when no job of the worker got to its end (taken from the model then). */
  sampled: Sampled | null;
  /**
   * Bands of a reopened ensemble stored without its members' series (role → one per
   * scenario); null when the members carry their series and the bands come from them.
   */
  storedBands: Readonly<Record<string, readonly Band[]>> | null;
  /** Wall-clock milliseconds of all sittings. */
  wallMs: number;
  /** Ranges from a calibration the members were drawn from (null: the model's own). */
  ranges?: CalibrationRanges | null;
}

/** The ranges an ensemble takes from an accepted calibration: the record's id and the triangles. */
export interface CalibrationRanges {
  calibration: string;
  /** Parameter → fitted value (the mode) and its 95 % interval. */
  values: Record<string, { value: number; low: number; high: number }>;
  replaced: string[];
}

/**
 * The ranges of a stored calibration for an ensemble, or why it cannot give any: every
 * parameter with a bounded interval, the interval widened to hold the value written into
 * the revision (rounded to 6 digits, it may sit a hair outside). Unbounded intervals keep
 * the model's range.
 */
export function calibrationRanges(rec: Pick<CalibrationRecord, 'id' | 'params' | 'intervals'>): CalibrationRanges | string {
  if (!rec.intervals) return `calibration ${rec.id} was stored before intervals were kept: it has no ranges to offer`;
  const values: CalibrationRanges['values'] = {};
  for (const [id, iv] of Object.entries(rec.intervals)) {
    const value = rec.params[id]?.after;
    if (!iv.bounded || typeof value !== 'number') continue;
    const low = Math.min(iv.low, value);
    const high = Math.max(iv.high, value);
    if (high > low) values[id] = { value, low, high };
  }
  const replaced = Object.keys(values);
  if (!replaced.length) return `calibration ${rec.id} bounds none of its parameters (the data did not pin them down): the model's ranges stay`;
  return { calibration: rec.id, values, replaced };
}

/** The model the members are drawn from: the model with the calibration's triangles, or as it is. */
export function sampledModel(model: ModelDoc, ranges: CalibrationRanges | null | undefined): ModelDoc {
  if (!ranges) return model;
  return withCalibratedRanges(model, Object.fromEntries(Object.entries(ranges.values).map(([id, v]) => [id, { ...v, bounded: true }]))).model;
}

/** The inputs with a range, as the worker reports them (parameters, then states, in model order). */
export function sampledOf(model: ModelDoc): Sampled {
  const inputs = uncertainInputs(model);
  return { parameters: inputs.filter((i) => i.kind === 'parameter').map((i) => i.id), states: inputs.filter((i) => i.kind === 'state').map((i) => i.id) };
}

const finiteOrNull = (v: number | null | undefined): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

function memberRecord(r: MemberRun, keepSeries: boolean): EnsembleMemberRecord {
  const values: Record<string, number | null> = {};
  for (const [k, v] of Object.entries(r.values)) values[k] = finiteOrNull(v);
  let series: Record<string, number[]> | null = null;
  if (keepSeries && r.series) {
    series = {};
    for (const [role, ys] of Object.entries(r.series)) series[role] = [...ys];
  }
  return { status: r.status, closed: r.closed, relativeResidual: finiteOrNull(r.relativeResidual), code: r.code ?? null, message: r.message ?? null, values, series, ...(r.warnings?.length ? { warnings: r.warnings.map((w) => ({ ...w })) } : {}) };
}

const bandRecord = (b: Band): BandRecord => ({ days: [...b.days], p05: [...b.p05], p25: [...b.p25], p50: [...b.p50], p75: [...b.p75], p95: [...b.p95], members: b.members });

/** Role → one band per scenario, as the page draws them. */
export function bandsOfState(state: Pick<EnsembleState, 'members' | 'roles' | 'gridDays' | 'storedBands' | 'scenarios'>): Record<string, Band[]> {
  const out: Record<string, Band[]> = {};
  for (const role of Object.keys(state.roles)) out[role] = state.scenarios.map((_, si) => bandFor(state.members, state.storedBands, si, role, state.gridDays));
  return out;
}

/**
 * The record of the ensemble on the page (without its id: `save` seals it). Members in
 * member order; `completed` counts the members done under every scenario, `partial` says
 * fewer than `n`. With `keepSeries` false every member's `series` is null and only the
 * bands are kept. A reopened ensemble without series (storedBands) can only be stored
 * without them again.
 */
export function ensembleRecordOf(state: EnsembleState, options: { keepSeries: boolean }): Omit<EnsembleRecord, 'id'> {
  if (options.keepSeries && state.storedBands) throw new Error("the members' series are not on this page (the ensemble was stored without them)");
  const order = [...state.members.keys()].sort((a, b) => a - b);
  const bands: Record<string, BandRecord[]> = {};
  for (const [role, list] of Object.entries(bandsOfState(state))) bands[role] = list.map(bandRecord);
  return {
    format: ENSEMBLE_RECORD_FORMAT,
    model: state.model.id,
    modelDigest: digestOf(state.model),
    scenarios: state.scenarios.map((s) => ({ id: s.doc.id, title: s.title, digest: digestOf(s.doc) })),
    n: state.n,
    seed: state.seed,
    completed: order.length,
    partial: order.length < state.n,
    engine: ENGINE_VERSION,
    autoStart: ENSEMBLE_AUTO_START,
    sampling: 'latin hypercube',
    sampled: structuredClone(state.sampled ?? sampledOf(state.model)),
    gridDays: state.gridDays,
    columns: state.columns.map((c) => ({ key: c.key, role: c.role, label: c.label, unit: c.unit, better: c.better })),
    roles: structuredClone({ ...state.roles }),
    members: order.map((j) => ({ member: j, runs: state.members.get(j)!.map((r) => memberRecord(r, options.keepSeries)) })),
    keptSeries: options.keepSeries,
    bands,
    ...(state.ranges ? { ranges: { source: 'calibration' as const, calibration: state.ranges.calibration, replaced: [...state.ranges.replaced], values: structuredClone(state.ranges.values) } } : {}),
    wallMs: Math.round(state.wallMs)
  };
}

/** The page's state from a record, as far as the record holds it. */
export interface RestoredEnsemble {
  n: number;
  seed: number;
  members: Map<number, MemberRun[]>;
  columns: EnsembleColumn[];
  roles: Record<string, RoleInfo>;
  gridDays: number;
  sampled: Sampled;
  wallMs: number;
  keptSeries: boolean;
  /** Null when the series are kept (bands come from the members again). */
  storedBands: Record<string, Band[]> | null;
  /** The calibration's ranges the members were drawn from (null: the model's own). */
  ranges: CalibrationRanges | null;
}

// A non-finite percentile (a scenario with no member counted) is written as null in JSON
const numbers = (xs: readonly unknown[]): number[] => xs.map((x) => (typeof x === 'number' ? x : Number.NaN));

export function restoreEnsemble(record: EnsembleRecord): RestoredEnsemble {
  const members = new Map<number, MemberRun[]>();
  for (const m of record.members) {
    members.set(
      m.member,
      m.runs.map((r) => ({
        status: r.status,
        closed: r.closed,
        relativeResidual: r.relativeResidual,
        code: r.code,
        message: r.message,
        values: { ...r.values },
        series: record.keptSeries && r.series ? Object.fromEntries(Object.entries(r.series).map(([k, ys]) => [k, numbers(ys)])) : null,
        ...(r.warnings?.length ? { warnings: r.warnings.map((w) => ({ ...w })) } : {})
      }))
    );
  }
  let storedBands: Record<string, Band[]> | null = null;
  if (!record.keptSeries) {
    storedBands = {};
    for (const [role, list] of Object.entries(record.bands)) {
      storedBands[role] = list.map((b) => ({ days: numbers(b.days), p05: numbers(b.p05), p25: numbers(b.p25), p50: numbers(b.p50), p75: numbers(b.p75), p95: numbers(b.p95), members: b.members }));
    }
  }
  return {
    n: record.n,
    seed: record.seed,
    members,
    columns: record.columns.map((c) => ({ ...c, better: c.better as EnsembleColumn['better'] })),
    roles: structuredClone(record.roles),
    gridDays: record.gridDays,
    sampled: structuredClone(record.sampled),
    wallMs: record.wallMs,
    keptSeries: record.keptSeries,
    storedBands,
    ranges: record.ranges ? { calibration: record.ranges.calibration, values: structuredClone(record.ranges.values), replaced: [...record.ranges.replaced] } : null
  };
}

const EMPTY_BAND: Band = { days: [], p05: [], p25: [], p50: [], p75: [], p95: [], members: 0 };

/**
 * The band of one role and scenario: from the stored bands when the ensemble was reopened
 * without its members' series, else over the members (bandOf).
 */
export function bandFor(members: MemberMap, storedBands: Readonly<Record<string, readonly Band[]>> | null, si: number, role: string, gridDays: number): Band {
  if (storedBands) return storedBands[role]?.[si] ?? EMPTY_BAND;
  return bandOf(members, si, role, gridDays);
}

/** Bytes of the record as UTF-8 JSON text (as the archive and a bundle hold it). */
export function recordBytes(record: object): number {
  return new TextEncoder().encode(JSON.stringify(record)).length;
}

/** "about 412 kB as JSON text". */
export function sizeWords(bytes: number): string {
  return `about ${formatBytes(bytes)} as JSON text`;
}

/** Why a reopened ensemble cannot resume (null: it can, or there is nothing left to run). */
export function resumeRefusal(facts: {
  partial: boolean;
  keptSeries: boolean;
  /** Model revision number when its document is gone, else null. */
  missingModelRevision: number | null;
  /** Titles of scenarios whose revision is gone. */
  missingScenarios: readonly string[];
  n: number;
  seed: number;
}): string | null {
  if (!facts.partial) return null;
  if (!facts.keptSeries)
    return `Resume is not offered: this ensemble was stored without its members' series, so members run now could not be joined into its bands. To finish it, start a new ensemble of ${facts.n} members with seed ${facts.seed}: the same seed draws the same parameter sets.`;
  if (facts.missingModelRevision !== null) return `Resume is not offered: model revision ${facts.missingModelRevision}, which this ensemble ran on, is no longer in the library. The stored results are shown as they are.`;
  if (facts.missingScenarios.length)
    return `Resume is not offered: the revision this ensemble ran of ${facts.missingScenarios.join(', ')} is no longer in the library. The stored results are shown as they are.`;
  return null;
}

/** "100 of 100 members", "37 of 100 members (partial)". */
export function membersWords(completed: number, n: number, partial: boolean): string {
  return `${completed} of ${n} members${partial ? ' (partial)' : ''}`;
}

/** "2027-03-01 09:00 UTC". */
export const whenWords = (iso: string): string => iso.replace('T', ' ').slice(0, 16) + ' UTC';

/** The sentence after storing: what was stored, how large, and where it is logged. */
export function storedSentence(facts: { id: string; added: boolean; completed: number; n: number; partial: boolean; scenarios: number; keptSeries: boolean; bytes: number; logSeq: number | null }): string {
  const what = `${membersWords(facts.completed, facts.n, facts.partial)} under ${facts.scenarios} scenarios, ${sizeWords(facts.bytes)}, ${facts.keptSeries ? "with each member's series" : "bands and each member's indicator values, without the members' series"}`;
  if (!facts.added) return `Already stored as ${facts.id} (${what}); nothing new was written.`;
  return `Stored as ${facts.id}: ${what}. It is in the archive log${facts.logSeq !== null ? ` (entry ${facts.logSeq})` : ''}, and Verify on the Archive screen rechecks it.`;
}
