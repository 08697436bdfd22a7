/**
 * Bundles (`lakeledger.bundle/1`): models, scenarios and runs with their log segment and
 * a digest of each document, for archive or exchange. `verifyBundle` rechecks everything
 * before anything is written and says exactly which document or entry fails and why.
 */
import { digestOf } from '../engine/document/digest';
import { runDigest } from '../engine/simulate';
import { MODEL_FORMAT, RUN_FORMAT, SCENARIO_FORMAT, type ModelDoc, type RunDoc, type ScenarioDoc } from '../engine/document/types';
import { verifyChain, short, type LogEntry } from './log';
import { recordDigest } from './record';
import { checkRecord, recordDigestOf, type CalibrationRecord, type EnsembleRecord, type ObservationsRecord, type RecordKind } from './records';

export const BUNDLE_FORMAT = 'lakeledger.bundle/1';

export interface Bundle {
  format: typeof BUNDLE_FORMAT;
  createdAt: string;
  /** Engine version that wrote the bundle. */
  engine: string;
  models: ModelDoc[];
  scenarios: ScenarioDoc[];
  runs: RunDoc[];
  /** Added later (optional: a bundle without them is still read): the model's ensembles, observation sets and calibrations. */
  ensembles?: EnsembleRecord[];
  observations?: ObservationsRecord[];
  calibrations?: CalibrationRecord[];
  /** The model's sweeps (Long run screen) of the bundle's model revision, as stored. */
  sweeps?: BundledSweep[];
  log: LogEntry[];
  /** Per kind, each document's id → digest (models and scenarios: digestOf; runs: the record digest; records: recordDigestOf). */
  digests: {
    models: Record<string, string>;
    scenarios: Record<string, string>;
    runs: Record<string, string>;
    ensembles?: Record<string, string>;
    observations?: Record<string, string>;
    calibrations?: Record<string, string>;
    sweeps?: Record<string, string>;
  };
}

/** A stored sweep in a bundle: its id, the sweep document, its settings and the model digest. */
export interface BundledSweep {
  id: string;
  modelDigest: string;
  settings: Record<string, unknown>;
  doc: { format: string; modelDigest: string } & Record<string, unknown>;
  wallMs: number;
}

/** The digest of a stored sweep: its document, settings and model digest (as storage computes it). */
export function bundledSweepDigest(s: Pick<BundledSweep, 'doc' | 'settings' | 'modelDigest'>): string {
  return digestOf({ doc: s.doc, settings: s.settings, modelDigest: s.modelDigest });
}

/** The optional record lists of a bundle: list name → record kind. */
export const RECORD_LISTS = { ensembles: 'ensemble', observations: 'observations', calibrations: 'calibration' } as const satisfies Record<string, RecordKind>;

export function buildBundle(parts: {
  models: ModelDoc[];
  scenarios: ScenarioDoc[];
  runs: RunDoc[];
  ensembles?: EnsembleRecord[];
  observations?: ObservationsRecord[];
  calibrations?: CalibrationRecord[];
  sweeps?: BundledSweep[];
  log: LogEntry[];
  createdAt: string;
  engine: string;
}): Bundle {
  const map = <T extends { id: string }>(docs: T[], d: (x: T) => string) => Object.fromEntries(docs.map((x) => [x.id, d(x)]));
  return {
    format: BUNDLE_FORMAT,
    createdAt: parts.createdAt,
    engine: parts.engine,
    models: parts.models,
    scenarios: parts.scenarios,
    runs: parts.runs,
    ensembles: parts.ensembles ?? [],
    observations: parts.observations ?? [],
    calibrations: parts.calibrations ?? [],
    sweeps: parts.sweeps ?? [],
    log: parts.log,
    digests: {
      models: map(parts.models, digestOf),
      scenarios: map(parts.scenarios, digestOf),
      runs: map(parts.runs, recordDigest),
      ensembles: map(parts.ensembles ?? [], recordDigestOf),
      observations: map(parts.observations ?? [], recordDigestOf),
      calibrations: map(parts.calibrations ?? [], recordDigestOf),
      sweeps: map(parts.sweeps ?? [], bundledSweepDigest)
    }
  };
}

export interface BundleFinding {
  code:
    | 'not_a_bundle'
    | 'missing_part'
    | 'digest_mismatch'
    | 'missing_document'
    | 'undeclared_document'
    | 'duplicate_document'
    | 'run_id_mismatch'
    | 'unknown_input'
    | 'wrong_format'
    | 'log';
  kind?: 'model' | 'scenario' | 'run' | 'log' | 'sweep' | RecordKind;
  id?: string;
  message: string;
}

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** Every problem with a bundle; an empty list means every digest and the chain hold. */
export function verifyBundle(value: unknown): BundleFinding[] {
  const out: BundleFinding[] = [];
  if (!isObject(value) || value.format !== BUNDLE_FORMAT) {
    out.push({ code: 'not_a_bundle', message: `not a ${BUNDLE_FORMAT} file${isObject(value) && value.format ? ` (its format is '${String(value.format)}')` : ''}` });
    return out;
  }
  for (const key of ['models', 'scenarios', 'runs', 'log'] as const) {
    if (!Array.isArray(value[key])) out.push({ code: 'missing_part', message: `the bundle has no list '${key}'` });
  }
  if (!isObject(value.digests)) out.push({ code: 'missing_part', message: "the bundle has no 'digests'" });
  if (out.length) return out;
  const digests = value.digests as Record<string, unknown>;
  const kinds = [
    { kind: 'model' as const, list: value.models as unknown[], format: MODEL_FORMAT, table: digests.models, digest: (d: unknown) => digestOf(d) },
    { kind: 'scenario' as const, list: value.scenarios as unknown[], format: SCENARIO_FORMAT, table: digests.scenarios, digest: (d: unknown) => digestOf(d) },
    { kind: 'run' as const, list: value.runs as unknown[], format: RUN_FORMAT, table: digests.runs, digest: (d: unknown) => recordDigest(d as RunDoc) }
  ];
  const modelDigests = new Set<string>();
  const scenarioDigests = new Set<string>();
  for (const k of kinds) {
    if (!isObject(k.table)) {
      out.push({ code: 'missing_part', kind: k.kind, message: `the bundle's digests have no table for ${k.kind}s` });
      continue;
    }
    const declared = k.table as Record<string, unknown>;
    const seen = new Set<string>();
    k.list.forEach((doc, i) => {
      if (!isObject(doc) || typeof doc.id !== 'string') {
        out.push({ code: 'wrong_format', kind: k.kind, message: `${k.kind} ${i + 1} has no id` });
        return;
      }
      const id = doc.id;
      if (doc.format !== k.format) out.push({ code: 'wrong_format', kind: k.kind, id, message: `${k.kind} '${id}' has format '${String(doc.format)}', expected '${k.format}'` });
      if (seen.has(id)) out.push({ code: 'duplicate_document', kind: k.kind, id, message: `${k.kind} '${id}' appears twice` });
      seen.add(id);
      let actual: string;
      try {
        actual = k.digest(doc);
      } catch (e) {
        out.push({ code: 'digest_mismatch', kind: k.kind, id, message: `${k.kind} '${id}' cannot be digested: ${(e as Error).message}` });
        return;
      }
      if (k.kind === 'model') modelDigests.add(digestOf(doc));
      if (k.kind === 'scenario') scenarioDigests.add(digestOf(doc));
      const want = declared[id];
      if (typeof want !== 'string') out.push({ code: 'undeclared_document', kind: k.kind, id, message: `${k.kind} '${id}' has no digest in the bundle` });
      else if (want !== actual) out.push({ code: 'digest_mismatch', kind: k.kind, id, message: `${k.kind} '${id}' was changed: the bundle says ${short(want)}, its content gives ${short(actual)}` });
      if (k.kind === 'run') {
        const run = doc as unknown as RunDoc;
        const expectId = `run_${runDigest(run).slice(7, 23)}`;
        if (run.id !== expectId) out.push({ code: 'run_id_mismatch', kind: 'run', id, message: `run '${id}' does not match its content (its results give id ${expectId})` });
      }
    });
    for (const id of Object.keys(declared)) {
      if (!seen.has(id)) out.push({ code: 'missing_document', kind: k.kind, id, message: `${k.kind} '${id}' is listed in the digests but missing from the bundle (truncated?)` });
    }
  }
  for (const r of value.runs as RunDoc[]) {
    if (!isObject(r)) continue;
    if (!modelDigests.has(r.modelDigest)) out.push({ code: 'unknown_input', kind: 'run', id: r.id, message: `run '${r.id}' used model ${short(r.modelDigest)}, which is not in the bundle` });
    if (!scenarioDigests.has(r.scenarioDigest)) out.push({ code: 'unknown_input', kind: 'run', id: r.id, message: `run '${r.id}' used scenario ${short(r.scenarioDigest)}, which is not in the bundle` });
  }
  // The record lists (optional; when a list is there, its digest table must be too).
  const modelIds = new Set((value.models as unknown[]).filter(isObject).map((m) => m.id));
  for (const [list, kind] of Object.entries(RECORD_LISTS)) {
    const records = value[list];
    const table = digests[list];
    if (records === undefined && table === undefined) continue;
    if (!Array.isArray(records)) {
      out.push({ code: 'missing_part', kind, message: `the bundle's '${list}' is not a list` });
      continue;
    }
    if (!isObject(table)) {
      out.push({ code: 'missing_part', kind, message: `the bundle's digests have no table for ${list}` });
      continue;
    }
    const seen = new Set<string>();
    records.forEach((rec, i) => {
      const id = isObject(rec) && typeof rec.id === 'string' ? rec.id : undefined;
      if (!id) {
        out.push({ code: 'wrong_format', kind, message: `${kind} record ${i + 1} has no id` });
        return;
      }
      if (seen.has(id)) out.push({ code: 'duplicate_document', kind, id, message: `${kind} '${id}' appears twice` });
      seen.add(id);
      if (typeof table[id] !== 'string') out.push({ code: 'undeclared_document', kind, id, message: `${kind} '${id}' has no digest in the bundle` });
      for (const m of checkRecord(kind, rec, table[id])) out.push({ code: m.includes('was changed') || m.includes('does not match') ? 'digest_mismatch' : 'wrong_format', kind, id, message: m });
      const r = rec as Record<string, unknown>;
      if (typeof r.model === 'string' && !modelIds.has(r.model)) out.push({ code: 'unknown_input', kind, id, message: `${kind} '${id}' belongs to model '${r.model}', which is not in the bundle` });
      if (kind === 'ensemble' && Array.isArray(r.scenarios)) {
        if (typeof r.modelDigest === 'string' && !modelDigests.has(r.modelDigest)) out.push({ code: 'unknown_input', kind, id, message: `ensemble '${id}' ran on model ${short(r.modelDigest)}, which is not in the bundle` });
        for (const sc of r.scenarios as { id?: unknown; digest?: unknown }[]) {
          if (!isObject(sc) || typeof sc.digest !== 'string' || !scenarioDigests.has(sc.digest)) out.push({ code: 'unknown_input', kind, id, message: `ensemble '${id}' ran scenario '${String((sc as { id?: unknown })?.id)}' ${short(String((sc as { digest?: unknown })?.digest))}, which is not in the bundle` });
        }
      }
    });
    for (const id of Object.keys(table)) {
      if (!seen.has(id)) out.push({ code: 'missing_document', kind, id, message: `${kind} '${id}' is listed in the digests but missing from the bundle (truncated?)` });
    }
  }
  // Sweeps (optional, like the record lists).
  if (value.sweeps !== undefined || digests.sweeps !== undefined) {
    const table = digests.sweeps;
    if (!Array.isArray(value.sweeps)) out.push({ code: 'missing_part', kind: 'sweep', message: "the bundle's 'sweeps' is not a list" });
    else if (!isObject(table)) out.push({ code: 'missing_part', kind: 'sweep', message: "the bundle's digests have no table for sweeps" });
    else {
      const seen = new Set<string>();
      (value.sweeps as unknown[]).forEach((sw, i) => {
        if (!isObject(sw) || typeof sw.id !== 'string' || !isObject(sw.doc) || !isObject(sw.settings) || typeof sw.modelDigest !== 'string') {
          out.push({ code: 'wrong_format', kind: 'sweep', message: `sweep ${i + 1} is not a stored sweep (id, doc, settings, modelDigest)` });
          return;
        }
        const id = sw.id;
        if (seen.has(id)) out.push({ code: 'duplicate_document', kind: 'sweep', id, message: `sweep '${id}' appears twice` });
        seen.add(id);
        if (sw.doc.format !== 'lakeledger.sweep/1') out.push({ code: 'wrong_format', kind: 'sweep', id, message: `sweep '${id}' has format '${String(sw.doc.format)}', expected 'lakeledger.sweep/1'` });
        const want = table[id];
        const actual = bundledSweepDigest(sw as unknown as BundledSweep);
        if (typeof want !== 'string') out.push({ code: 'undeclared_document', kind: 'sweep', id, message: `sweep '${id}' has no digest in the bundle` });
        else if (want !== actual) out.push({ code: 'digest_mismatch', kind: 'sweep', id, message: `sweep '${id}' was changed: the bundle says ${short(want)}, its content gives ${short(actual)}` });
        if (!modelDigests.has(sw.modelDigest)) out.push({ code: 'unknown_input', kind: 'sweep', id, message: `sweep '${id}' ran on model ${short(sw.modelDigest)}, which is not in the bundle` });
      });
      for (const id of Object.keys(table)) {
        if (!seen.has(id)) out.push({ code: 'missing_document', kind: 'sweep', id, message: `sweep '${id}' is listed in the digests but missing from the bundle (truncated?)` });
      }
    }
  }
  for (const f of verifyChain(value.log as unknown[])) out.push({ code: 'log', kind: 'log', id: f.seq !== undefined ? String(f.seq) : undefined, message: f.message });
  return out;
}
