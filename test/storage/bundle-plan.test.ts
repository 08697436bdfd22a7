import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildBundle } from '$lib/archive/bundle';
import { recordDigest } from '$lib/archive/record';
import { digestOf } from '$lib/engine/document/digest';
import { simulate } from '$lib/engine/simulate';
import type { ModelDoc, ScenarioDoc } from '$lib/engine/document/types';
import { planImport, type Holdings } from '$lib/storage/bundle-plan';

const model = JSON.parse(readFileSync('static/examples/one-box.model.json', 'utf8')) as ModelDoc;
const scenario: ScenarioDoc = { format: 'lakeledger.scenario/1', id: 'base', model: model.id, period: { start: '2027-01-01', end: '2027-06-01' } };
const run = simulate(model, scenario);
const bundle = buildBundle({ models: [model], scenarios: [scenario], runs: [run], log: [], createdAt: '2027-01-01T00:00:00Z', engine: run.engine });
const empty = (): Holdings => ({ models: new Map(), scenarios: new Map(), runs: new Map() });

describe('planImport(bundle, what the library holds)', () => {
  it('into an empty library everything is added', () => {
    const p = planImport(bundle, empty());
    expect(p.ok).toBe(true);
    expect(p.added.map((i) => `${i.kind}:${i.id}`)).toEqual([`model:${model.id}`, 'scenario:base', `run:${run.id}`]);
  });

  it('the same ids and digests are skipped', () => {
    const held: Holdings = {
      models: new Map([[model.id, new Set(['sha256:other', digestOf(model)])]]),
      scenarios: new Map([[`${model.id}/base`, new Set([digestOf(scenario)])]]),
      runs: new Map([[run.id, recordDigest(run)]])
    };
    const p = planImport(bundle, held);
    expect(p.ok).toBe(true);
    expect(p.skipped).toHaveLength(3);
    expect(p.added).toHaveLength(0);
  });

  it('the same id with another digest is a conflict that refuses the import, naming it', () => {
    const held = empty();
    held.runs.set(run.id, 'sha256:tampered');
    held.models.set(model.id, new Set(['sha256:another']));
    const p = planImport(bundle, held);
    expect(p.ok).toBe(false);
    expect(p.conflicts.map((c) => c.kind)).toEqual(['model', 'run']);
    expect(p.conflicts[1].note).toMatch(/another record digest/);
  });

  it("a scenario whose model is nowhere is a conflict", () => {
    const lone = buildBundle({ models: [], scenarios: [scenario], runs: [], log: [], createdAt: 'x', engine: 'e' });
    const p = planImport(lone, empty());
    expect(p.ok).toBe(false);
    expect(p.conflicts[0].note).toMatch(/neither in the bundle nor in the library/);
  });
});
