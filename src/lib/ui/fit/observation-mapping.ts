/**
 * The mapping step of the Fit screen, as pure functions: which variable names a monitoring
 * file uses, which of the model's series each goes to by default (the engine's own rule:
 * a series id, else a role), the map the engine takes, and what the preview shows (rows it
 * could not read with their line numbers, censored values kept per series). Also reads
 * the file an earlier version kept in localStorage, to move it into the library.
 */
import Papa from 'papaparse';
import type { ModelDoc } from '$lib/engine/document/types';
import { seriesOfModel, type ObservationSet, type RowProblem } from '$lib/engine/fit/observations';

/** A file's variable name with its number of data rows. */
export interface FileName {
  name: string;
  rows: number;
}

/** The distinct names in the file's `variable` column (any case of the header), in order of first use. */
export function fileVariableNames(text: string): FileName[] {
  const rows = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { header: false, skipEmptyLines: true }).data;
  if (!rows.length) return [];
  const col = rows[0].map((h) => h.trim().toLowerCase()).indexOf('variable');
  if (col < 0) return [];
  const counts = new Map<string, number>();
  for (const r of rows.slice(1)) {
    const name = (r[col] ?? '').trim();
    if (name !== '') counts.set(name, (counts.get(name) ?? 0) + 1);
  }
  return [...counts].map(([name, n]) => ({ name, rows: n }));
}

/** A target of the mapping: a series of the model (states and reported quantities). */
export interface MappingTarget {
  id: string;
  label: string;
  unit: string;
  role?: string;
}

export function mappingTargets(model: ModelDoc): MappingTarget[] {
  const labels = new Map<string, string>([
    ...model.states.map((s) => [s.id, s.label ?? s.id] as [string, string]),
    ...(model.derived ?? []).map((d) => [d.id, d.label ?? d.id] as [string, string])
  ]);
  return seriesOfModel(model).map((s) => ({ ...s, label: labels.get(s.id) ?? s.id }));
}

/** Name → series id, or '' (not mapped: its rows are listed as unreadable). */
export type Mapping = Record<string, string>;

/** The engine's default for each name: a series id as written, else the series with that role, else ''. */
export function defaultMapping(names: readonly FileName[], model: ModelDoc): Mapping {
  const targets = seriesOfModel(model);
  const out: Mapping = {};
  for (const { name } of names) {
    out[name] = targets.find((t) => t.id === name)?.id ?? targets.find((t) => t.role === name)?.id ?? '';
  }
  return out;
}

/**
 * The map for `parseObservations`: every mapped name to its series id. An unmapped name is
 * sent to no series: the engine then lists its rows as unknown (none dropped silently).
 */
export function engineMap(mapping: Mapping): Record<string, string> {
  return Object.fromEntries(Object.entries(mapping).filter(([, id]) => id !== ''));
}

/** Per series: points kept, and how many are censored (below a detection limit; above a bound, e.g. Secchi on the bottom). */
export interface CensoredCount {
  id: string;
  unit: string;
  names: string[];
  points: number;
  below: number;
  above: number;
}

export function censoredCounts(set: ObservationSet): CensoredCount[] {
  return Object.entries(set.variables).map(([id, v]) => {
    const pts = set.points.filter((p) => p.variable === id);
    return {
      id,
      unit: v.unit,
      names: v.names,
      points: pts.length,
      below: pts.filter((p) => p.censored === 'below').length,
      above: pts.filter((p) => p.censored === 'above').length
    };
  });
}

/** What the preview says in one line: rows read, used, unreadable, filtered. */
export function previewSummary(set: ObservationSet): string {
  const unreadable = new Set(set.problems.map((p) => p.line)).size;
  const parts = [`${set.rows} data rows`, `${set.used} used in ${set.points.length} dated values`];
  parts.push(unreadable === 0 ? 'no unreadable rows' : `${unreadable} row${unreadable === 1 ? '' : 's'} could not be read`);
  const filtered = set.filtered.station + set.filtered.depth;
  if (filtered) parts.push(`${filtered} left out by the station or depth choice`);
  return parts.join(', ');
}

/** Problems in line order, each as "line N: words". */
export function problemLines(problems: readonly RowProblem[]): string[] {
  return [...problems].sort((a, b) => a.line - b.line).map((p) => `line ${p.line}: ${p.message}`);
}

// ---------------------------------------------------------------------------------------
// The file as earlier versions of the screen kept it in localStorage, per model. It is now
// read once, moved into the library as an observation set, and the key removed.

export interface StoredObservations {
  fileName: string;
  /** `sha256:` + hex of the file's text (UTF-8). */
  digest: string;
  text: string;
  mapping: Mapping;
  loadedAt: string;
}

export const OBSERVATIONS_KEY_PREFIX = 'lakeledger.fit-observations.';

export interface KeyValueStore {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
  removeItem(key: string): void;
}

export function readKeptObservations(store: KeyValueStore | undefined, modelKey: string): StoredObservations | null {
  try {
    const raw = store?.getItem(OBSERVATIONS_KEY_PREFIX + modelKey);
    if (!raw) return null;
    const o = JSON.parse(raw) as Partial<StoredObservations>;
    if (typeof o.fileName !== 'string' || typeof o.text !== 'string' || typeof o.digest !== 'string' || typeof o.mapping !== 'object' || o.mapping === null) return null;
    return { fileName: o.fileName, digest: o.digest, text: o.text, mapping: o.mapping as Mapping, loadedAt: String(o.loadedAt ?? '') };
  } catch {
    return null;
  }
}

/** Whether anything is kept under the model's key (readable or not). */
export function hasKeptObservations(store: KeyValueStore | undefined, modelKey: string): boolean {
  try {
    return store?.getItem(OBSERVATIONS_KEY_PREFIX + modelKey) != null;
  } catch {
    return false;
  }
}

export function forgetObservations(store: KeyValueStore | undefined, modelKey: string): void {
  try {
    store?.removeItem(OBSERVATIONS_KEY_PREFIX + modelKey);
  } catch {
    /* nothing kept */
  }
}
