/**
 * The bad-input catalogue (DEVELOPERS.md, "Bad input"): every hostile or broken input a
 * user can bring in through a file is refused with a stable code and a message naming what
 * is wrong, nothing is written, and nothing throws, hangs or runs. One row per case.
 */
import { readFileSync } from 'node:fs';
import { BAD_FILES, MARKUP_FILES, oneBox, text, withRate } from '../../fixtures/bad-input';
import { describe, expect, it } from 'vitest';
import { IDBFactory, IDBKeyRange } from 'fake-indexeddb';
import { openDatabase } from '../../../src/lib/storage/db';
import { createLibrary } from '../../../src/lib/storage/library';
import { MAX_JSON_CHARS, MAX_JSON_DEPTH, parseJson, plainJsonProblem } from '../../../src/lib/engine/document/json';
import { MAX_EXPRESSION_CHARS } from '../../../src/lib/engine/expr/parse';
import { validateModel, validateScenario, simulate } from '../../../src/lib/engine';

function library() {
  return createLibrary(openDatabase({ indexedDB: new IDBFactory(), IDBKeyRange }));
}

describe('bad-input catalogue: every file is refused with its code and nothing is written', () => {
  it.each(BAD_FILES)('%s → %s', async (_what, code, fileText) => {
    const lib = library();
    const r = await lib.importText(fileText, 'bad.json');
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map((p) => p.code)).toContain(code);
    for (const p of r.problems) expect(p.message.length).toBeGreaterThan(10);
    expect(await lib.list()).toEqual([]);
  });

  it('the limits sit far above what real documents need', () => {
    const demo = readFileSync('static/examples/demo-lake.model.json', 'utf8');
    expect(demo.length).toBeLessThan(MAX_JSON_CHARS / 100);
    const longest = Math.max(...JSON.parse(demo).flows.map((f: { rate: string }) => f.rate.length));
    expect(longest).toBeLessThan(MAX_EXPRESSION_CHARS / 4);
    expect(MAX_JSON_DEPTH).toBeGreaterThanOrEqual(16);
  });

  it('a rate just under the length limit is still read', async () => {
    const terms = Math.floor(MAX_EXPRESSION_CHARS / 6) - 1;
    const rate = Array(terms).fill('Pin').join(' + ');
    expect(rate.length).toBeLessThanOrEqual(MAX_EXPRESSION_CHARS);
    const problems = validateModel(JSON.parse(withRate(`(${rate}) * Q / V`)));
    expect(problems.filter((p) => p.code === 'expression_too_long' || p.code === 'syntax_error')).toEqual([]);
  });

  it('a JSON "__proto__" key pollutes nothing and the document is kept as data', async () => {
    const lib = library();
    const r = await lib.importText(text(oneBox).replace('{', '{"__proto__":{"polluted":true},'), 'proto.json');
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(Object.prototype.hasOwnProperty.call(Object.prototype, 'polluted')).toBe(false);
    if (r.ok) expect(r.entry.modelId).toBe(oneBox.id);
  });

  it.each(MARKUP_FILES.map(([w, t]) => ({ w, t })))('$w is accepted as plain text', async ({ t: fileText }) => {
    const r = await library().importText(fileText, 'markup.json');
    expect(r.ok).toBe(true);
  });
});

describe('documents that do not come from JSON text (messages, stored rows)', () => {
  it('a cyclic model is refused with not_plain_json, naming the place, without throwing', () => {
    const cyclic = structuredClone(oneBox);
    cyclic.parameters[0].self = cyclic;
    const problems = validateModel(cyclic);
    expect(problems.map((p) => p.code)).toEqual(['not_plain_json']);
    expect(problems[0].message).toMatch(/cycle/);
    expect(problems[0].path).toBe('parameters[0].self');
  });

  it('a cyclic scenario is refused likewise, and simulate() fails the run instead of throwing', () => {
    const sc: Record<string, unknown> = { format: 'lakeledger.scenario/1', id: 's', model: oneBox.id, period: { start: '2027-01-01', end: '2028-01-01' } };
    sc.notes = sc;
    expect(validateScenario(sc, oneBox).map((p) => p.code)).toContain('not_plain_json');
    const run = simulate(oneBox, sc as never);
    expect(run.status).toBe('failed');
  });

  it('plainJsonProblem refuses functions, class instances and too deep values, and passes plain data', () => {
    expect(plainJsonProblem({ a: [1, 'x', null, true, { b: 2 }] })).toBeNull();
    expect(plainJsonProblem({ f: () => 1 })?.path).toBe('f');
    expect(plainJsonProblem({ d: new Date(0) })?.message).toMatch(/not plain JSON/);
    let deep: unknown = 1;
    for (let k = 0; k < MAX_JSON_DEPTH + 2; k++) deep = [deep];
    expect(plainJsonProblem(deep)?.message).toMatch(/nested more than/);
    // the same object twice (not a cycle) is fine
    const shared = { x: 1 };
    expect(plainJsonProblem({ a: shared, b: shared })).toBeNull();
  });

  it('parseJson itself reports too_deep with line and column, and never throws', () => {
    const r = parseJson('{"a":' + '['.repeat(MAX_JSON_DEPTH + 5));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0]).toMatchObject({ code: 'too_deep', line: 1 });
  });
});
