import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { schemeGraph } from './scheme-graph';
import { buildHref, describeFlow, describeReported, describeState, formatMass, massPhrase, perYear } from './scheme-words';

const demo = JSON.parse(readFileSync(new URL('../../../../static/examples/demo-lake.model.json', import.meta.url), 'utf8'));
const graph = schemeGraph(demo);

describe('buildHref(base, key, kind, id)', () => {
  it('links to the field of the Build editor, `#<kind>-<id>`', () => {
    expect(buildHref('', 'k1', 'flow', 'phyUptake')).toBe('/models/k1/build#flow-phyUptake');
    expect(buildHref('/app', 'a b', 'state', 'DIP')).toBe('/app/models/a%20b/build#state-DIP');
    expect(buildHref('', 'k1', 'derived', 'Chl')).toBe('/models/k1/build#derived-Chl');
  });
});

describe('formatMass(value)', () => {
  it('keeps three significant digits and groups thousands', () => {
    expect(formatMass(18690.6)).toBe('18,700');
    expect(formatMass(0.2506)).toBe('0.251');
    expect(formatMass(0)).toBe('0');
    expect(formatMass(0.00012)).toBe('1.20e-4');
    expect(formatMass(Number.NaN)).toBe('NaN');
  });
  it('writes a unit per year', () => {
    expect(perYear('kg')).toBe('kg/yr');
    expect(perYear('g/m^2')).toBe('(g/m^2)/yr');
    expect(massPhrase(-12.3, 'P', 'kg')).toBe('12.3 kg P/yr on average (net, against the arrow)');
  });
});

describe('describeFlow(flow, graph, mass)', () => {
  const uptake = graph.edges.find((f) => f.id === 'phyUptake')!;
  it('names the ends, the rate with its unit and what it reads', () => {
    const s = describeFlow(uptake, graph);
    expect(s).toContain('Flow phyUptake (Phytoplankton uptake (growth)) from DIP to PHY');
    expect(s).toContain('rate muPhy * fTphy * fLphy * monod(DIP, kDIP) * PHY (mg/m^3 per day)');
    expect(s).toContain('reads muPhy, kDIP');
    expect(s).toContain('T (forcing) via fTphy');
    expect(s).not.toContain('on average');
  });
  it('adds the mean annual mass after a run', () => {
    expect(describeFlow(uptake, graph, 5924.2)).toContain('5,920 kg P/yr on average');
  });
  it('says where a boundary flow comes from or goes', () => {
    expect(describeFlow(graph.boundary.find((f) => f.id === 'loadDIP')!, graph)).toContain('into DIP from outside the lake');
    expect(describeFlow(graph.boundary.find((f) => f.id === 'outDET')!, graph)).toContain('from DET out of the lake');
  });
});

describe('describeState(state, graph) and describeReported(q)', () => {
  it('gives a compartment its zone, unit and flows in words', () => {
    const sed = graph.nodes.find((n) => n.id === 'SEDinert')!;
    expect(describeState(sed, graph)).toBe(
      'Compartment SEDinert (Inert (buried) sediment P), zone sediment, in g/m^2; in: burial; out: none.'
    );
  });
  it('gives a reported quantity its formula, and its value when there is one', () => {
    const secchi = graph.reported.find((q) => q.id === 'Secchi')!;
    expect(describeReported(secchi)).toContain('in m = 1.7 / Kd');
    expect(describeReported(secchi, { value: 0.46, period: "last year's mean" })).toContain("last year's mean: 0.46 m");
  });
});
