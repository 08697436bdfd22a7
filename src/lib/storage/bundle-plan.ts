/**
 * What importing a bundle would do, decided before anything is written: for every model,
 * scenario and run of the (verified) bundle, whether the library lacks it (added), already
 * holds it (same id and digest: skipped) or holds something else under its id (a conflict,
 * which refuses the whole import: nothing is ever overwritten). Pure, so it is tested apart
 * from the database; storage writes the plan in one transaction or not at all.
 */
import { digestOf } from '$lib/engine/document/digest';
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import { RECORD_LISTS, bundledSweepDigest, type Bundle } from '$lib/archive/bundle';
import { recordDigest } from '$lib/archive/record';
import { recordDigestOf, type RecordKind } from '$lib/archive/records';

export type PlanKind = 'model' | 'scenario' | 'run' | 'sweep' | RecordKind;

export interface PlanItem {
  kind: PlanKind;
  id: string;
  /** For a scenario: the id of its model. */
  model?: string;
  digest: string;
  outcome: 'add' | 'skip' | 'conflict';
  /** Words for the report (why a conflict, what is there already). */
  note?: string;
}

/** What the library holds, by id: every digest stored under it. */
export interface Holdings {
  /** Model id → digests of every revision of every entry with that id. */
  models: Map<string, Set<string>>;
  /** `modelId/scenarioId` → digests of every revision. */
  scenarios: Map<string, Set<string>>;
  /** Run id → record digest. */
  runs: Map<string, string>;
  /** Ensemble, observation-set and calibration id → digest (ids carry their kind's prefix). */
  records?: Map<string, string>;
  /** Sweep id → digest. */
  sweeps?: Map<string, string>;
}

export interface ImportPlan {
  items: PlanItem[];
  /** True when nothing conflicts: the plan may be written. */
  ok: boolean;
  added: PlanItem[];
  skipped: PlanItem[];
  conflicts: PlanItem[];
}

export function planImport(bundle: Bundle, held: Holdings): ImportPlan {
  const items: PlanItem[] = [];
  const inBundle = new Set(bundle.models.map((m) => m.id));
  for (const m of bundle.models as ModelDoc[]) {
    const digest = digestOf(m);
    const there = held.models.get(m.id);
    if (!there) items.push({ kind: 'model', id: m.id, digest, outcome: 'add' });
    else if (there.has(digest)) items.push({ kind: 'model', id: m.id, digest, outcome: 'skip', note: 'the library has this model revision already' });
    else items.push({ kind: 'model', id: m.id, digest, outcome: 'conflict', note: `the library has a model '${m.id}' with other content; import it under another id, or remove the local one first` });
  }
  for (const s of bundle.scenarios as ScenarioDoc[]) {
    const digest = digestOf(s);
    const there = held.scenarios.get(`${s.model}/${s.id}`);
    const base = { kind: 'scenario' as const, id: s.id, model: s.model, digest };
    if (!inBundle.has(s.model) && !held.models.has(s.model)) items.push({ ...base, outcome: 'conflict', note: `its model '${s.model}' is neither in the bundle nor in the library` });
    else if (!there) items.push({ ...base, outcome: 'add' });
    else if (there.has(digest)) items.push({ ...base, outcome: 'skip', note: 'the library has this scenario revision already' });
    else items.push({ ...base, outcome: 'conflict', note: `model '${s.model}' has a scenario '${s.id}' with other content in the library` });
  }
  for (const r of bundle.runs as RunDoc[]) {
    const digest = recordDigest(r);
    const there = held.runs.get(r.id);
    if (there === undefined) items.push({ kind: 'run', id: r.id, digest, outcome: 'add' });
    else if (there === digest) items.push({ kind: 'run', id: r.id, digest, outcome: 'skip', note: 'the library has this run already' });
    else items.push({ kind: 'run', id: r.id, digest, outcome: 'conflict', note: `the library has a run '${r.id}' with another record digest` });
  }
  for (const [list, kind] of Object.entries(RECORD_LISTS)) {
    for (const rec of (bundle[list as keyof typeof RECORD_LISTS] ?? []) as { id: string }[]) {
      const digest = recordDigestOf(rec);
      const there = held.records?.get(rec.id);
      if (there === undefined) items.push({ kind, id: rec.id, digest, outcome: 'add' });
      else if (there === digest) items.push({ kind, id: rec.id, digest, outcome: 'skip', note: `the library has this ${kind} record already` });
      else items.push({ kind, id: rec.id, digest, outcome: 'conflict', note: `the library has a ${kind} record '${rec.id}' with another digest` });
    }
  }
  for (const sw of bundle.sweeps ?? []) {
    const digest = bundledSweepDigest(sw);
    const there = held.sweeps?.get(sw.id);
    if (there === undefined) items.push({ kind: 'sweep', id: sw.id, digest, outcome: 'add' });
    else if (there === digest) items.push({ kind: 'sweep', id: sw.id, digest, outcome: 'skip', note: 'the library has this sweep already' });
    else items.push({ kind: 'sweep', id: sw.id, digest, outcome: 'conflict', note: `the library has a sweep '${sw.id}' with another digest` });
  }
  const by = (o: PlanItem['outcome']) => items.filter((i) => i.outcome === o);
  const conflicts = by('conflict');
  return { items, ok: conflicts.length === 0, added: by('add'), skipped: by('skip'), conflicts };
}
