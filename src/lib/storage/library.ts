/**
 * The model library over Dexie (the contract is types.ts). Revisions are immutable and
 * numbered 1, 2, … per entry, each with the digest of its canonical JSON; the draft is the
 * working copy, saved as it is. Every change that touches more than one row runs in one
 * transaction, so a failure leaves nothing half-written.
 */
import Dexie from 'dexie';
import { digestOf } from '$lib/engine/document/digest';
import { parseJson } from '$lib/engine/document/json';
import { hasErrors } from '$lib/engine/document/problems';
import { validateModel } from '$lib/engine/document/validate-model';
import { ID_PATTERN, RESERVED } from '$lib/engine/document/ids';
import { MODEL_FORMAT, type ModelDoc, type Problem, type ScenarioDoc } from '$lib/engine/document/types';
import { createScenarioLibrary, scenariosSeededFlag } from './scenarios';
import { createRunStore } from './runs';
import { createAuditLog } from './audit';
import { createArchive } from './archive';
import { createSweepStore } from './sweeps';
import { createRecordStore } from './records';
import type { DraftRow, LakeLedgerDb } from './db';
import type { CommitResult, EntryOrigin, ImportResult, Library, ModelEntry, Revision } from './types';
import { digestOrNull, firstFree, isObject, problemsLine } from './shared';

export interface LibraryOptions {
  /** The clock. Default: the system clock. */
  now?: () => Date;
  /** Makes a new entry key (it appears in page addresses). Default: 12 random base-36 digits. */
  newKey?: () => string;
  /** Scenarios shipped with example models, by model id (an example's scenarios start from these). */
  exampleScenarios?: Readonly<Record<string, readonly ScenarioDoc[]>>;
  /** The user's own label for the audit log's `by` (default: none given). */
  who?: () => string;
}

/** The `meta` flag set once the examples were offered. */
export const SEEDED_FLAG = 'seeded';

/** Why a document the library was asked to store is not a valid model. */
export class InvalidModelError extends Error {
  constructor(readonly problems: Problem[]) {
    super(`not a valid model: ${problemsLine(problems)}`);
    this.name = 'InvalidModelError';
  }
}

/** An operation named an entry that is not in the library. */
export class NoSuchEntryError extends Error {
  constructor(readonly key: string) {
    super(`there is no model '${key}' in the library (it may have been deleted)`);
    this.name = 'NoSuchEntryError';
  }
}

function randomKey(): string {
  const bytes = new Uint8Array(12);
  crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => (b % 36).toString(36)).join('');
}



/** A model id made from a title: `Lake Ambrel 2` → `lake_ambrel_2`. */
export function idFromTitle(title: string): string {
  let id = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9_]+/g, '_')
    .replace(/_+/g, '_')
    .replace(/^_|_$/g, '');
  if (id === '') id = 'model';
  if (/^[0-9]/.test(id)) id = `m_${id}`;
  if (RESERVED.has(id)) id = `${id}_model`;
  return id;
}


/** The smallest valid model: one parameter, one state, no flows. */
export function emptyModel(id: string, title: string): ModelDoc {
  return {
    format: MODEL_FORMAT,
    id,
    title,
    conserved: { element: 'P', unit: 'kg' },
    parameters: [{ id: 'V', value: 1000000, unit: 'm^3', label: 'Lake volume' }],
    states: [{ id: 'TP', label: 'Total phosphorus', unit: 'mg/m^3', initial: 50, size: 'V', zone: 'water' }],
    flows: []
  };
}

/** Problems of JSON text as document problems (the code, place and words kept). */
function jsonProblems(problems: { code: string; path: string; message: string }[]): Problem[] {
  return problems.map((p) => ({ severity: 'error', code: p.code, path: p.path, message: p.message, document: 'model' }));
}

/** A file name that any file system accepts. */
function safeFileStem(s: string): string {
  return s.replace(/[^A-Za-z0-9_.-]+/g, '_') || 'model';
}

export function createLibrary(db: LakeLedgerDb, options: LibraryOptions = {}): Library {
  const now = () => (options.now ?? (() => new Date()))().toISOString();
  const newKey = options.newKey ?? randomKey;
  const audit = createAuditLog(db.log, { now, who: options.who ?? (() => '') });

  async function entryOrThrow(key: string): Promise<ModelEntry> {
    const entry = await db.entries.get(key);
    if (!entry) throw new NoSuchEntryError(key);
    return entry;
  }

  async function headRevision(entry: ModelEntry): Promise<Revision | undefined> {
    return entry.head > 0 ? db.revisions.get([entry.key, entry.head]) : undefined;
  }

  async function workingCopy(entry: ModelEntry): Promise<unknown> {
    const draft = await db.drafts.get(entry.key);
    if (draft) return draft.doc;
    return (await headRevision(entry))?.doc ?? null;
  }

  /** Checks a document that must be valid; throws with its problems otherwise. */
  function requireValid(doc: unknown): ModelDoc {
    const problems = validateModel(doc);
    if (hasErrors(problems)) throw new InvalidModelError(problems);
    return doc as ModelDoc;
  }

  /** Writes a new entry with `doc` as revision 1. Call inside a transaction over entries and revisions. */
  async function addEntry(doc: ModelDoc, origin: EntryOrigin, at: string, note: string): Promise<ModelEntry> {
    const key = newKey();
    if (await db.entries.get(key)) throw new Error(`entry key '${key}' is already in use`);
    const digest = digestOf(doc);
    const entry: ModelEntry = {
      key,
      modelId: doc.id,
      title: typeof doc.title === 'string' && doc.title.trim() ? doc.title : doc.id,
      origin,
      createdAt: at,
      updatedAt: at,
      head: 1,
      headDigest: digest,
      dirty: false
    };
    await db.entries.add(entry);
    await db.revisions.add({ entryKey: key, number: 1, digest, doc, savedAt: at, note });
    await audit.append(origin === 'import' ? 'import' : 'create', { kind: 'model', id: doc.id, digest }, `revision 1 of '${entry.title}' (${note})`);
    return entry;
  }

  async function create(doc: ModelDoc, origin: EntryOrigin, note?: string): Promise<ModelEntry> {
    const valid = requireValid(doc);
    return db.transaction('rw', db.entries, db.revisions, db.log, () =>
      addEntry(valid, origin, now(), note ?? (origin === 'example' ? 'example' : 'created'))
    );
  }

  /** Writes `doc` as the draft of `entry` and brings the entry's id, title and flag up to date. */
  async function writeDraft(entry: ModelEntry, doc: unknown, at: string): Promise<ModelEntry> {
    const row: DraftRow = { entryKey: entry.key, doc, savedAt: at };
    await db.drafts.put(row);
    const next: ModelEntry = {
      ...entry,
      updatedAt: at,
      dirty: entry.headDigest === null || digestOrNull(doc) !== entry.headDigest
    };
    if (isObject(doc)) {
      if (typeof doc.id === 'string' && doc.id) next.modelId = doc.id;
      if (typeof doc.title === 'string' && doc.title.trim()) next.title = doc.title;
    }
    await db.entries.put(next);
    return next;
  }

  /** Makes the working copy revision head+1 (or reports it unchanged). Inside a transaction. */
  async function commitIn(key: string, note: string | undefined, at: string): Promise<CommitResult> {
    const entry = await entryOrThrow(key);
    const draft = await db.drafts.get(key);
    const head = await headRevision(entry);
    if (!draft) {
      if (head) return { ok: true, revision: head, unchanged: true };
      throw new Error(`model '${key}' has neither a draft nor a revision`);
    }
    const problems = validateModel(draft.doc);
    if (hasErrors(problems)) return { ok: false, problems };
    const doc = draft.doc as ModelDoc;
    const digest = digestOf(doc);
    if (head && head.digest === digest) {
      await db.drafts.delete(key);
      await db.entries.put({ ...entry, dirty: false });
      return { ok: true, revision: head, unchanged: true };
    }
    const revision: Revision = { entryKey: key, number: entry.head + 1, digest, doc, savedAt: at };
    if (note) revision.note = note;
    await db.revisions.add(revision);
    await db.drafts.delete(key);
    await audit.append('revise', { kind: 'model', id: doc.id, digest }, `revision ${revision.number}${note ? `: ${note}` : ''}`);
    await db.entries.put({
      ...entry,
      modelId: doc.id,
      title: typeof doc.title === 'string' && doc.title.trim() ? doc.title : entry.title,
      head: revision.number,
      headDigest: digest,
      dirty: false,
      updatedAt: at
    });
    return { ok: true, revision, unchanged: false };
  }

  const scenarios = createScenarioLibrary(db, { now, newKey, exampleScenarios: options.exampleScenarios, audit });
  const runs = createRunStore(db, { now, audit });
  const sweeps = createSweepStore(db, { now, newKey, audit });

  const library: Library = {
    scenarios,
    runs,
    log: audit,
    archive: createArchive(db, { now, newKey, audit }),
    sweeps,
    ensembles: createRecordStore(db, 'ensemble', { now, audit }),
    observations: createRecordStore(db, 'observations', { now, audit }),
    calibrations: createRecordStore(db, 'calibration', { now, audit }),

    async list() {
      const entries = await db.entries.orderBy('updatedAt').reverse().toArray();
      // Ties (entries written in one moment) keep the order they were created in, newest first.
      return entries.sort(
        (a, b) => b.updatedAt.localeCompare(a.updatedAt) || b.createdAt.localeCompare(a.createdAt) || a.key.localeCompare(b.key)
      );
    },

    async get(key) {
      return db.entries.get(key);
    },

    async create(doc, origin) {
      return create(doc, origin);
    },

    async createEmpty(title) {
      const t = title.trim();
      if (!t) throw new Error('a new model needs a title');
      const taken = new Set((await db.entries.toArray()).map((e) => e.modelId));
      return create(emptyModel(firstFree(idFromTitle(t), taken, '_'), t), 'empty');
    },

    async duplicate(key) {
      return db.transaction('rw', db.entries, db.revisions, db.drafts, db.log, async () => {
        const entry = await entryOrThrow(key);
        const working = await workingCopy(entry);
        // The copy starts from the working copy when it is valid, else from the newest revision.
        const source = hasErrors(validateModel(working)) ? (await headRevision(entry))?.doc : (working as ModelDoc);
        if (!source) throw new Error(`model '${entry.title}' has no valid version to copy`);
        const taken = new Set((await db.entries.toArray()).map((e) => e.modelId));
        const id = firstFree(`${source.id}_copy`, taken);
        const baseTitle = typeof source.title === 'string' && source.title.trim() ? source.title : entry.title;
        const doc: ModelDoc = { ...structuredClone(source), id, title: `${baseTitle} (copy)` };
        requireValid(doc);
        return addEntry(doc, 'duplicate', now(), `copy of '${entry.title}'`);
      });
    },

    async rename(key, title) {
      const t = title.trim();
      if (!t) throw new Error('a title cannot be empty');
      await db.transaction('rw', db.entries, db.revisions, db.drafts, db.log, async () => {
        const entry = await entryOrThrow(key);
        const at = now();
        const draft = await db.drafts.get(key);
        const working = draft ? draft.doc : (await headRevision(entry))?.doc;
        if (!isObject(working)) {
          await db.entries.put({ ...entry, title: t, updatedAt: at });
          return;
        }
        const renamed = { ...working, title: t };
        const updated = await writeDraft({ ...entry, title: t }, renamed, at);
        // A model without unsaved edits gets the new title as a revision of its own; one
        // with edits keeps it in the draft beside them, for the next commit.
        if (!entry.dirty && !hasErrors(validateModel(renamed))) {
          await commitIn(updated.key, 'renamed', at);
        }
      });
    },

    async remove(key) {
      // The model goes with its scenarios, stored runs, sweeps, ensembles, observation sets and
      // calibrations; Undo brings all of it back.
      const all = [db.entries, db.revisions, db.drafts, db.meta, db.scenarios, db.scenarioRevisions, db.scenarioDrafts, db.runs, db.runData, db.sweeps, db.ensembles, db.ensembleMembers, db.observations, db.calibrations, db.log];
      const removed = await db.transaction('rw', all, async () => {
        const entry = await entryOrThrow(key);
        const draft = await db.drafts.get(key);
        const revisions = await db.revisions.where('entryKey').equals(key).toArray();
        const scenarioRows = await db.scenarios.where('modelKey').equals(key).toArray();
        const scenarioKeys = scenarioRows.map((r) => r.key);
        const scenarioRevisions = await db.scenarioRevisions.where('scenarioKey').anyOf(scenarioKeys).toArray();
        const scenarioDrafts = (await db.scenarioDrafts.bulkGet(scenarioKeys)).filter((d) => d !== undefined);
        const runRows = await db.runs.where('modelKey').equals(key).toArray();
        const runData = (await db.runData.bulkGet(runRows.map((r) => r.id))).filter((d) => d !== undefined);
        const seededFlag = await db.meta.get(scenariosSeededFlag(key));
        const sweepRows = await db.sweeps.where('modelKey').equals(key).toArray();
        await db.sweeps.bulkDelete(sweepRows.map((r) => r.id));
        const ensembleRows = await db.ensembles.where('modelKey').equals(key).toArray();
        const ensembleMembers = (await db.ensembleMembers.bulkGet(ensembleRows.map((r) => r.id))).filter((d) => d !== undefined);
        const observationRows = await db.observations.where('modelKey').equals(key).toArray();
        const calibrationRows = await db.calibrations.where('modelKey').equals(key).toArray();
        await db.ensembles.bulkDelete(ensembleRows.map((r) => r.id));
        await db.ensembleMembers.bulkDelete(ensembleRows.map((r) => r.id));
        await db.observations.bulkDelete(observationRows.map((r) => r.id));
        await db.calibrations.bulkDelete(calibrationRows.map((r) => r.id));
        await db.revisions.where('entryKey').equals(key).delete();
        await db.drafts.delete(key);
        await db.entries.delete(key);
        await db.scenarioRevisions.where('scenarioKey').anyOf(scenarioKeys).delete();
        await db.scenarioDrafts.bulkDelete(scenarioKeys);
        await db.scenarios.bulkDelete(scenarioKeys);
        await db.runs.bulkDelete(runRows.map((r) => r.id));
        await db.runData.bulkDelete(runRows.map((r) => r.id));
        await db.meta.delete(scenariosSeededFlag(key));
        await audit.append('delete', { kind: 'model', id: entry.modelId, digest: entry.headDigest }, `'${entry.title}' with ${revisions.length} revisions, ${scenarioRows.length} scenarios and ${runRows.length} stored runs`);
        return { entry, draft, revisions, scenarioRows, scenarioRevisions, scenarioDrafts, runRows, runData, seededFlag, sweepRows, ensembleRows, ensembleMembers, observationRows, calibrationRows };
      });
      let undone = false;
      return {
        undo: async () => {
          if (undone) return;
          await db.transaction('rw', all, async () => {
            if (await db.entries.get(key)) throw new Error(`model '${removed.entry.title}' is in the library again already`);
            await db.entries.add(removed.entry);
            await db.revisions.bulkAdd(removed.revisions);
            if (removed.draft) await db.drafts.add(removed.draft);
            await db.scenarios.bulkAdd(removed.scenarioRows);
            await db.scenarioRevisions.bulkAdd(removed.scenarioRevisions);
            await db.scenarioDrafts.bulkAdd(removed.scenarioDrafts);
            await db.runs.bulkAdd(removed.runRows);
            await db.runData.bulkAdd(removed.runData);
            await db.sweeps.bulkAdd(removed.sweepRows);
            await db.ensembles.bulkAdd(removed.ensembleRows);
            await db.ensembleMembers.bulkAdd(removed.ensembleMembers);
            await db.observations.bulkAdd(removed.observationRows);
            await db.calibrations.bulkAdd(removed.calibrationRows);
            if (removed.seededFlag) await db.meta.put(removed.seededFlag);
            await audit.append('create', { kind: 'model', id: removed.entry.modelId, digest: removed.entry.headDigest }, `'${removed.entry.title}' restored with Undo after its deletion`);
          });
          undone = true;
        }
      };
    },

    async importText(text, fileName) {
      const parsed = parseJson(text);
      if (!parsed.ok) return { ok: false, problems: jsonProblems(parsed.problems) };
      const problems = validateModel(parsed.value);
      if (hasErrors(problems)) return { ok: false, problems };
      const entry = await create(parsed.value as ModelDoc, 'import', `imported from ${fileName}`);
      return { ok: true, entry } satisfies ImportResult;
    },

    async exportText(key) {
      const entry = await entryOrThrow(key);
      const doc = await workingCopy(entry);
      const id = isObject(doc) && typeof doc.id === 'string' && ID_PATTERN.test(doc.id) ? doc.id : entry.modelId;
      return { fileName: `${safeFileStem(id)}.model.json`, text: `${JSON.stringify(doc, null, 2)}\n` };
    },

    async loadDraft(key) {
      return workingCopy(await entryOrThrow(key));
    },

    async saveDraft(key, doc) {
      await db.transaction('rw', db.entries, db.drafts, async () => {
        const entry = await db.entries.get(key);
        // The entry was deleted while a screen still held its draft: there is nothing to save into.
        if (!entry) return;
        await writeDraft(entry, doc, now());
      });
    },

    async commit(key, note) {
      return db.transaction('rw', db.entries, db.revisions, db.drafts, db.log, () => commitIn(key, note, now()));
    },

    async history(key) {
      const revisions = await db.revisions
        .where('[entryKey+number]')
        .between([key, Dexie.minKey], [key, Dexie.maxKey])
        .toArray();
      return revisions.reverse();
    },

    async restore(key, number) {
      await db.transaction('rw', db.entries, db.revisions, db.drafts, db.log, async () => {
        const entry = await entryOrThrow(key);
        const revision = await db.revisions.get([key, number]);
        if (!revision) throw new Error(`model '${entry.title}' has no revision ${number}`);
        await writeDraft(entry, structuredClone(revision.doc), now());
      });
    },

    async seed(examples) {
      const valid = examples.map(requireValid);
      return db.transaction('rw', db.entries, db.revisions, db.meta, db.log, async () => {
        if (await db.meta.get(SEEDED_FLAG)) return false;
        const at = now();
        await db.meta.put({ key: SEEDED_FLAG, value: at });
        if ((await db.entries.count()) > 0) return false;
        // The first example is listed first: each later one is a millisecond older.
        const t0 = Date.parse(at);
        for (let i = 0; i < valid.length; i++) {
          await addEntry(valid[i], 'example', new Date(t0 - i).toISOString(), 'example');
        }
        return true;
      });
    }
  };
  return library;
}
