/**
 * The library as an archive (the contract is ArchiveStore in types.ts): verify every
 * stored digest and the log's chain, export a model's runs with their inputs and the log
 * as a `lakeledger.bundle/1`, and import a bundle all or nothing. Import checks the format,
 * every digest and the chain first (archive/bundle.ts), plans what it would add, skip or
 * refuse (bundle-plan.ts), and writes the whole plan in one transaction with a log entry
 * that records it; the bundle's own log segment is kept as it came, under that entry.
 */
import { digestOf } from '$lib/engine/document/digest';
import { ENGINE_VERSION } from '$lib/engine/version';
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import { buildBundle, verifyBundle, RECORD_LISTS, type Bundle, type BundledSweep } from '$lib/archive/bundle';
import { recordDigestOf, type CalibrationRecord, type EnsembleRecord, type ObservationsRecord, type RecordKind } from '$lib/archive/records';
import { recordDigest } from '$lib/archive/record';
import { verifyChain } from '$lib/archive/log';
import { runDigest } from '$lib/engine/simulate';
import type { LakeLedgerDb } from './db';
import type { AuditLog } from './audit';
import { planImport, type Holdings, type ImportPlan } from './bundle-plan';
import { packRun, summaryOf, unpackRun } from './runs';
import { sweepDigest } from './sweeps';
import type { ArchiveFinding, ArchiveStore, ImportReport, ModelEntry, ScenarioEntry, StoredRecordRow } from './types';

export interface ArchiveDeps {
  now: () => string;
  newKey: () => string;
  audit: AuditLog;
}

export function createArchive(db: LakeLedgerDb, deps: ArchiveDeps): ArchiveStore {
  const { now, newKey, audit } = deps;
  const everything = [db.entries, db.revisions, db.drafts, db.scenarios, db.scenarioRevisions, db.scenarioDrafts, db.runs, db.runData, db.log, db.importedLogs, db.ensembles, db.ensembleMembers, db.observations, db.calibrations, db.sweeps];
  const recordTables = { ensemble: db.ensembles, observations: db.observations, calibration: db.calibrations } as const;

  /** Every stored record of one kind, whole (an ensemble with its members). */
  async function wholeRecords(kind: RecordKind): Promise<{ row: StoredRecordRow<RecordKind>; record: EnsembleRecord | ObservationsRecord | CalibrationRecord; missing: boolean }[]> {
    const rows = (await (recordTables[kind] as unknown as { toArray(): Promise<StoredRecordRow<RecordKind>[]> }).toArray());
    const out = [];
    for (const row of rows) {
      if (kind !== 'ensemble') {
        out.push({ row, record: row.record, missing: false });
        continue;
      }
      const m = await db.ensembleMembers.get(row.id);
      out.push({ row, record: { ...(row.record as EnsembleRecord), members: m?.members ?? [] }, missing: !m });
    }
    return out;
  }

  async function holdings(): Promise<Holdings> {
    const models = new Map<string, Set<string>>();
    const entries = await db.entries.toArray();
    const byKey = new Map(entries.map((e) => [e.key, e]));
    for (const r of await db.revisions.toArray()) {
      const id = r.doc.id;
      if (!models.has(id)) models.set(id, new Set());
      models.get(id)!.add(r.digest);
    }
    const scenarios = new Map<string, Set<string>>();
    const scenarioRows = new Map((await db.scenarios.toArray()).map((s) => [s.key, s]));
    for (const r of await db.scenarioRevisions.toArray()) {
      const entry = scenarioRows.get(r.scenarioKey);
      const modelId = entry ? byKey.get(entry.modelKey)?.modelId ?? r.doc.model : r.doc.model;
      const k = `${modelId}/${r.doc.id}`;
      if (!scenarios.has(k)) scenarios.set(k, new Set());
      scenarios.get(k)!.add(r.digest);
    }
    const runs = new Map<string, string>();
    for (const r of await db.runs.toArray()) runs.set(r.id, r.recordDigest ?? '');
    const records = new Map<string, string>();
    for (const t of Object.values(recordTables)) for (const r of await (t as unknown as { toArray(): Promise<StoredRecordRow<RecordKind>[]> }).toArray()) records.set(r.id, r.digest);
    const sweeps = new Map<string, string>();
    for (const w of await db.sweeps.toArray()) sweeps.set(w.id, w.digest ?? sweepDigest(w));
    return { models, scenarios, runs, records, sweeps };
  }

  return {
    async verify() {
      const findings: ArchiveFinding[] = [];
      const revisions = await db.revisions.toArray();
      for (const r of revisions) {
        const d = digestOf(r.doc);
        if (d !== r.digest) findings.push({ kind: 'model', id: `${r.doc.id} revision ${r.number}`, code: 'revision_digest', message: `model '${r.doc.id}' revision ${r.number} was changed: stored ${r.digest.slice(0, 19)}…, its content gives ${d.slice(0, 19)}…` });
      }
      const scenarioRevisions = await db.scenarioRevisions.toArray();
      for (const r of scenarioRevisions) {
        const d = digestOf(r.doc);
        if (d !== r.digest) findings.push({ kind: 'scenario', id: `${r.doc.id} revision ${r.number}`, code: 'revision_digest', message: `scenario '${r.doc.id}' revision ${r.number} was changed: stored ${r.digest.slice(0, 19)}…, its content gives ${d.slice(0, 19)}…` });
      }
      const rows = await db.runs.toArray();
      for (const row of rows) {
        const data = await db.runData.get(row.id);
        if (!data) {
          findings.push({ kind: 'run', id: row.id, code: 'run_data_missing', message: `run ${row.id} has lost its series (the stored data row is missing)` });
          continue;
        }
        const run = unpackRun(row, data);
        const rec = recordDigest(run);
        if (row.recordDigest && rec !== row.recordDigest) findings.push({ kind: 'run', id: row.id, code: 'record_digest', message: `run ${row.id} was changed since it was stored: its record digest was ${row.recordDigest.slice(0, 19)}…, its content now gives ${rec.slice(0, 19)}…` });
        const expectId = `run_${runDigest(run).slice(7, 23)}`;
        if (run.id !== expectId) findings.push({ kind: 'run', id: row.id, code: 'run_id', message: `run ${row.id} does not match its content (its results give id ${expectId})` });
      }
      const sweeps = await db.sweeps.toArray();
      for (const w of sweeps) {
        if (!w.digest) continue;
        const d = sweepDigest(w);
        if (d !== w.digest) findings.push({ kind: 'sweep', id: w.id, code: 'sweep_digest', message: `sweep ${w.id} was changed since it was stored: its digest was ${w.digest.slice(0, 19)}…, its content now gives ${d.slice(0, 19)}…` });
      }
      const counts: Record<RecordKind, number> = { ensemble: 0, observations: 0, calibration: 0 };
      for (const kind of Object.keys(recordTables) as RecordKind[]) {
        for (const { row, record, missing } of await wholeRecords(kind)) {
          counts[kind]++;
          if (missing) {
            findings.push({ kind, id: row.id, code: 'members_missing', message: `ensemble ${row.id} has lost its members (the stored members row is missing)` });
            continue;
          }
          const d = recordDigestOf(record);
          if (d !== row.digest) findings.push({ kind, id: row.id, code: 'record_digest', message: `${kind} ${row.id} was changed since it was stored: its digest was ${row.digest.slice(0, 19)}…, its content now gives ${d.slice(0, 19)}…` });
          else if (record.id !== row.id || !row.id.endsWith(d.slice(7, 23))) findings.push({ kind, id: row.id, code: 'record_id', message: `${kind} ${row.id} does not match its content (its content gives …${d.slice(7, 23)})` });
        }
      }
      const entries = await audit.list();
      for (const f of verifyChain(entries, { fromStart: true })) findings.push({ kind: 'log', id: f.seq !== undefined ? `entry ${f.seq}` : `entry ${f.index + 1}`, code: f.code, message: f.message });
      return { findings, checked: { revisions: revisions.length + scenarioRevisions.length, runs: rows.length, sweeps: sweeps.length, ensembles: counts.ensemble, observations: counts.observations, calibrations: counts.calibration, entries: entries.length } };
    },

    async bundleOf(modelKey, runIds) {
      const entry = await db.entries.get(modelKey);
      if (!entry) throw new Error(`there is no model '${modelKey}' in the library`);
      let rows = (await db.runs.where('modelKey').equals(modelKey).toArray()).filter((r) => r.status !== 'cancelled');
      if (runIds) rows = rows.filter((r) => runIds.includes(r.id));
      if (!rows.length) throw new Error(`model '${entry.title}' has no stored runs to export`);
      // One bundle holds one document per id: the runs of one model revision and one
      // revision of each scenario.
      const modelRevs = [...new Set(rows.map((r) => r.modelRevision))];
      if (modelRevs.length > 1) throw new Error(`the runs use model revisions ${modelRevs.sort((a, b) => a - b).join(', ')}; a bundle holds one revision of a model: pick the runs of one revision`);
      const model = (await db.revisions.get([modelKey, modelRevs[0]]))?.doc;
      if (!model) throw new Error(`model revision ${modelRevs[0]} is not in the library`);
      const scenarios = new Map<string, ScenarioDoc>();
      for (const r of rows) {
        const doc = (await db.scenarioRevisions.get([r.scenarioKey, r.scenarioRevision]))?.doc;
        if (!doc) throw new Error(`scenario revision ${r.scenarioRevision} of run ${r.id} is not in the library`);
        const there = scenarios.get(doc.id);
        if (there && digestOf(there) !== digestOf(doc)) throw new Error(`the runs use two revisions of scenario '${doc.id}'; pick the runs of one revision`);
        scenarios.set(doc.id, doc);
      }
      const runs: RunDoc[] = [];
      for (const r of rows) {
        const data = await db.runData.get(r.id);
        if (data) runs.push(unpackRun(r, data));
      }
      // The model's observation sets and calibrations, and its ensembles of the same model
      // revision whose scenario revisions fit the bundle (one revision per scenario id).
      const modelDigest = digestOf(model);
      const observations = (await db.observations.where('modelKey').equals(modelKey).toArray()).map((r) => r.record as ObservationsRecord);
      const calibrations = (await db.calibrations.where('modelKey').equals(modelKey).toArray()).map((r) => r.record as CalibrationRecord);
      const ensembles: EnsembleRecord[] = [];
      let ensemblesLeft = 0;
      for (const row of await db.ensembles.where('modelKey').equals(modelKey).toArray()) {
        const rec = row.record as EnsembleRecord;
        if (rec.modelDigest !== modelDigest) {
          ensemblesLeft++;
          continue;
        }
        const wanted = new Map<string, ScenarioDoc>();
        let fits = true;
        for (const [i, sc] of rec.scenarios.entries()) {
          const there = scenarios.get(sc.id);
          if (there) {
            if (digestOf(there) !== sc.digest) fits = false;
            continue;
          }
          const p = row.provenance.scenarios?.[i];
          const doc = p ? (await db.scenarioRevisions.get([p.key, p.revision]))?.doc : undefined;
          if (!doc || digestOf(doc) !== sc.digest) fits = false;
          else wanted.set(sc.id, doc);
        }
        if (!fits) {
          ensemblesLeft++;
          continue;
        }
        for (const [id, doc] of wanted) scenarios.set(id, doc);
        const m = await db.ensembleMembers.get(row.id);
        ensembles.push({ ...rec, members: m?.members ?? [] });
      }
      const sweeps = (await db.sweeps.where('modelKey').equals(modelKey).toArray())
        .filter((w) => w.modelDigest === modelDigest)
        .map((w) => ({ id: w.id, modelDigest: w.modelDigest, settings: w.settings as unknown as Record<string, unknown>, doc: w.doc as unknown as BundledSweep['doc'], wallMs: w.wallMs }));
      const at = now();
      const extra = [
        sweeps.length ? `${sweeps.length} sweeps` : '',
        ensembles.length ? `${ensembles.length} ensembles` : '',
        ensemblesLeft ? `${ensemblesLeft} ensembles of other revisions left out` : '',
        observations.length ? `${observations.length} observation sets` : '',
        calibrations.length ? `${calibrations.length} calibrations` : ''
      ].filter(Boolean);
      await db.transaction('rw', db.log, () =>
        audit.append('export', { kind: 'bundle', id: `${model.id}-${at.slice(0, 10)}`, digest: null }, `${runs.length} runs of model '${model.id}' revision ${modelRevs[0]} with ${scenarios.size} scenarios${extra.length ? `; ${extra.join(', ')}` : ''}`)
      );
      return buildBundle({ models: [model], scenarios: [...scenarios.values()], runs, ensembles, observations, calibrations, sweeps, log: await audit.list(), createdAt: at, engine: ENGINE_VERSION });
    },

    async importBundle(value): Promise<ImportReport> {
      const findings = verifyBundle(value);
      if (findings.length) return { ok: false, reason: 'invalid', findings, plan: null };
      const bundle = value as Bundle;
      return db.transaction('rw', everything, async () => {
        const plan: ImportPlan = planImport(bundle, await holdings());
        if (!plan.ok) return { ok: false, reason: 'conflict', findings: [], plan };
        const at = now();
        const modelKeys = new Map<string, { key: string; revisions: Map<string, number> }>();
        for (const e of await db.entries.toArray()) {
          const revs = await db.revisions.where('entryKey').equals(e.key).toArray();
          if (!modelKeys.has(e.modelId)) modelKeys.set(e.modelId, { key: e.key, revisions: new Map() });
          for (const r of revs) modelKeys.get(e.modelId)!.revisions.set(r.digest, r.number);
        }
        for (const item of plan.added.filter((i) => i.kind === 'model')) {
          const doc = bundle.models.find((m) => m.id === item.id) as ModelDoc;
          const key = newKey();
          const entry: ModelEntry = { key, modelId: doc.id, title: typeof doc.title === 'string' && doc.title.trim() ? doc.title : doc.id, origin: 'import', createdAt: at, updatedAt: at, head: 1, headDigest: item.digest, dirty: false };
          await db.entries.add(entry);
          await db.revisions.add({ entryKey: key, number: 1, digest: item.digest, doc, savedAt: at, note: 'from a bundle' });
          modelKeys.set(doc.id, { key, revisions: new Map([[item.digest, 1]]) });
        }
        const scenarioKeys = new Map<string, { key: string; revisions: Map<string, number> }>();
        for (const s of await db.scenarios.toArray()) {
          const modelId = (await db.entries.get(s.modelKey))?.modelId;
          const revs = await db.scenarioRevisions.where('scenarioKey').equals(s.key).toArray();
          scenarioKeys.set(`${modelId}/${s.scenarioId}`, { key: s.key, revisions: new Map(revs.map((r) => [r.digest, r.number])) });
        }
        for (const item of plan.added.filter((i) => i.kind === 'scenario')) {
          const doc = bundle.scenarios.find((s) => s.id === item.id && s.model === item.model) as ScenarioDoc;
          const model = modelKeys.get(doc.model);
          if (!model) throw new Error(`scenario '${doc.id}' has no model '${doc.model}' to belong to`);
          const key = newKey();
          const entry: ScenarioEntry = { key, modelKey: model.key, scenarioId: doc.id, title: typeof doc.title === 'string' && doc.title.trim() ? doc.title : doc.id, origin: 'import', createdAt: at, updatedAt: at, head: 1, headDigest: item.digest, dirty: false };
          await db.scenarios.add(entry);
          await db.scenarioRevisions.add({ scenarioKey: key, number: 1, digest: item.digest, doc, savedAt: at, note: 'from a bundle' });
          scenarioKeys.set(`${doc.model}/${doc.id}`, { key, revisions: new Map([[item.digest, 1]]) });
        }
        for (const item of plan.added.filter((i) => i.kind === 'run')) {
          const run = bundle.runs.find((r) => r.id === item.id) as RunDoc;
          const model = modelKeys.get(run.model);
          const scenario = scenarioKeys.get(`${run.model}/${run.scenario}`);
          const scenarioTitle = bundle.scenarios.find((s) => s.id === run.scenario)?.title ?? run.scenario;
          const summary = summaryOf(
            run,
            { modelKey: model?.key ?? '', modelRevision: model?.revisions.get(run.modelDigest) ?? 0, scenarioKey: scenario?.key ?? '', scenarioRevision: scenario?.revisions.get(run.scenarioDigest) ?? 0 },
            scenarioTitle,
            at,
            item.digest
          );
          const { row, data } = packRun(run, summary);
          await db.runs.add(row);
          await db.runData.add(data);
        }
        for (const [list, kind] of Object.entries(RECORD_LISTS)) {
          for (const item of plan.added.filter((i) => i.kind === kind)) {
            const rec = (bundle[list as keyof typeof RECORD_LISTS] ?? []).find((r) => r.id === item.id)!;
            const model = modelKeys.get(rec.model);
            let modelRevision: number | null = null;
            let scenarios: { key: string; revision: number }[] | undefined;
            if (kind === 'ensemble') {
              const e = rec as EnsembleRecord;
              modelRevision = model?.revisions.get(e.modelDigest) ?? null;
              scenarios = e.scenarios.map((sc) => {
                const k = scenarioKeys.get(`${e.model}/${sc.id}`);
                return { key: k?.key ?? '', revision: k?.revisions.get(sc.digest) ?? 0 };
              });
            } else if (kind === 'calibration') modelRevision = model?.revisions.get((rec as CalibrationRecord).modelDigestAfter) ?? null;
            const members = kind === 'ensemble' ? (rec as EnsembleRecord).members : null;
            const row: StoredRecordRow<RecordKind> = {
              id: rec.id,
              modelKey: model?.key ?? '',
              provenance: { modelKey: model?.key ?? '', modelRevision, ...(scenarios ? { scenarios } : {}) },
              record: members ? { ...(rec as EnsembleRecord), members: [] } : rec,
              digest: item.digest,
              storedAt: at,
              memberCount: members?.length ?? 0
            };
            await (recordTables[kind] as unknown as { add(r: StoredRecordRow<RecordKind>): Promise<unknown> }).add(row);
            if (members) await db.ensembleMembers.add({ id: rec.id, members });
          }
        }
        for (const item of plan.added.filter((i) => i.kind === 'sweep')) {
          const sw = (bundle.sweeps ?? []).find((w) => w.id === item.id)!;
          const model = [...modelKeys.values()].find((m) => m.revisions.has(sw.modelDigest));
          await db.sweeps.add({
            id: sw.id,
            modelKey: model?.key ?? '',
            modelRevision: model?.revisions.get(sw.modelDigest) ?? 0,
            modelDigest: sw.modelDigest,
            settings: sw.settings as never,
            doc: sw.doc as never,
            storedAt: at,
            wallMs: sw.wallMs,
            digest: item.digest
          });
        }
        const records = count(plan, 'ensemble') + count(plan, 'observations') + count(plan, 'calibration') + count(plan, 'sweep');
        const note = `added ${plan.added.length} (${count(plan, 'model')} models, ${count(plan, 'scenario')} scenarios, ${count(plan, 'run')} runs${records ? `, ${count(plan, 'ensemble')} ensembles, ${count(plan, 'observations')} observation sets, ${count(plan, 'calibration')} calibrations, ${count(plan, 'sweep')} sweeps` : ''}), had ${plan.skipped.length} already; the bundle's log of ${bundle.log.length} entries is kept with this entry`;
        const entry = await audit.append('import', { kind: 'bundle', id: bundle.createdAt, digest: digestOf(bundle) }, note);
        await db.importedLogs.add({ importSeq: entry.seq, entries: bundle.log });
        return { ok: true, reason: null, findings: [], plan };
      });
    },

    async note(kind, id, text) {
      const t = text.trim();
      if (!t) throw new Error('a note cannot be empty');
      return db.transaction('rw', db.log, () => audit.append('note', { kind, id, digest: null }, t));
    }
  };
}

function count(plan: ImportPlan, kind: ImportPlan['items'][number]['kind']): number {
  return plan.added.filter((i) => i.kind === kind).length;
}
