/**
 * Bundles: every digest and the chain are checked before anything is trusted; a changed
 * value, a missing run or a foreign file is refused with a message that says what is
 * wrong; an archived run reproduces bitwise under the same engine and runtime.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { gunzipSync, gzipSync } from 'node:zlib';
import { simulate, digestOf, ENGINE_VERSION, type ModelDoc, type ScenarioDoc } from '../../src/lib/engine';
import { buildBundle, verifyBundle, type Bundle } from '../../src/lib/archive/bundle';
import { appendEntry, type LogEntry } from '../../src/lib/archive/log';
import { recordDigest } from '../../src/lib/archive/record';
import { reproduceRun } from '../../src/lib/archive/reproduce';
import { main, type Io } from '../../src/cli/main';

const read = <T>(p: string): T => JSON.parse(readFileSync(p, 'utf8')) as T;
const model = read<ModelDoc>('static/examples/one-box.model.json');
const scenario: ScenarioDoc = {
  format: 'lakeledger.scenario/1',
  id: 'short',
  model: model.id,
  period: { start: '2027-01-01', end: '2029-01-01' },
  measures: [{ id: 'cut', kind: 'scale', target: 'Pin', factor: 0.5, from: '2028-01-01' }]
};
const now = () => new Date('2027-06-01T12:00:00Z');

function makeBundle(): Bundle {
  const run = simulate(model, scenario, { now, clock: () => 0 });
  let head: LogEntry | null = null;
  const log: LogEntry[] = [];
  for (const e of [
    { action: 'create' as const, subject: { kind: 'model' as const, id: model.id, digest: digestOf(model) } },
    { action: 'create' as const, subject: { kind: 'scenario' as const, id: scenario.id, digest: digestOf(scenario) } },
    { action: 'run' as const, subject: { kind: 'run' as const, id: run.id, digest: recordDigest(run) } }
  ]) {
    head = appendEntry(head, { ...e, by: 'tester', at: now().toISOString() });
    log.push(head);
  }
  return buildBundle({ models: [model], scenarios: [scenario], runs: [run], log, createdAt: now().toISOString(), engine: ENGINE_VERSION });
}

describe('verifyBundle(bundle)', () => {
  it('a fresh bundle verifies', () => {
    expect(verifyBundle(makeBundle())).toEqual([]);
  });

  it('a changed series value is named as a changed run', () => {
    const b = makeBundle();
    b.runs[0].series.TP[100] *= 1.0000001;
    const f = verifyBundle(b);
    expect(f.find((x) => x.code === 'digest_mismatch')?.id).toBe(b.runs[0].id);
    expect(f.some((x) => x.code === 'run_id_mismatch')).toBe(true);
  });

  it('a changed model parameter is named, and the run no longer finds its model', () => {
    const b = makeBundle();
    b.models[0].parameters[0].value *= 2;
    const codes = verifyBundle(b).map((x) => x.code);
    expect(codes).toContain('digest_mismatch');
    expect(codes).toContain('unknown_input');
  });

  it('a missing run (truncated bundle) is named', () => {
    const b = makeBundle();
    const id = b.runs[0].id;
    b.runs = [];
    expect(verifyBundle(b)).toContainEqual(expect.objectContaining({ code: 'missing_document', kind: 'run', id }));
  });

  it('a changed log entry is named', () => {
    const b = makeBundle();
    b.log[1] = { ...b.log[1], by: 'someone else' };
    expect(verifyBundle(b).some((x) => x.code === 'log')).toBe(true);
  });

  it('a foreign file is refused as not a bundle', () => {
    expect(verifyBundle({ format: 'something/1' })[0].code).toBe('not_a_bundle');
    expect(verifyBundle(null)[0].code).toBe('not_a_bundle');
    expect(verifyBundle({ format: 'lakeledger.bundle/1' }).map((x) => x.code)).toContain('missing_part');
  });
});

describe('reproduceRun(bundle, id)', () => {
  it('reproduces a run bitwise under the same engine and runtime', () => {
    const b = makeBundle();
    const r = reproduceRun(b, b.runs[0].id, { engine: ENGINE_VERSION });
    expect(r.differences).toEqual([]);
    expect(r.identical).toBe(true);
  });

  it('reports the differences when the archived series were altered', () => {
    const b = makeBundle();
    b.runs[0].series.TP[10] += 1;
    const r = reproduceRun(b, b.runs[0].id, { engine: ENGINE_VERSION });
    expect(r.identical).toBe(false);
    expect(r.differences.join('\n')).toContain('series TP');
  });
});

describe('the command line: archive, verify, reproduce', () => {
  const files = new Map<string, Uint8Array>();
  const enc = new TextEncoder();
  files.set('m.json', enc.encode(JSON.stringify(model)));
  files.set('s.json', enc.encode(JSON.stringify(scenario)));
  let err = '';
  const io: Io = {
    out: () => {},
    err: (t) => (err += t + '\n'),
    readFile: (p) => new TextDecoder().decode(files.get(p) ?? (() => { throw Object.assign(new Error('no'), { code: 'ENOENT' }); })()),
    writeFile: (p, t) => files.set(p, enc.encode(t)),
    readBytes: (p) => {
      const b = files.get(p);
      if (!b) throw Object.assign(new Error('no'), { code: 'ENOENT' });
      return b;
    },
    writeBytes: (p, b) => files.set(p, b),
    gzip: (b) => new Uint8Array(gzipSync(b)),
    gunzip: (b) => new Uint8Array(gunzipSync(b)),
    now,
    clock: () => 0
  };

  it('archive writes a gzip bundle that verify accepts (exit 0) and reproduce reproduces (exit 0)', () => {
    expect(main(['archive', 'm.json', 's.json', '--out', 'b.gz', '--by', 'tester'], io)).toBe(0);
    const bytes = files.get('b.gz')!;
    expect([bytes[0], bytes[1]]).toEqual([0x1f, 0x8b]);
    expect(main(['verify', 'b.gz'], io)).toBe(0);
    const bundle = JSON.parse(new TextDecoder().decode(gunzipSync(bytes))) as Bundle;
    expect(bundle.log.map((e) => e.action)).toEqual(['create', 'create', 'run', 'export']);
    expect(main(['reproduce', 'b.gz', bundle.runs[0].id], io)).toBe(0);
  });

  it('verify exits 1 naming the run when one value was changed, and 2 for a file that is not a bundle', () => {
    const bundle = JSON.parse(new TextDecoder().decode(gunzipSync(files.get('b.gz')!))) as Bundle;
    bundle.runs[0].closure.finalMass += 1;
    files.set('t.gz', new Uint8Array(gzipSync(enc.encode(JSON.stringify(bundle)))));
    err = '';
    expect(main(['verify', 't.gz'], io)).toBe(1);
    expect(err).toContain(bundle.runs[0].id);
    files.set('x.json', enc.encode('{"format":"other/1"}'));
    expect(main(['verify', 'x.json'], io)).toBe(2);
    const damaged = files.get('b.gz')!.slice(0, 200);
    files.set('cut.gz', damaged);
    expect(main(['verify', 'cut.gz'], io)).toBe(2);
  });

  it('reproduce exits 2 for an unknown run id and 1 for a bundle that does not verify', () => {
    expect(main(['reproduce', 'b.gz', 'run_nope'], io)).toBe(2);
    const bundle = JSON.parse(new TextDecoder().decode(gunzipSync(files.get('b.gz')!))) as Bundle;
    bundle.runs[0].series.TP[5] += 1;
    files.set('t2.gz', new Uint8Array(gzipSync(enc.encode(JSON.stringify(bundle)))));
    err = '';
    expect(main(['reproduce', 't2.gz', bundle.runs[0].id], io)).toBe(1);
    expect(err).toContain('does not verify');
  });
});
