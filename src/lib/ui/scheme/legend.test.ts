import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { schemeGraph } from './scheme-graph';
import { legendEntries, legendLayout, LEGEND_METRICS } from './legend';
import { FLOW_WIDTHS } from './flow-widths';
import { textWidth } from './text-metrics';

const demo = JSON.parse(readFileSync(new URL('../../../../static/examples/demo-lake.model.json', import.meta.url), 'utf8'));
const graph = schemeGraph(demo);

describe('legendEntries(graph, masses)', () => {
  it('explains every zone by name and every mark of the scheme', () => {
    const keys = legendEntries(graph, null).map((e) => e.key);
    expect(keys).toEqual([
      'zone:water',
      'zone:biota',
      'zone:plants',
      'zone:sediment',
      'tile',
      'flow',
      'boundary',
      'forcing',
      'parameter',
      'more',
      'readout'
    ]);
    expect(legendEntries(graph, null).find((e) => e.key === 'zone:plants')!.text).toContain('"plants"');
  });

  it('says the arrows have one width before a run, and gives the log scale with masses after one', () => {
    const before = legendEntries(graph, null).find((e) => e.key === 'flow')!;
    expect(before.text).toContain('one width');
    expect(before.glyph).toEqual({ kind: 'flow', widths: [FLOW_WIDTHS.even] });
    const entries = legendEntries(graph, { resuspension: 18700, vegUptake: 0.25 });
    expect(entries.map((e) => e.key)).toContain('spark');
    const after = entries.find((e) => e.key === 'flow')!;
    expect(after.text).toContain('log scale: 18,700, 187 and 1.87 kg P/yr or less');
    expect(after.glyph).toEqual({ kind: 'flow', widths: [FLOW_WIDTHS.max, expect.any(Number), FLOW_WIDTHS.min] });
  });

  it('adds the dashed border only when a compartment is kept out of the inventory', () => {
    expect(legendEntries(graph, null).some((e) => e.key === 'untracked')).toBe(false);
    const g = schemeGraph({ ...demo, states: [...demo.states, { id: 'O2', unit: 'g/m^3', size: 'A', conserved: false }] });
    expect(legendEntries(g, null).some((e) => e.key === 'untracked')).toBe(true);
  });
});

describe('legendLayout(entries, width)', () => {
  const entries = legendEntries(graph, null);
  it.each([358, 900, 1232])('fits %i px with no two entries overlapping and every line inside its column', (width) => {
    const l = legendLayout(entries, width);
    expect(l.items).toHaveLength(entries.length);
    for (const it of l.items) {
      expect(it.x + it.width).toBeLessThanOrEqual(width + 0.01);
      expect(it.y + it.height).toBeLessThanOrEqual(l.height);
      for (const line of it.lines) expect(textWidth(line, LEGEND_METRICS.font)).toBeLessThanOrEqual(it.width - LEGEND_METRICS.glyphWidth);
    }
    for (let i = 0; i < l.items.length; i++)
      for (let j = i + 1; j < l.items.length; j++) {
        const [a, b] = [l.items[i], l.items[j]];
        expect(a.x + a.width <= b.x || b.x + b.width <= a.x || a.y + a.height <= b.y || b.y + b.height <= a.y).toBe(true);
      }
  });
  it('uses more columns on a wider screen, and so less height', () => {
    expect(new Set(legendLayout(entries, 358).items.map((i) => i.x)).size).toBe(1);
    expect(new Set(legendLayout(entries, 1232).items.map((i) => i.x)).size).toBe(4);
    expect(legendLayout(entries, 1232).height).toBeLessThan(legendLayout(entries, 358).height);
  });
});
