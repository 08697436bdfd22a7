/**
 * The run palette is Okabe & Ito's (2008, Color Universal Design), hex values as they
 * publish them (#E69F00 orange, #56B4E9 sky blue, #009E73 bluish green, #F0E442 yellow,
 * #0072B2 blue, #D55E00 vermillion, #CC79A7 reddish purple, #000000 black).
 */
import { describe, expect, it } from 'vitest';
import { OKABE_ITO, RUN_DASHES, runStyles } from './run-colours';

describe('OKABE_ITO', () => {
  it('holds the eight published colours, yellow last', () => {
    expect(new Set(OKABE_ITO.map((c) => c.hex))).toEqual(
      new Set(['#E69F00', '#56B4E9', '#009E73', '#F0E442', '#0072B2', '#D55E00', '#CC79A7', '#000000'])
    );
    expect(OKABE_ITO.at(-1)!.name).toBe('yellow');
  });
});

describe('runStyles(runIds)', () => {
  it('gives each run its own colour and dash in the order of the selection', () => {
    const s = runStyles(['a', 'b', 'c']);
    expect(s.get('a')!.colour).toBe('#0072B2');
    expect(s.get('b')!.colour).toBe('#D55E00');
    expect(s.get('c')!.dash).toEqual(RUN_DASHES[2]);
    expect(new Set([...s.values()].map((x) => x.dash.join(','))).size).toBe(3);
  });
  it('is the same for the same selection (every chart asks again and gets the same)', () => {
    expect([...runStyles(['x', 'y']).entries()]).toEqual([...runStyles(['x', 'y']).entries()]);
  });
  it('takes a duplicate id once', () => {
    const s = runStyles(['a', 'a', 'b']);
    expect(s.size).toBe(2);
    expect(s.get('b')!.index).toBe(1);
  });
  it('draws the baseline black and solid, the others in palette order without black, all dashed', () => {
    const s = runStyles(['a', 'base', 'b'], 'base');
    expect(s.get('base')).toMatchObject({ colour: '#000000', dash: [] });
    expect(s.get('a')!.colour).toBe('#0072B2');
    expect(s.get('b')!.colour).toBe('#D55E00');
    expect(s.get('a')!.dash.length).toBeGreaterThan(0);
    const eight = runStyles(['base', ...Array.from({ length: 7 }, (_, i) => `r${i}`)], 'base');
    expect([...eight.values()].filter((x) => x.colour === '#000000')).toHaveLength(1);
  });
  it('past eight runs, no two share both colour and dash', () => {
    const ids = Array.from({ length: 12 }, (_, i) => `r${i}`);
    const pairs = [...runStyles(ids).values()].map((x) => `${x.colour}|${x.dash.join(',')}`);
    expect(new Set(pairs).size).toBe(12);
  });
});
