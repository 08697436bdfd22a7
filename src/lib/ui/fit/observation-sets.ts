/**
 * Stored observation sets as the Fit screen works with them, as pure functions. A set is
 * one record (`lakeledger.observations-record/1`, archive/records.ts) in the library per
 * model: the file's text with its `sha256:` digest, the mapping of the file's variable
 * names and the station and depth choice. Records are immutable and content-addressed: the
 * same file read the same way is stored once; reading it another way (another mapping, a
 * station) is a set of its own.
 *
 * The screen edits "working settings" (mapping and options) over the chosen set; they are
 * the chosen set's own until the user changes them, and are stored as a new set on request
 * or when a calibration made with them is accepted.
 */
import Papa from 'papaparse';
import type { ModelDoc } from '$lib/engine/document/types';
import type { ObservationOptions, ObservationSet } from '$lib/engine/fit/observations';
import { OBSERVATIONS_RECORD_FORMAT, type ObservationsRecord } from '$lib/archive/records';
import type { KeyValueStore, Mapping, FileName } from './observation-mapping';

export type SetOptions = ObservationsRecord['options'];

/** Every station and depth averaged on a date: the mixed water column (the default). */
export const MIXED_WATER_COLUMN: SetOptions = Object.freeze({ combine: 'mean', station: null, maxDepth: null }) as SetOptions;

/** The options `parseObservations` takes for a mapping and a station/depth choice. */
export function engineOptions(map: Record<string, string>, options: SetOptions): ObservationOptions {
  const out: ObservationOptions = { map, combine: options.combine };
  if (options.combine === 'station') out.station = options.station ?? '';
  if (options.maxDepth !== null) out.maxDepth = options.maxDepth;
  return out;
}

/** The mapping as a record keeps it: names mapped to nothing are left out. */
export function storedMapping(mapping: Mapping): Record<string, string> {
  return Object.fromEntries(Object.entries(mapping).filter(([, id]) => id !== '').sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)));
}

/** A stored mapping over the file's names: a name the record leaves out was mapped to nothing. */
export function workingMapping(names: readonly FileName[], stored: Record<string, string>): Mapping {
  return Object.fromEntries(names.map(({ name }) => [name, Object.hasOwn(stored, name) ? stored[name] : '']));
}

/** Options as stored, normalised: a station only with `station`, a depth only when it is a number ≥ 0. */
export function normaliseOptions(o: Partial<SetOptions>): SetOptions {
  const combine = o.combine === 'station' ? 'station' : 'mean';
  const depth = typeof o.maxDepth === 'number' && Number.isFinite(o.maxDepth) && o.maxDepth >= 0 ? o.maxDepth : null;
  return { combine, station: combine === 'station' ? (o.station ?? '') : null, maxDepth: depth };
}

/** What differs between the stored settings of a set and the working ones, in words (empty: nothing). */
export function settingsChanges(stored: { mapping: Record<string, string>; options: SetOptions }, working: { mapping: Mapping; options: SetOptions }): string[] {
  const out: string[] = [];
  const a = storedMapping(working.mapping);
  const b = stored.mapping;
  const mappingDiffers = Object.keys(a).length !== Object.keys(b).length || Object.entries(a).some(([k, v]) => b[k] !== v);
  if (mappingDiffers) out.push('which series each name means');
  const x = normaliseOptions(stored.options);
  const y = normaliseOptions(working.options);
  if (x.combine !== y.combine || x.station !== y.station) out.push('the station choice');
  if (x.maxDepth !== y.maxDepth) out.push('the depth limit');
  return out;
}

/** The station and depth choice in a few words, for lists and notes. */
export function optionsWords(options: SetOptions): string {
  const o = normaliseOptions(options);
  const where = o.combine === 'station' ? (o.station ? `station ${o.station} only` : 'rows without a station only') : 'all stations averaged';
  const depth = o.maxDepth === null ? (o.combine === 'station' ? 'all depths averaged' : 'all depths (mixed water column)') : `samples down to ${o.maxDepth} m`;
  return `${where}, ${depth}`;
}

/** The record of one observation set, without its id (the library seals it). */
export interface ObservationRecordInput {
  model: ModelDoc;
  name: string;
  text: string;
  textDigest: string;
  mapping: Mapping;
  options: SetOptions;
  /** The set read with this mapping and these options (rows and used are taken from it). */
  set: ObservationSet;
  wallMs: number;
}

export function observationRecord(input: ObservationRecordInput): Omit<ObservationsRecord, 'id'> {
  return {
    format: OBSERVATIONS_RECORD_FORMAT,
    model: input.model.id,
    name: input.name,
    text: input.text,
    textDigest: input.textDigest,
    mapping: storedMapping(input.mapping),
    options: normaliseOptions(input.options),
    rows: input.set.rows,
    used: input.set.used,
    wallMs: Math.round(input.wallMs)
  };
}

/** A station named in the file's `station` column, with its number of data rows. */
export interface FileStation {
  station: string;
  rows: number;
}

/** The distinct stations of the file (any header case), in order of first use; rows without a station are not a station. */
export function fileStations(text: string): FileStation[] {
  const { rows, col } = column(text, 'station');
  if (col < 0) return [];
  const counts = new Map<string, number>();
  for (const r of rows) {
    const s = (r[col] ?? '').trim();
    if (s !== '') counts.set(s, (counts.get(s) ?? 0) + 1);
  }
  return [...counts].map(([station, n]) => ({ station, rows: n }));
}

/** The depths (m) the file's `depth` column gives, sorted and distinct; unreadable cells are left to the engine's preview. */
export function fileDepths(text: string): number[] {
  const { rows, col } = column(text, 'depth');
  if (col < 0) return [];
  const depths = new Set<number>();
  for (const r of rows) {
    const t = (r[col] ?? '').trim();
    if (t !== '' && /^[+]?(\d+\.?\d*|\.\d+)$/.test(t)) depths.add(Number(t));
  }
  return [...depths].sort((a, b) => a - b);
}

function column(text: string, name: string): { rows: string[][]; col: number } {
  const all = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { header: false, skipEmptyLines: true }).data;
  if (!all.length) return { rows: [], col: -1 };
  return { rows: all.slice(1), col: all[0].map((h) => h.trim().toLowerCase()).indexOf(name) };
}

// ---------------------------------------------------------------------------------------
// Which stored set the screen uses: remembered per model in this browser (a pointer only;
// the sets themselves are in the library).

export const CHOSEN_SET_KEY_PREFIX = 'lakeledger.fit-chosen-set.';

export function readChosenSet(store: KeyValueStore | undefined, modelKey: string): string | null {
  try {
    return store?.getItem(CHOSEN_SET_KEY_PREFIX + modelKey) ?? null;
  } catch {
    return null;
  }
}

export function rememberChosenSet(store: KeyValueStore | undefined, modelKey: string, id: string | null): void {
  try {
    if (id === null) store?.removeItem(CHOSEN_SET_KEY_PREFIX + modelKey);
    else store?.setItem(CHOSEN_SET_KEY_PREFIX + modelKey, id);
  } catch {
    /* a preference only */
  }
}

/** The set to use: the remembered one when it is still stored, else the newest (rows come newest first). */
export function chooseSet(rows: readonly { id: string }[], remembered: string | null): string | null {
  if (remembered && rows.some((r) => r.id === remembered)) return remembered;
  return rows[0]?.id ?? null;
}
