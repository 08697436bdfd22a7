import { describe, expect, it } from 'vitest';
import { flowLabel, SCHEME_METRICS as M, tileContent } from './scheme-sizes';
import type { Driver, SchemeFlow } from './scheme-graph';
import { textWidth } from './text-metrics';

const flow = (drivers: Driver[], id = 'phyUptake'): SchemeFlow => ({ id, kind: 'internal', from: 'A', to: 'B', rate: 'k*A', drivers });
const p = (id: string, direct = true): Driver => ({ id, kind: 'parameter', direct, via: direct ? [] : ['fT'] });
const f = (id: string): Driver => ({ id, kind: 'forcing', direct: false, via: ['fT'] });

describe('tileContent(state, zone)', () => {
  it('writes the zone in capitals, the id, the label over at most two lines and the unit', () => {
    const c = tileContent({ id: 'BFI', label: 'Benthivorous fish P (1 mg/m^2 is about 1.25 kg/ha fresh weight)', unit: 'mg/m^2', zone: 'biota', conserved: true }, 'biota');
    expect(c.band).toBe('BIOTA');
    expect(c.id).toBe('BFI');
    expect(c.label).toHaveLength(2);
    expect(c.label[1].endsWith('…')).toBe(true);
    expect(c.unit).toBe('in mg/m^2');
    expect(c.width).toBeLessThanOrEqual(M.tileMaxWidth);
    for (const line of c.label) expect(textWidth(line, M.labelFont)).toBeLessThanOrEqual(c.width - 2 * M.tilePad);
    expect(c.height).toBe(M.bandHeight + 4 + M.idLine + 2 * M.labelLine + M.unitLine + M.tilePad);
  });
  it('keeps a small tile at the smallest width and leaves out a missing label', () => {
    const c = tileContent({ id: 'X', unit: 'g', zone: '', conserved: true }, 'no zone');
    expect(c.width).toBe(M.tileMinWidth);
    expect(c.label).toEqual([]);
  });
});

describe('flowLabel(flow, shape)', () => {
  it('gives forcings (with their wave) and directly read parameters a chip, and folds the rest into +N', () => {
    const l = flowLabel(flow([f('T'), p('muPhy'), p('kDIP'), p('thetaPhy', false), p('Tref', false)]));
    expect(l.chips.map((c) => [c.text, c.kind])).toEqual([
      ['T', 'forcing'],
      ['muPhy', 'parameter'],
      ['kDIP', 'parameter'],
      ['+2', 'more']
    ]);
    expect(l.chips.at(-1)!.ids).toEqual(['thetaPhy', 'Tref']);
    expect(l.chips[0].width).toBeGreaterThan(l.chips[1].width - textWidth('muPhy', M.chipFont) + textWidth('T', M.chipFont));
  });

  it('keeps to its rows and width, folding what does not fit into the +N chip', () => {
    const many = Array.from({ length: 12 }, (_, i) => p(`param${i}`));
    for (const shape of [M.labelShape.RIGHT, M.labelShape.DOWN]) {
      const l = flowLabel(flow(many), shape);
      const rows = new Set(l.chips.map((c) => c.y)).size;
      expect(rows).toBeLessThanOrEqual(shape.rows);
      for (const c of l.chips) expect(c.x + c.width).toBeLessThanOrEqual(shape.maxWidth);
      const more = l.chips.find((c) => c.kind === 'more')!;
      const shown = l.chips.filter((c) => c.kind === 'parameter').length;
      expect(shown + more.ids.length).toBe(12);
      expect(more.text).toBe(`+${more.ids.length}`);
      expect(l.width).toBeLessThanOrEqual(shape.maxWidth);
    }
  });

  it('is one line high without drivers, and taller by a row of chips with them', () => {
    const bare = flowLabel(flow([]));
    expect(bare.chips).toEqual([]);
    expect(bare.height).toBe(M.flowLine);
    expect(flowLabel(flow([p('k')])).height).toBe(M.flowLine + 2 + M.chipHeight);
  });

  it('places the chips below the flow id without overlapping each other', () => {
    const l = flowLabel(flow([f('T'), f('I'), p('muVeg'), p('kSEDveg'), p('kVegCrowd'), p('x', false)]), M.labelShape.DOWN);
    for (const c of l.chips) expect(c.y).toBeGreaterThanOrEqual(M.flowLine);
    for (let i = 0; i < l.chips.length; i++)
      for (let j = i + 1; j < l.chips.length; j++) {
        const [a, b] = [l.chips[i], l.chips[j]];
        const apart = a.y !== b.y || a.x + a.width <= b.x || b.x + b.width <= a.x;
        expect(apart).toBe(true);
      }
  });
});
