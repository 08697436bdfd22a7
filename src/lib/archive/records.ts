/**
 * The archive's records of what is not a run: ensembles (Uncertainty screen), observation
 * sets (monitoring data, Fit screen) and accepted calibrations. Each is a plain JSON
 * document with a format, a content-addressed id (a prefix + the first 16 hex digits of its
 * digest) and a digest over everything but the id and the wall-clock time, so that storage,
 * bundles and the verify step recheck them like run records.
 *
 * `checkRecord` says what is wrong with a value that claims to be one (bundle import):
 * the format, the id, the fields the app reads, and the digest.
 */
import { digestOf } from '../engine/document/digest';
import type { MemberRun } from '../engine/uncertainty/member-run';

export const ENSEMBLE_RECORD_FORMAT = 'lakeledger.ensemble-record/1';
export const OBSERVATIONS_RECORD_FORMAT = 'lakeledger.observations-record/1';
export const CALIBRATION_RECORD_FORMAT = 'lakeledger.calibration-record/1';

/** One member under one scenario, as the Uncertainty screen received it. */
export type EnsembleMemberRecord = MemberRun;

/** Percentile bands of one role's series for one scenario, point by point. */
export interface BandRecord {
  days: number[];
  p05: number[];
  p25: number[];
  p50: number[];
  p75: number[];
  p95: number[];
  members: number;
}

export interface EnsembleRecord {
  format: typeof ENSEMBLE_RECORD_FORMAT;
  /** `ens_` + 16 hex digits of the digest. */
  id: string;
  model: string;
  modelDigest: string;
  /** In the ensemble's order: the baseline first. */
  scenarios: { id: string; title: string; digest: string }[];
  n: number;
  seed: number;
  /** Members finished under every scenario (less than n: partial). */
  completed: number;
  partial: boolean;
  engine: string;
  /** The explicit method members of an `auto` scenario started with. */
  autoStart: string;
  sampling: 'latin hypercube';
  sampled: { parameters: string[]; states: string[] };
  gridDays: number;
  columns: { key: string; role: string; label: string; unit: string; better: string }[];
  roles: Record<string, { id: string; label: string; unit: string }>;
  /** Every member that finished, in member order; each with one run per scenario. */
  members: { member: number; runs: EnsembleMemberRecord[] }[];
  /** Whether the members' series are kept (else only the bands are). */
  keptSeries: boolean;
  /** Role → one band per scenario, over the members that ran and closed. */
  bands: Record<string, BandRecord[]>;
  /** Where the sampled ranges came from: the model's own, or a calibration's intervals (absent: the model's). */
  ranges?: { source: 'calibration'; calibration: string; replaced: string[]; values: Record<string, { value: number; low: number; high: number }> };
  wallMs: number;
}

export interface ObservationsRecord {
  format: typeof OBSERVATIONS_RECORD_FORMAT;
  /** `obs_` + 16 hex digits of the digest. */
  id: string;
  model: string;
  /** The file's name as the user chose it. */
  name: string;
  /** The file's text, as read. */
  text: string;
  /** `sha256:` of the text. */
  textDigest: string;
  /** The file's variable names → series ids (a name mapped to nothing is left out). */
  mapping: Record<string, string>;
  /** How rows of one series on one date were combined, and any station or depth chosen. */
  options: { combine: 'mean' | 'station'; station: string | null; maxDepth: number | null };
  /** Rows read and rows used, for the list. */
  rows: number;
  used: number;
  wallMs: number;
}

export interface CalibrationRecord {
  format: typeof CALIBRATION_RECORD_FORMAT;
  /** `cal_` + 16 hex digits of the digest. */
  id: string;
  model: string;
  /** The model before (the draft that was fitted) and the revision the fit created. */
  modelDigestBefore: string;
  modelDigestAfter: string;
  revisionAfter: number;
  scenario: { id: string; digest: string };
  observations: { id: string; name: string; textDigest: string };
  objective: { kind: string; before: number; after: number };
  params: Record<string, { before: number; after: number; min: number; max: number; space: string }>;
  variables: Record<string, { weight: number }>;
  iterations: number;
  evaluations: number;
  converged: boolean;
  cancelled: boolean;
  path: number[];
  /** Per series: n, rmse, bias, nse (and log10 NSE for chlorophyll) after the fit. */
  statistics: Record<string, { n: number; rmse: number | null; bias: number | null; nse: number | null; logNse: number | null }>;
  warnings: { code: string; message: string }[];
  /** Linearised 95 % intervals of the fitted values (fit/calibrate.ts); an ensemble may sample from them. */
  intervals?: Record<string, { low: number; high: number; bounded: boolean }>;
  acceptedAt: string;
  wallMs: number;
}

export type ArchiveRecord = EnsembleRecord | ObservationsRecord | CalibrationRecord;
export type RecordKind = 'ensemble' | 'observations' | 'calibration';

const KINDS: Record<RecordKind, { format: string; prefix: string; fields: Record<string, 'string' | 'number' | 'boolean' | 'object' | 'array'> }> = {
  ensemble: {
    format: ENSEMBLE_RECORD_FORMAT,
    prefix: 'ens_',
    fields: { model: 'string', modelDigest: 'string', scenarios: 'array', n: 'number', seed: 'number', completed: 'number', partial: 'boolean', gridDays: 'number', columns: 'array', roles: 'object', members: 'array', keptSeries: 'boolean', bands: 'object', sampled: 'object' }
  },
  observations: {
    format: OBSERVATIONS_RECORD_FORMAT,
    prefix: 'obs_',
    fields: { model: 'string', name: 'string', text: 'string', textDigest: 'string', mapping: 'object', options: 'object', rows: 'number', used: 'number' }
  },
  calibration: {
    format: CALIBRATION_RECORD_FORMAT,
    prefix: 'cal_',
    fields: { model: 'string', modelDigestBefore: 'string', modelDigestAfter: 'string', revisionAfter: 'number', scenario: 'object', observations: 'object', objective: 'object', params: 'object', statistics: 'object', path: 'array', acceptedAt: 'string' }
  }
};

/** The digest of a record: everything but its id and wall-clock time. */
export function recordDigestOf(record: { id?: string; wallMs?: number } & object): string {
  const { id: _id, wallMs: _wall, ...content } = record as Record<string, unknown>;
  return digestOf(content);
}

/** The record's id from its content. */
export function recordIdOf(kind: RecordKind, record: object): string {
  return `${KINDS[kind].prefix}${recordDigestOf(record).slice(7, 23)}`;
}

/** Sets the id from the content; returns the record and its digest. */
export function sealRecord<T extends ArchiveRecord>(kind: RecordKind, record: Omit<T, 'id'> & { id?: string }): { record: T; digest: string } {
  const digest = recordDigestOf(record);
  const sealed = { ...record, id: `${KINDS[kind].prefix}${digest.slice(7, 23)}` } as T;
  return { record: sealed, digest };
}

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** What is wrong with a value that should be a record of `kind` (empty: nothing). */
export function checkRecord(kind: RecordKind, value: unknown, declaredDigest?: unknown): string[] {
  const k = KINDS[kind];
  if (!isObject(value)) return [`the ${kind} record is not an object`];
  const name = typeof value.id === 'string' ? `${kind} '${value.id}'` : `a ${kind} record`;
  if (value.format !== k.format) return [`${name} has format '${String(value.format)}', expected '${k.format}'`];
  const out: string[] = [];
  for (const [field, type] of Object.entries(k.fields)) {
    const v = value[field];
    const ok = type === 'array' ? Array.isArray(v) : type === 'object' ? isObject(v) : typeof v === type;
    if (!ok) out.push(`${name}: '${field}' must be ${type === 'array' ? 'a list' : type === 'object' ? 'an object' : `a ${type}`}`);
  }
  if (out.length) return out;
  let digest: string;
  try {
    digest = recordDigestOf(value);
  } catch (e) {
    return [`${name} cannot be digested: ${(e as Error).message}`];
  }
  const id = `${k.prefix}${digest.slice(7, 23)}`;
  if (value.id !== id) out.push(`${name} does not match its content (its content gives id ${id})`);
  if (declaredDigest !== undefined && declaredDigest !== digest) out.push(`${name} was changed: the bundle says ${String(declaredDigest).slice(0, 19)}…, its content gives ${digest.slice(0, 19)}…`);
  return out;
}
