/**
 * main(argv, io): the command line over the engine, run with an in-memory Io (files in a
 * Map, output collected), so no file system and no process are involved.
 * Exit codes: 0 all is well; 1 a check failed (a run failed or its closure fell outside
 * tolerance); 2 invalid input or usage, every problem on stderr, one a line, naming the file
 * and the JSON path, and never a stack trace.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { main, EXIT_CHECK_FAILED, EXIT_INVALID, EXIT_OK, type Io } from '../../src/cli/main';

const example = (file: string) => readFileSync(new URL(`../../static/examples/${file}`, import.meta.url), 'utf8');

interface Session {
  io: Io;
  files: Map<string, string>;
  out: string[];
  err: string[];
}

function session(files: Record<string, string> = {}): Session {
  const map = new Map(Object.entries(files));
  const out: string[] = [];
  const err: string[] = [];
  const io: Io = {
    out: (t) => void out.push(t),
    err: (t) => void err.push(t),
    readFile: (p) => {
      const t = map.get(p);
      if (t === undefined) throw Object.assign(new Error(`ENOENT: no such file or directory, open '${p}'`), { code: 'ENOENT' });
      return t;
    },
    writeFile: (p, t) => void map.set(p, t),
    now: () => new Date('2027-01-01T00:00:00Z'),
    clock: () => 0
  };
  return { io, files: map, out, err };
}

/** No line of stderr looks like a stack frame. */
function expectNoStackTrace(err: string[]) {
  for (const chunk of err) {
    for (const line of chunk.split('\n')) expect(line, line).not.toMatch(/^\s+at\s/);
  }
}

const ONE_BOX = example('one-box.model.json');
const NPZD = example('closed-npzd.model.json');

const scenario = (model: string, end: string, extra: Record<string, unknown> = {}) =>
  JSON.stringify({ format: 'lakeledger.scenario/1', id: 'short', model, period: { start: '2027-01-01', end }, ...extra });

/** An invented model with two mistakes: a rate without /d and a flow from an unknown state. */
const INVALID = JSON.stringify(
  {
    format: 'lakeledger.model/1',
    id: 'broken',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [{ id: 'V', value: 1e6, unit: 'm^3' }],
    states: [{ id: 'X', unit: 'mg/m^3', initial: 1, size: 'V' }],
    flows: [
      { id: 'f', from: 'X', rate: 'X' },
      { id: 'g', from: 'Y', rate: 'X' }
    ]
  },
  null,
  2
);

/** log(X/Xr − 2) is NaN at the initial X = 1: the run cannot start. */
const NAN_RATE = JSON.stringify({
  format: 'lakeledger.model/1',
  id: 'nan_rate',
  conserved: { element: 'P', unit: 'kg' },
  parameters: [
    { id: 'V', value: 1e6, unit: 'm^3' },
    { id: 'k', value: 0.1, unit: '1/d' },
    { id: 'Xr', value: 1, unit: 'mg/m^3' }
  ],
  states: [{ id: 'X', unit: 'mg/m^3', initial: 1, size: 'V' }],
  flows: [{ id: 'loss', from: 'X', rate: 'k * Xr * log(X / Xr - 2)' }]
});

describe('main(["validate", ...])', () => {
  it('a valid model → 0, an ok line on stderr and nothing on stdout', () => {
    const s = session({ 'one-box.model.json': ONE_BOX });
    expect(main(['validate', 'one-box.model.json'], s.io)).toBe(EXIT_OK);
    expect(s.out).toEqual([]);
    expect(s.err).toHaveLength(1);
    expect(s.err[0]).toMatch(/^ok: /);
  });

  it('a valid model and scenario → 0', () => {
    const s = session({ 'm.json': ONE_BOX, 's.json': scenario('ambrel_one_box', '2029-01-01') });
    expect(main(['validate', 'm.json', 's.json'], s.io)).toBe(EXIT_OK);
  });

  it('an invalid model → 2, each problem on one line naming the file, path and code, no stack trace', () => {
    const s = session({ 'models/broken.json': INVALID });
    expect(main(['validate', 'models/broken.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.out).toEqual([]);
    expect(s.err).toHaveLength(2);
    for (const line of s.err) {
      expect(line).not.toContain('\n');
      expect(line.startsWith('error: models/broken.json: ')).toBe(true);
    }
    expect(s.err[0]).toContain('flows[0].rate');
    expect(s.err[0]).toContain('[unit_mismatch]');
    expect(s.err[1]).toContain('flows[1].from');
    expect(s.err[1]).toContain('[unknown_state]');
    expectNoStackTrace(s.err);
  });

  it('a model with only warnings → 0, the warning on stderr', () => {
    const doc = JSON.parse(ONE_BOX);
    doc.states[0].intial = 3;
    const s = session({ 'm.json': JSON.stringify(doc) });
    expect(main(['validate', 'm.json'], s.io)).toBe(EXIT_OK);
    const warnings = s.err.filter((l) => l.startsWith('warning: '));
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toContain('states[0].intial');
    expect(warnings[0]).toContain('[unknown_field]');
  });

  it('an invalid scenario → 2 naming the scenario file and path', () => {
    const s = session({ 'm.json': ONE_BOX, 's.json': scenario('ambrel_one_box', '2027-02-30') });
    expect(main(['validate', 'm.json', 's.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.err).toHaveLength(1);
    expect(s.err[0].startsWith('error: s.json: period.end')).toBe(true);
    expect(s.err[0]).toContain('[invalid_date]');
  });

  it('a missing file → 2 naming the file', () => {
    const s = session();
    expect(main(['validate', 'nowhere.model.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.err).toHaveLength(1);
    expect(s.err[0]).toMatch(/^error: nowhere\.model\.json: /);
    expectNoStackTrace(s.err);
  });

  it('bad JSON → 2 naming the file, line and column', () => {
    const s = session({ 'bad.json': '{\n  "format": "lakeledger.model/1"\n  "id": "x"\n}' });
    expect(main(['validate', 'bad.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.err).toHaveLength(1);
    expect(s.err[0]).toMatch(/^error: bad\.json: /);
    expect(s.err[0]).toMatch(/line 3, column 3/);
    expect(s.err[0]).toContain('[json_syntax]');
    expectNoStackTrace(s.err);
  });

  it('a duplicate key → 2 naming the file and the key path', () => {
    const s = session({ 'dup.json': '{"format": "lakeledger.model/1", "states": [{"id": "X", "id": "Y"}]}' });
    expect(main(['validate', 'dup.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.err).toHaveLength(1);
    expect(s.err[0].startsWith('error: dup.json: states[0].id: ')).toBe(true);
    expect(s.err[0]).toContain('[duplicate_key]');
  });
});

describe('main(["equations", MODEL])', () => {
  it('prints one line per state of the closed NPZD example, then the whole-system identity', () => {
    const s = session({ 'npzd.json': NPZD });
    expect(main(['equations', 'npzd.json'], s.io)).toBe(EXIT_OK);
    const lines = s.out.flatMap((t) => t.split('\n')).filter(Boolean);
    const eqs = lines.filter((l) => /^\s+d\w+\/dt = /.test(l));
    const states = JSON.parse(NPZD).states.map((x: { id: string }) => x.id);
    expect(eqs.map((l) => /d(\w+)\/dt/.exec(l)![1])).toEqual(states);
    expect(lines.filter((l) => l.startsWith('Whole system:'))).toHaveLength(1);
  });

  it('an invalid model → 2', () => {
    const s = session({ 'm.json': INVALID });
    expect(main(['equations', 'm.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.out).toEqual([]);
  });
});

describe('main(["run", ...])', () => {
  it('a run → 0 with the run document (lakeledger.run/1) as JSON on stdout', () => {
    const s = session({ 'm.json': ONE_BOX, 's.json': scenario('ambrel_one_box', '2029-01-01') });
    expect(main(['run', 'm.json', 's.json'], s.io)).toBe(EXIT_OK);
    expect(s.out).toHaveLength(1);
    const run = JSON.parse(s.out[0]);
    expect(run.format).toBe('lakeledger.run/1');
    expect(run.status).toBe('ok');
    expect(run.model).toBe('ambrel_one_box');
    expect(run.scenario).toBe('short');
    expect(run.closure.ok).toBe(true);
    // 2027-01-01 to 2029-01-01 is 365 + 366 days; both ends are included, every day.
    expect(run.times.length).toBe(732);
    expect(run.series.TP).toHaveLength(732);
    expect(run.startedAt).toBe('2027-01-01T00:00:00.000Z');
  });

  it('a run without a scenario runs the baseline → 0', () => {
    const s = session({ 'm.json': ONE_BOX });
    expect(main(['run', 'm.json'], s.io)).toBe(EXIT_OK);
    expect(JSON.parse(s.out[0]).scenario).toBe('baseline');
  });

  it.each([
    ['--out FILE', ['--out', 'runs/r.json']],
    ['--out=FILE', ['--out=runs/r.json']],
    ['-o FILE', ['-o', 'runs/r.json']]
  ])('%s writes the run document to the file and nothing to stdout', (_what, opt) => {
    const s = session({ 'm.json': ONE_BOX, 's.json': scenario('ambrel_one_box', '2027-06-01') });
    expect(main(['run', 'm.json', 's.json', ...opt], s.io)).toBe(EXIT_OK);
    expect(s.out).toEqual([]);
    const written = s.files.get('runs/r.json');
    expect(written).toBeDefined();
    expect(JSON.parse(written!).format).toBe('lakeledger.run/1');
  });

  it('a run that fails (a rate NaN at the start, stiff solver) → 1, the failed run on stdout, the flow named on stderr', () => {
    const s = session({ 'm.json': NAN_RATE, 's.json': scenario('nan_rate', '2027-02-01', { solver: { method: 'stiff' } }) });
    expect(main(['run', 'm.json', 's.json'], s.io)).toBe(EXIT_CHECK_FAILED);
    const run = JSON.parse(s.out[0]);
    expect(run.status).toBe('failed');
    expect(run.error.code).toBe('non_finite_rate');
    expect(run.error.flow).toBe('loss');
    const failure = s.err.filter((l) => l.startsWith('error: '));
    expect(failure).toHaveLength(1);
    expect(failure[0]).toContain('loss');
    expect(failure[0]).toContain('[non_finite_rate]');
    expectNoStackTrace(s.err);
  });

  it('an invalid model → 2 and no run document', () => {
    const s = session({ 'm.json': INVALID });
    expect(main(['run', 'm.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.out).toEqual([]);
  });

  it('a scenario for another model → 2', () => {
    const s = session({ 'm.json': ONE_BOX, 's.json': scenario('other_lake', '2028-01-01') });
    expect(main(['run', 'm.json', 's.json'], s.io)).toBe(EXIT_INVALID);
    expect(s.err.some((l) => l.includes('[wrong_model]'))).toBe(true);
  });
});

describe('main(argv) usage errors → 2', () => {
  it.each<[string, string[]]>([
    ['no arguments', []],
    ['an unknown command', ['simulate', 'm.json']],
    ['an unknown option', ['validate', 'm.json', '--fast']],
    ['--out without a file name', ['run', 'm.json', '--out']],
    ['validate without a model', ['validate']],
    ['validate with three files', ['validate', 'm.json', 's.json', 'x.json']],
    ['equations with two files', ['equations', 'm.json', 's.json']]
  ])('%s', (_what, argv) => {
    const s = session({ 'm.json': ONE_BOX });
    expect(main(argv, s.io)).toBe(EXIT_INVALID);
    expect(s.out).toEqual([]);
    expect(s.err.join('\n')).toContain('usage:');
    expectNoStackTrace(s.err);
  });

  it('--help → 0 with the usage on stdout', () => {
    const s = session();
    expect(main(['--help'], s.io)).toBe(EXIT_OK);
    expect(s.out.join('\n')).toContain('usage:');
  });
});
