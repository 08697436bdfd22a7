import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { schemeGraph } from './scheme-graph';
import { elkGraph, frameCaption, layoutScheme, LAYOUT_DEFAULTS, type Box, type Point, type SchemeLayout } from './layout-scheme';

const demo = JSON.parse(readFileSync(new URL('../../../../static/examples/demo-lake.model.json', import.meta.url), 'utf8'));
const graph = schemeGraph(demo);

const overlap = (a: Box, b: Box) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
const inside = (a: Box, b: Box, slack = 0.5) =>
  a.x >= b.x - slack && a.y >= b.y - slack && a.x + a.width <= b.x + b.width + slack && a.y + a.height <= b.y + b.height + slack;
/** Distance from `p` to the border of `b` (0 when on it). */
function toBorder(p: Point, b: Box): number {
  const dx = Math.max(b.x - p.x, 0, p.x - (b.x + b.width));
  const dy = Math.max(b.y - p.y, 0, p.y - (b.y + b.height));
  const outside = Math.hypot(dx, dy);
  if (outside > 0) return outside;
  return Math.min(p.x - b.x, b.x + b.width - p.x, p.y - b.y, b.y + b.height - p.y);
}
const isInside = (p: Point, b: Box) => p.x > b.x && p.x < b.x + b.width && p.y > b.y && p.y < b.y + b.height;

describe.each(['DOWN', 'RIGHT'] as const)('layoutScheme(demo lake, %s)', (direction) => {
  let layout: SchemeLayout;
  const ready = layoutScheme(graph, { direction }).then((l) => (layout = l));

  it('places every compartment inside its zone and every zone inside the frame', async () => {
    await ready;
    expect(layout.tiles.map((t) => t.id).sort()).toEqual(graph.nodes.map((n) => n.id).sort());
    for (const t of layout.tiles) {
      for (const v of [t.x, t.y, t.width, t.height]) expect(Number.isFinite(v)).toBe(true);
      const g = layout.groups.find((x) => x.key === t.zone)!;
      expect(inside(t, g), `${t.id} inside zone ${t.zone}`).toBe(true);
    }
    for (const g of layout.groups) expect(inside(g, layout.frame), `zone ${g.key} inside the frame`).toBe(true);
    expect(inside(layout.frame, { x: 0, y: 0, width: layout.width, height: layout.height })).toBe(true);
  });

  it('lets no two tiles, no two zones and no label and tile overlap', async () => {
    await ready;
    const { tiles, groups, flows } = layout;
    for (let i = 0; i < tiles.length; i++)
      for (let j = i + 1; j < tiles.length; j++) expect(overlap(tiles[i], tiles[j]), `${tiles[i].id} / ${tiles[j].id}`).toBe(false);
    for (let i = 0; i < groups.length; i++)
      for (let j = i + 1; j < groups.length; j++) expect(overlap(groups[i], groups[j]), `${groups[i].key} / ${groups[j].key}`).toBe(false);
    for (const f of flows) for (const t of tiles) expect(overlap(f.label, t), `label ${f.id} / tile ${t.id}`).toBe(false);
    for (let i = 0; i < flows.length; i++)
      for (let j = i + 1; j < flows.length; j++)
        expect(overlap(flows[i].label, flows[j].label), `label ${flows[i].id} / label ${flows[j].id}`).toBe(false);
  });

  it('routes every internal flow from the border of its source tile to the border of its target tile', async () => {
    await ready;
    const tile = new Map(layout.tiles.map((t) => [t.id, t]));
    for (const f of graph.edges) {
      const route = layout.flows.find((x) => x.id === f.id)!;
      expect(route.points.length, f.id).toBeGreaterThanOrEqual(2);
      expect(route.crossing).toBeUndefined();
      expect(toBorder(route.points[0], tile.get(f.from!)!), `${f.id} leaves ${f.from}`).toBeLessThan(3);
      expect(toBorder(route.points.at(-1)!, tile.get(f.to!)!), `${f.id} enters ${f.to}`).toBeLessThan(3);
      // Orthogonal: every segment is horizontal or vertical.
      for (let i = 1; i < route.points.length; i++) {
        const [a, b] = [route.points[i - 1], route.points[i]];
        expect(Math.min(Math.abs(a.x - b.x), Math.abs(a.y - b.y)), f.id).toBeLessThan(0.01);
      }
    }
  });

  it('ends every boundary flow on the frame, with its stub outside the lake', async () => {
    await ready;
    const tile = new Map(layout.tiles.map((t) => [t.id, t]));
    for (const f of graph.boundary) {
      const route = layout.flows.find((x) => x.id === f.id)!;
      expect(route.crossing, f.id).toBeDefined();
      expect(toBorder(route.crossing!, layout.frame), `${f.id} crosses on the frame`).toBeLessThan(1.5);
      const outer = f.kind === 'import' ? route.points[0] : route.points.at(-1)!;
      const inner = f.kind === 'import' ? route.points.at(-1)! : route.points[0];
      expect(isInside(outer, layout.frame), `${f.id} starts or ends outside`).toBe(false);
      expect(Math.hypot(outer.x - route.crossing!.x, outer.y - route.crossing!.y)).toBeCloseTo(LAYOUT_DEFAULTS.stub, 5);
      expect(toBorder(inner, tile.get((f.to ?? f.from)!)!), `${f.id} at its compartment`).toBeLessThan(3);
    }
    // Imports come in on one side, exports leave on the opposite one.
    const side = (p: Point) => (direction === 'DOWN' ? Math.sign(p.y - (layout.frame.y + layout.frame.height / 2)) : Math.sign(p.x - (layout.frame.x + layout.frame.width / 2)));
    const crossings = (kind: string) => layout.flows.filter((x) => x.kind === kind).map((x) => side(x.crossing!));
    expect(new Set(crossings('import'))).toEqual(new Set([-1]));
    expect(new Set(crossings('export'))).toEqual(new Set([1]));
  });

  it('gives each flow its own ports, so parallel flows never share an end point', async () => {
    await ready;
    // SED to VEG has two flows, VEG to DET two, PHY to DET two.
    for (const [a, b] of [
      ['vegUptake', 'vegSprout'],
      ['vegUproot', 'vegDecayW'],
      ['phyMort', 'egestion']
    ]) {
      const [fa, fb] = [a, b].map((id) => layout.flows.find((x) => x.id === id)!);
      expect(fa.points[0]).not.toEqual(fb.points[0]);
      expect(fa.points.at(-1)).not.toEqual(fb.points.at(-1));
    }
  });

  it('puts the caption, with the conserved element and unit, inside the frame', async () => {
    await ready;
    expect(layout.caption.text).toBe('Lake boundary · P in kg');
    expect(isInside(layout.caption, layout.frame)).toBe(true);
  });
});

describe('layoutScheme(small models)', () => {
  it('lays out one compartment without flows', async () => {
    const g = schemeGraph({ id: 'one', states: [{ id: 'X', unit: 'g', zone: 'pond' }], flows: [] });
    const l = await layoutScheme(g);
    expect(l.tiles).toHaveLength(1);
    expect(l.groups.map((x) => x.name)).toEqual(['pond']);
    expect(l.flows).toEqual([]);
    expect(l.caption.text).toBe('Lake boundary');
  });

  it('is the same layout for the same model (seeded)', async () => {
    const [a, b] = await Promise.all([layoutScheme(graph), layoutScheme(graph)]);
    expect(a).toEqual(b);
  });
});

describe('elkGraph(graph)', () => {
  it('nests zones in the lake and states in zones, with a port per flow end', () => {
    const e = elkGraph(graph);
    const lake = e.children![0];
    expect(lake.id).toBe('lake');
    expect(lake.children!.map((z) => z.id)).toEqual(['zone:water', 'zone:biota', 'zone:plants', 'zone:sediment']);
    expect(lake.ports!.map((p) => p.id).sort()).toEqual(graph.boundary.map((f) => `port:${f.id}:${f.kind === 'import' ? 'out' : 'in'}`).sort());
    const sed = lake.children!.find((z) => z.id === 'zone:sediment')!.children!.find((n) => n.id === 'SED')!;
    const flowsAtSed = [...graph.edges, ...graph.boundary].filter((f) => f.from === 'SED' || f.to === 'SED');
    expect(sed.ports).toHaveLength(flowsAtSed.length);
    expect(lake.edges).toHaveLength(32);
  });

  it('captions the frame with the conserved element', () => {
    expect(frameCaption(graph)).toBe('Lake boundary · P in kg');
  });
});
