/**
 * Scenarios of the library's models over Dexie (the contract is ScenarioLibrary in
 * types.ts). They work as models do: immutable numbered revisions with the digest of their
 * canonical JSON, and a draft saved as it is, valid or not. A scenario is checked against
 * its model, so `create` and `commit` take the model document.
 */
import Dexie from 'dexie';
import { digestOf } from '$lib/engine/document/digest';
import { hasErrors } from '$lib/engine/document/problems';
import { validateScenario } from '$lib/engine/document/validate-scenario';
import { defaultScenario } from '$lib/engine/simulate';
import type { ModelDoc, Problem, ScenarioDoc } from '$lib/engine/document/types';
import type { LakeLedgerDb, ScenarioDraftRow } from './db';
import type { AuditLog } from './audit';
import { digestOrNull, firstFree, isObject, problemsLine } from './shared';
import type {
  ScenarioCommitResult,
  ScenarioEntry,
  ScenarioLibrary,
  ScenarioOrigin,
  ScenarioRevision
} from './types';

/** Why a scenario the library was asked to store is not valid for its model. */
export class InvalidScenarioError extends Error {
  constructor(readonly problems: Problem[]) {
    super(`not a valid scenario: ${problemsLine(problems)}`);
    this.name = 'InvalidScenarioError';
  }
}

export class NoSuchScenarioError extends Error {
  constructor(readonly key: string) {
    super(`there is no scenario '${key}' in the library (it may have been deleted)`);
    this.name = 'NoSuchScenarioError';
  }
}

export interface ScenarioLibraryDeps {
  now: () => string;
  newKey: () => string;
  /** Scenarios shipped with example models, by model id: an example gets them instead of a bare baseline. */
  exampleScenarios?: Readonly<Record<string, readonly ScenarioDoc[]>>;
  audit: AuditLog;
}



function titleOf(doc: ScenarioDoc): string {
  return typeof doc.title === 'string' && doc.title.trim() ? doc.title : doc.id;
}


/** The `meta` flag set once a model's scenarios were first set up (examples or baseline). */
export function scenariosSeededFlag(modelKey: string): string {
  return `scenarios-seeded:${modelKey}`;
}

export function createScenarioLibrary(db: LakeLedgerDb, deps: ScenarioLibraryDeps): ScenarioLibrary {
  const { now, newKey, audit } = deps;

  async function entryOrThrow(key: string): Promise<ScenarioEntry> {
    const entry = await db.scenarios.get(key);
    if (!entry) throw new NoSuchScenarioError(key);
    return entry;
  }

  async function headRevision(entry: ScenarioEntry): Promise<ScenarioRevision | undefined> {
    return entry.head > 0 ? db.scenarioRevisions.get([entry.key, entry.head]) : undefined;
  }

  async function workingCopy(entry: ScenarioEntry): Promise<unknown> {
    const draft = await db.scenarioDrafts.get(entry.key);
    if (draft) return draft.doc;
    return (await headRevision(entry))?.doc ?? null;
  }

  /** The model's newest revision (a scenario is checked against what runs). */
  async function modelDoc(modelKey: string): Promise<ModelDoc> {
    const entry = await db.entries.get(modelKey);
    if (!entry) throw new Error(`there is no model '${modelKey}' in the library (it may have been deleted)`);
    const rev = entry.head > 0 ? await db.revisions.get([modelKey, entry.head]) : undefined;
    if (!rev) throw new Error(`model '${entry.title}' has no saved revision yet`);
    return rev.doc;
  }

  function requireValid(doc: unknown, model: ModelDoc): ScenarioDoc {
    const problems = validateScenario(doc, model);
    if (hasErrors(problems)) throw new InvalidScenarioError(problems);
    return doc as ScenarioDoc;
  }

  async function takenIds(modelKey: string): Promise<Set<string>> {
    return new Set((await db.scenarios.where('modelKey').equals(modelKey).toArray()).map((s) => s.scenarioId));
  }

  /** Writes a new scenario with `doc` as revision 1. Inside a transaction over scenarios and revisions. */
  async function addScenario(modelKey: string, doc: ScenarioDoc, origin: ScenarioOrigin, at: string, note: string): Promise<ScenarioEntry> {
    const key = newKey();
    if (await db.scenarios.get(key)) throw new Error(`scenario key '${key}' is already in use`);
    const digest = digestOf(doc);
    const entry: ScenarioEntry = {
      key,
      modelKey,
      scenarioId: doc.id,
      title: titleOf(doc),
      origin,
      createdAt: at,
      updatedAt: at,
      head: 1,
      headDigest: digest,
      dirty: false
    };
    await db.scenarios.add(entry);
    await db.scenarioRevisions.add({ scenarioKey: key, number: 1, digest, doc, savedAt: at, note });
    await audit.append(origin === 'import' ? 'import' : 'create', { kind: 'scenario', id: doc.id, digest }, `revision 1 of '${entry.title}' for model ${doc.model} (${note})`);
    return entry;
  }

  async function listOf(modelKey: string): Promise<ScenarioEntry[]> {
    const rows = await db.scenarios.where('modelKey').equals(modelKey).toArray();
    return rows.sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.key.localeCompare(b.key));
  }

  async function writeDraft(entry: ScenarioEntry, doc: unknown, at: string): Promise<void> {
    const row: ScenarioDraftRow = { scenarioKey: entry.key, doc, savedAt: at };
    await db.scenarioDrafts.put(row);
    const next: ScenarioEntry = {
      ...entry,
      updatedAt: at,
      dirty: entry.headDigest === null || digestOrNull(doc) !== entry.headDigest
    };
    if (isObject(doc)) {
      if (typeof doc.id === 'string' && doc.id) next.scenarioId = doc.id;
      if (typeof doc.title === 'string' && doc.title.trim()) next.title = doc.title;
    }
    await db.scenarios.put(next);
  }

  const tables = [db.scenarios, db.scenarioRevisions, db.scenarioDrafts, db.log] as const;

  const library: ScenarioLibrary = {
    list: listOf,

    async get(key) {
      return db.scenarios.get(key);
    },

    async ensureBaseline(modelKey) {
      const model = await modelDoc(modelKey);
      const entry = await db.entries.get(modelKey);
      return db.transaction('rw', [...tables, db.meta], async () => {
        const flag = scenariosSeededFlag(modelKey);
        const at = now();
        if (!(await db.meta.get(flag))) {
          await db.meta.put({ key: flag, value: at });
          // An example model starts with the scenarios shipped for it (its baseline first).
          const shipped = entry?.origin === 'example' ? deps.exampleScenarios?.[model.id] ?? [] : [];
          const t0 = Date.parse(at);
          let i = 0;
          for (const doc of shipped) {
            if (hasErrors(validateScenario(doc, model))) continue;
            await addScenario(modelKey, structuredClone(doc) as ScenarioDoc, 'example', new Date(t0 + i++).toISOString(), 'example');
          }
        }
        const existing = await listOf(modelKey);
        for (const s of existing) {
          const head = await headRevision(s);
          if (head && (head.doc.measures ?? []).length === 0) return s;
        }
        const base = defaultScenario(model);
        const doc: ScenarioDoc = { ...base, id: firstFree(base.id, new Set(existing.map((s) => s.scenarioId))), initialState: 'model', measures: [] };
        return addScenario(modelKey, doc, 'baseline', at, 'baseline made for the model');
      });
    },

    async create(modelKey, doc, model, origin) {
      const valid = requireValid(doc, model);
      return db.transaction('rw', [...tables], async () => {
        if ((await takenIds(modelKey)).has(valid.id)) {
          throw new InvalidScenarioError([
            { severity: 'error', code: 'duplicate_id', path: 'id', message: `the model already has a scenario with id '${valid.id}'`, document: 'scenario' }
          ]);
        }
        return addScenario(modelKey, valid, origin, now(), origin === 'import' ? 'imported' : 'created');
      });
    },

    async duplicate(key) {
      return db.transaction('rw', [...tables], async () => {
        const entry = await entryOrThrow(key);
        const head = await headRevision(entry);
        if (!head) throw new Error(`scenario '${entry.title}' has no saved revision to copy`);
        const id = firstFree(`${head.doc.id}_copy`, await takenIds(entry.modelKey));
        const title = `${titleOf(head.doc)} (copy)`;
        const created = await addScenario(entry.modelKey, { ...structuredClone(head.doc), id, title }, 'duplicate', now(), `copy of '${entry.title}'`);
        // Unsaved edits of the original become the copy's draft, so nothing is lost.
        const working = await workingCopy(entry);
        if (isObject(working) && digestOrNull(working) !== entry.headDigest) {
          await writeDraft(created, { ...structuredClone(working), id, title }, now());
        }
        return (await db.scenarios.get(created.key)) ?? created;
      });
    },

    async remove(key) {
      const removed = await db.transaction('rw', [...tables], async () => {
        const entry = await entryOrThrow(key);
        const draft = await db.scenarioDrafts.get(key);
        const revisions = await db.scenarioRevisions.where('scenarioKey').equals(key).toArray();
        await db.scenarioRevisions.where('scenarioKey').equals(key).delete();
        await db.scenarioDrafts.delete(key);
        await db.scenarios.delete(key);
        await audit.append('delete', { kind: 'scenario', id: entry.scenarioId, digest: entry.headDigest }, `'${entry.title}' with ${revisions.length} revisions`);
        return { entry, draft, revisions };
      });
      let undone = false;
      return {
        undo: async () => {
          if (undone) return;
          await db.transaction('rw', [...tables], async () => {
            if (await db.scenarios.get(key)) throw new Error(`scenario '${removed.entry.title}' is in the library again already`);
            await db.scenarios.add(removed.entry);
            await db.scenarioRevisions.bulkAdd(removed.revisions);
            if (removed.draft) await db.scenarioDrafts.add(removed.draft);
            await audit.append('create', { kind: 'scenario', id: removed.entry.scenarioId, digest: removed.entry.headDigest }, `'${removed.entry.title}' restored with Undo after its deletion`);
          });
          undone = true;
        }
      };
    },

    async loadDraft(key) {
      return workingCopy(await entryOrThrow(key));
    },

    async saveDraft(key, doc) {
      await db.transaction('rw', db.scenarios, db.scenarioDrafts, async () => {
        const entry = await db.scenarios.get(key);
        if (!entry) return;
        await writeDraft(entry, doc, now());
      });
    },

    async commit(key, model, note): Promise<ScenarioCommitResult> {
      return db.transaction('rw', [...tables], async () => {
        const entry = await entryOrThrow(key);
        const draft = await db.scenarioDrafts.get(key);
        const head = await headRevision(entry);
        const doc = draft ? draft.doc : head?.doc;
        if (doc === undefined) throw new Error(`scenario '${key}' has neither a draft nor a revision`);
        const problems = validateScenario(doc, model);
        if (hasErrors(problems)) return { ok: false, problems };
        if (!draft && head) return { ok: true, revision: head, unchanged: true };
        const valid = doc as ScenarioDoc;
        const digest = digestOf(valid);
        const at = now();
        if (head && head.digest === digest) {
          await db.scenarioDrafts.delete(key);
          await db.scenarios.put({ ...entry, dirty: false });
          return { ok: true, revision: head, unchanged: true };
        }
        const others = await takenIds(entry.modelKey);
        others.delete(entry.scenarioId);
        if (valid.id !== entry.scenarioId && others.has(valid.id)) {
          return {
            ok: false,
            problems: [{ severity: 'error', code: 'duplicate_id', path: 'id', message: `the model already has a scenario with id '${valid.id}'`, document: 'scenario' }]
          };
        }
        const revision: ScenarioRevision = { scenarioKey: key, number: entry.head + 1, digest, doc: valid, savedAt: at };
        if (note) revision.note = note;
        await db.scenarioRevisions.add(revision);
        await db.scenarioDrafts.delete(key);
        await audit.append('revise', { kind: 'scenario', id: valid.id, digest }, `revision ${revision.number} of '${titleOf(valid)}'${note ? `: ${note}` : ''}`);
        await db.scenarios.put({
          ...entry,
          scenarioId: valid.id,
          title: titleOf(valid),
          head: revision.number,
          headDigest: digest,
          dirty: false,
          updatedAt: at
        });
        return { ok: true, revision, unchanged: false };
      });
    },

    async history(key) {
      const revisions = await db.scenarioRevisions
        .where('[scenarioKey+number]')
        .between([key, Dexie.minKey], [key, Dexie.maxKey])
        .toArray();
      return revisions.reverse();
    },

    async revision(key, number) {
      return db.scenarioRevisions.get([key, number]);
    }
  };
  return library;
}
