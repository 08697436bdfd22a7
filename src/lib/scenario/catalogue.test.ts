import { describe, expect, it } from 'vitest';
import bundled from './catalogue.json';
import { CATALOGUE, CatalogueInvalidError, costUnitParts, loadCatalogue, MEASURE_KINDS, validateCatalogue, type CatalogueItem } from './catalogue';

const copy = () => structuredClone(bundled) as unknown as { format: string; items: Record<string, unknown>[] };
const fishRemoval = () => copy().items.find((i) => i.id === 'fishRemoval')!;

describe('validateCatalogue', () => {
  it('validateCatalogue(bundled catalogue) finds no problem', () => {
    expect(validateCatalogue(bundled)).toEqual([]);
  });

  it('the bundled catalogue has the trade measures and a catch-all for each of the six kinds', () => {
    const ids = CATALOGUE.items.map((i) => i.id);
    for (const id of ['loadCut', 'fishRemoval', 'piscivoreStocking', 'sedimentCapping', 'releaseCut', 'flushing', 'warming', 'dredging']) expect(ids).toContain(id);
    for (const kind of MEASURE_KINDS) expect(CATALOGUE.items.some((i) => i.generic && i.kind === kind)).toBe(true);
  });

  it('every measure that acts on the lake itself carries a caution', () => {
    for (const id of ['fishRemoval', 'piscivoreStocking', 'sedimentCapping', 'releaseCut', 'dredging']) {
      expect(CATALOGUE.items.find((i) => i.id === id)!.caution).toMatch(/permit/);
    }
  });

  // [what is wrong, change to a copy of the fish removal item, path, words the message must hold]
  const cases: [string, (i: Record<string, unknown>) => void, string, RegExp][] = [
    ['fraction above 1', (i) => ((i.defaults as Record<string, unknown>).fraction = 1.5), 'defaults.fraction', /fishRemoval.*fraction must be a share between 0 and 1, got 1\.5/],
    ['missing fraction', (i) => delete (i.defaults as Record<string, unknown>).fraction, 'defaults.fraction', /needs defaults\.fraction/],
    ['a default of another kind', (i) => ((i.defaults as Record<string, unknown>).factor = 0.5), 'defaults.factor', /'factor' is not a default of a remove measure/],
    ['unknown kind', (i) => (i.kind = 'delete'), 'kind', /kind must be one of scale, offset, set, remove, add, transfer, got "delete"/],
    ['no targets', (i) => (i.targets = []), 'targets', /targets must be a non-empty list/],
    ['a state measure on a parameter', (i) => (i.targets = [{ of: 'parameter' }]), 'targets[0].of', /acts on a state/],
    ['a parameter field on a state selector', (i) => (i.targets = [{ of: 'state', feedsFlowRole: ['release'] }]), 'targets[0].feedsFlowRole', /applies to parameters and forcings only/],
    ['unknown selector field', (i) => (i.targets = [{ of: 'state', zones: ['biota'] }]), 'targets[0].zones', /unknown selector field 'zones'/],
    ['zone not a list', (i) => (i.targets = [{ of: 'state', zone: 'biota' }]), 'targets[0].zone', /zone must be a non-empty list of words/],
    ['bad dimension', (i) => (i.targets = [{ of: 'state' }]) && (i.kind = 'scale') && (i.targets = [{ of: 'parameter', dimensionOf: 'furlongs per fortnight' }]), 'targets[0].dimensionOf', /dimensionOf must be a unit/],
    ['caution missing', (i) => delete i.caution, 'caution', /caution must be a text or null/],
    ['bad cost unit', (i) => (i.costUnit = 'euro'), 'costUnit', /costUnit must be a three-letter currency code/],
    ['unknown placeholder', (i) => (i.sentence = 'remove {share} of {state} {when}'), 'sentence', /unknown placeholder \{share\}.*allowed: \{state\}, \{fraction\}, \{when\}/],
    ['sentence without its subject', (i) => (i.sentence = 'remove {fraction} {when}'), 'sentence', /must name what the measure acts on with \{state\}/],
    ['bad repeat', (i) => ((i.defaults as Record<string, unknown>).repeat = { count: 0, everyYears: 1 }), 'defaults.repeat.count', /count must be a whole number ≥ 1, got 0/],
    ['bad month-day', (i) => ((i.defaults as Record<string, unknown>).date = { afterYears: 1, monthDay: '02-30' }), 'defaults.date.monthDay', /monthDay must be a day of the year as MM-DD/],
    ['unknown item field', (i) => (i.colour = 'red'), 'colour', /unknown field 'colour'/],
    ['into on a remove item', (i) => (i.into = [{ of: 'state' }]), 'into', /'into' belongs to transfer items only/],
    ['bad id', (i) => (i.id = '2fish'), 'id', /id must be a word/]
  ];
  it.each(cases)('validateCatalogue reports %s at its field, naming the item', (_what, change, field, words) => {
    const cat = copy();
    const index = cat.items.findIndex((i) => i.id === 'fishRemoval');
    const item = fishRemoval();
    change(item);
    cat.items[index] = item;
    const problems = validateCatalogue(cat);
    const at = problems.filter((p) => p.path === `items[${index}].${field}`);
    expect(at.length, JSON.stringify(problems)).toBeGreaterThan(0);
    expect(at.map((p) => p.message).join('\n')).toMatch(words);
  });

  it('validateCatalogue reports an id used twice', () => {
    const cat = copy();
    cat.items.push(fishRemoval());
    const problems = validateCatalogue(cat);
    expect(problems).toEqual([expect.objectContaining({ path: `items[${cat.items.length - 1}].id`, item: 'fishRemoval', message: expect.stringMatching(/used by an earlier item/) })]);
  });

  it('validateCatalogue refuses a wrong format and an empty list', () => {
    expect(validateCatalogue({ format: 'x', items: [] }).map((p) => p.path)).toEqual(['format', 'items']);
    expect(validateCatalogue([])[0].message).toMatch(/must be an object/);
  });

  it('loadCatalogue(bad) throws an error listing each problem with item and field', () => {
    const cat = copy();
    const item = cat.items.find((i) => i.id === 'dredging')!;
    (item.defaults as Record<string, unknown>).fraction = -0.2;
    expect(() => loadCatalogue(cat)).toThrow(CatalogueInvalidError);
    expect(() => loadCatalogue(cat)).toThrow(/items\[\d+\]\.defaults\.fraction: item 'dredging': fraction must be a share between 0 and 1, got -0\.2/);
  });

  it('loadCatalogue(good) returns the items as they are', () => {
    const cat = loadCatalogue(copy());
    expect((cat.items as CatalogueItem[]).length).toBe(bundled.items.length);
  });
});

describe('costUnitParts', () => {
  it.each([
    ['EUR', 'EUR', null],
    ['EUR per campaign', 'EUR', 'campaign'],
    ['SEK per year', 'SEK', 'year']
  ])('costUnitParts(%s)', (text, currency, per) => {
    expect(costUnitParts(text)).toEqual({ currency, per });
  });
});
