/**
 * Stored runs over Dexie (the contract is RunStore in types.ts). A run is split in two
 * rows written in one transaction: `runs` holds what lists need (provenance, status,
 * closure, solver), `runData` the bulk, with times and every series as a Float64Array
 * column, which IndexedDB keeps as binary, not JSON text. Float64 keeps every number of the
 * run exactly (−0 and NaN included), so a loaded run is the run that was stored, digest
 * and all. Runs are immutable: an id that is already stored is never overwritten.
 */
import type { RunDoc } from '$lib/engine/document/types';
import type { LakeLedgerDb, RunDataRow } from './db';
import type { AuditLog } from './audit';
import { recordDigest } from '$lib/archive/record';
import type { RunProvenance, RunStore, StoredRunSummary } from './types';

export interface RunStoreDeps {
  now: () => string;
  audit: AuditLog;
}

/** Splits a run into its list row and its bulk row. */
export function packRun(run: RunDoc, summary: Omit<StoredRunSummary, 'points' | 'seriesIds'>): { row: StoredRunSummary; data: RunDataRow } {
  const seriesIds = Object.keys(run.series);
  const row: StoredRunSummary = { ...summary, points: run.times.length, seriesIds };
  const data: RunDataRow = {
    id: run.id,
    times: Float64Array.from(run.times),
    seriesIds,
    columns: seriesIds.map((id) => Float64Array.from(run.series[id])),
    units: { ...run.units },
    budget: structuredClone(run.budget)
  };
  return { row, data };
}

/** The run document again from its two rows (fields in the order of the contract). */
export function unpackRun(row: StoredRunSummary, data: RunDataRow): RunDoc {
  const series: Record<string, number[]> = {};
  data.seriesIds.forEach((id, i) => {
    series[id] = Array.from(data.columns[i]);
  });
  const run: RunDoc = {
    format: 'lakeledger.run/1',
    id: row.id,
    model: row.model,
    scenario: row.scenario,
    modelDigest: row.modelDigest,
    scenarioDigest: row.scenarioDigest,
    engine: row.engine,
    status: row.status,
    error: row.error,
    start: row.start,
    startedAt: row.startedAt,
    wallMs: row.wallMs,
    times: Array.from(data.times),
    units: { ...data.units },
    series,
    closure: row.closure,
    budget: data.budget as RunDoc['budget'],
    solver: row.solver,
    warnings: row.warnings
  };
  if (row.initialState) run.initialState = row.initialState;
  return run;
}

/** A run's list row (everything but its series) with where it came from in this library. */
export function summaryOf(run: RunDoc, provenance: RunProvenance, scenarioTitle: string, storedAt: string, digest: string): Omit<StoredRunSummary, 'points' | 'seriesIds'> {
  return {
    ...provenance,
    id: run.id,
    model: run.model,
    scenario: run.scenario,
    scenarioTitle,
    modelDigest: run.modelDigest,
    scenarioDigest: run.scenarioDigest,
    engine: run.engine,
    status: run.status,
    error: run.error,
    start: run.start,
    startedAt: run.startedAt,
    wallMs: run.wallMs,
    closure: run.closure,
    solver: run.solver,
    warnings: run.warnings,
    ...(run.initialState ? { initialState: run.initialState } : {}),
    storedAt,
    recordDigest: digest
  };
}

export function createRunStore(db: LakeLedgerDb, deps: RunStoreDeps): RunStore {
  return {
    async save(run, provenance, scenarioTitle) {
      if (!run.id) throw new Error('a run without an id cannot be stored (ensemble members are not kept one by one)');
      if (run.status === 'cancelled') throw new Error(`run ${run.id} was cancelled; only finished or failed runs are stored`);
      const digest = recordDigest(run);
      return db.transaction('rw', db.runs, db.runData, db.log, async () => {
        const existing = await db.runs.get(run.id);
        if (existing) return { summary: existing, added: false };
        const { row, data } = packRun(run, summaryOf(run, provenance, scenarioTitle, deps.now(), digest));
        await db.runs.add(row);
        await db.runData.add(data);
        await deps.audit.append('run', { kind: 'run', id: run.id, digest }, `${scenarioTitle}: ${run.status}, model revision ${provenance.modelRevision}, scenario revision ${provenance.scenarioRevision}`);
        return { summary: row, added: true };
      });
    },

    async list(modelKey) {
      const rows = await db.runs.where('modelKey').equals(modelKey).toArray();
      return rows.sort((a, b) => b.storedAt.localeCompare(a.storedAt) || a.id.localeCompare(b.id));
    },

    async summary(id) {
      return db.runs.get(id);
    },

    async load(id) {
      return db.transaction('r', db.runs, db.runData, async () => {
        const row = await db.runs.get(id);
        const data = await db.runData.get(id);
        if (!row || !data) return undefined;
        return unpackRun(row, data);
      });
    },

    async remove(id) {
      await db.transaction('rw', db.runs, db.runData, db.log, async () => {
        const row = await db.runs.get(id);
        if (!row) return;
        await db.runs.delete(id);
        await db.runData.delete(id);
        // Deleting a run leaves its record's digest in the log: nothing goes silently.
        await deps.audit.append('delete', { kind: 'run', id, digest: row.recordDigest ?? null }, `the run of ${row.scenarioTitle}`);
      });
    }
  };
}
