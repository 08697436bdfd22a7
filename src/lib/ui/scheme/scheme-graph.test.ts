import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { drawnFlows, NO_ZONE, schemeGraph } from './scheme-graph';

const demo = JSON.parse(readFileSync(new URL('../../../../static/examples/demo-lake.model.json', import.meta.url), 'utf8'));

/** A small valid-looking model; `edit` changes a copy. */
function tiny(edit: (m: any) => void = () => {}) {
  const m: any = {
    format: 'lakeledger.model/1',
    id: 'tiny',
    conserved: { element: 'P', unit: 'kg' },
    parameters: [
      { id: 'V', value: 1, unit: 'm^3' },
      { id: 'k', value: 0.1, unit: '1/d' },
      { id: 'theta', value: 1.07, unit: '1' }
    ],
    forcings: [{ id: 'T', unit: 'degC', expression: '10' }],
    states: [
      { id: 'A', unit: 'mg/m^3', initial: 1, size: 'V', zone: 'water' },
      { id: 'B', unit: 'mg/m^3', initial: 1, size: 'V', zone: 'Sediment' }
    ],
    derived: [{ id: 'fT', expression: 'theta^(T - 20)', unit: '1' }],
    flows: [
      { id: 'in', to: 'A', rate: 'k * A' },
      { id: 'ab', from: 'A', to: 'B', rate: 'k * fT * A' },
      { id: 'out', from: 'B', rate: 'k * B' }
    ]
  };
  edit(m);
  return m;
}

describe('schemeGraph(demo lake)', () => {
  const g = schemeGraph(demo);

  it('has the nine compartments grouped by their zones, in document order', () => {
    expect(g.nodes.map((n) => n.id)).toEqual(['DIP', 'PHY', 'ZOO', 'DET', 'BFI', 'PFI', 'VEG', 'SED', 'SEDinert']);
    expect(g.zones.map((z) => [z.name, z.states])).toEqual([
      ['water', ['DIP', 'PHY', 'ZOO', 'DET']],
      ['biota', ['BFI', 'PFI']],
      ['plants', ['VEG']],
      ['sediment', ['SED', 'SEDinert']]
    ]);
    expect(g.omitted).toEqual([]);
  });

  it('splits the 32 flows into 26 internal ones and 2 imports and 4 exports across the frame', () => {
    expect(g.edges).toHaveLength(26);
    expect(g.boundary.filter((f) => f.kind === 'import').map((f) => [f.id, f.to])).toEqual([
      ['loadDIP', 'DIP'],
      ['loadDET', 'DET']
    ]);
    expect(g.boundary.filter((f) => f.kind === 'export').map((f) => f.id)).toEqual(['outDIP', 'outPHY', 'outZOO', 'outDET']);
    expect(drawnFlows(g)).toHaveLength(32);
  });

  it('lists what drives a flow, through derived quantities too, forcings first', () => {
    const uptake = g.edges.find((f) => f.id === 'phyUptake')!;
    const by = Object.fromEntries(uptake.drivers.map((d) => [d.id, d]));
    expect(uptake.drivers.slice(0, 2).map((d) => [d.id, d.kind])).toEqual([
      ['T', 'forcing'],
      ['I', 'forcing']
    ]);
    expect(by.muPhy).toMatchObject({ kind: 'parameter', direct: true, via: [] });
    expect(by.kDIP).toMatchObject({ kind: 'parameter', direct: true });
    expect(by.thetaPhy).toMatchObject({ direct: false, via: ['fTphy'] });
    // Kd reads chlorophyll, which reads chlP: two derived quantities deep.
    expect(by.chlP).toMatchObject({ direct: false, via: ['Chl'] });
    // States and `t` are not drivers.
    expect(by.DIP).toBeUndefined();
    expect(by.PHY).toBeUndefined();
  });

  it('reads an outflow as driven by the inflow forcing through the flushing rate', () => {
    const out = g.boundary.find((f) => f.id === 'outDIP')!;
    expect(out.drivers.map((d) => `${d.id}:${d.kind}:${d.direct}`)).toEqual(['Q:forcing:false', 'A:parameter:false', 'zMean:parameter:false']);
  });

  it('takes the reported derived quantities for the readout strip, with their formulas', () => {
    expect(g.reported.map((q) => q.id)).toEqual(['Chl', 'TP', 'DP', 'tripton', 'Kd', 'Secchi', 'Ibot', 'fLveg', 'resusp']);
    expect(g.reported.find((q) => q.id === 'Secchi')).toMatchObject({ unit: 'm', expression: '1.7 / Kd', role: 'secchi' });
  });

  it('names the conserved element and unit for the frame', () => {
    expect(g.conserved).toEqual({ element: 'P', unit: 'kg' });
    expect(g.modelId).toBe('demo_lake');
  });
});

describe('schemeGraph(draft with errors) draws what it can', () => {
  it('leaves out a flow to an unknown state and says why', () => {
    const g = schemeGraph(tiny((m) => (m.flows[1].to = 'Bx')));
    expect(g.edges.map((f) => f.id)).toEqual([]);
    expect(g.omitted).toEqual([{ kind: 'flow', id: 'ab', reason: '`to` names no state (Bx)' }]);
  });

  it('leaves out flows without ends, self flows, duplicate ids and states without id', () => {
    const g = schemeGraph(
      tiny((m) => {
        m.flows.push({ id: 'none', rate: '1' }, { id: 'self', from: 'A', to: 'A', rate: '1' }, { id: 'ab', from: 'B', to: 'A', rate: '1' });
        m.states.push({ unit: 'g' }, { id: 'A', unit: 'g' });
      })
    );
    expect(g.nodes.map((n) => n.id)).toEqual(['A', 'B']);
    expect(g.omitted.map((o) => `${o.kind} ${o.id}`)).toEqual(['state states[2]', 'state A', 'flow none', 'flow self', 'flow ab']);
  });

  it('keeps a flow whose rate does not parse, without drivers, and says why', () => {
    const g = schemeGraph(tiny((m) => (m.flows[1].rate = 'k A')));
    const ab = g.edges.find((f) => f.id === 'ab')!;
    expect(ab.drivers).toEqual([]);
    expect(ab.rateProblem).toMatch(/\*/);
  });

  it('survives a cycle among derived quantities', () => {
    const g = schemeGraph(
      tiny((m) => {
        m.derived = [
          { id: 'p', expression: 'q * k', unit: '1' },
          { id: 'q', expression: 'p * theta', unit: '1' }
        ];
        m.flows[1].rate = 'p * A';
      })
    );
    expect(g.edges[0].drivers.map((d) => d.id).sort()).toEqual(['k', 'theta']);
  });

  it('merges zone words that differ in case, keeps the first spelling, and groups states without a zone', () => {
    const g = schemeGraph(
      tiny((m) => {
        m.states.push({ id: 'C', unit: 'g/m^2', size: 'V', zone: 'sediment' }, { id: 'D', unit: 'g', size: 'V' });
      })
    );
    expect(g.zones.map((z) => [z.key, z.name, z.states])).toEqual([
      ['water', 'water', ['A']],
      ['sediment', 'Sediment', ['B', 'C']],
      [NO_ZONE, 'no zone', ['D']]
    ]);
  });

  it('reads ids such as `constructor` as plain ids', () => {
    const g = schemeGraph(
      tiny((m) => {
        m.parameters[1].id = 'constructor';
        m.flows[1].rate = 'constructor * A';
      })
    );
    expect(g.edges[0].drivers.map((d) => d.id)).toEqual(['constructor']);
  });

  it('makes an empty graph of something that is not a model', () => {
    for (const doc of [null, 42, 'text', [], {}]) {
      const g = schemeGraph(doc);
      expect(g.nodes).toEqual([]);
      expect(g.edges).toEqual([]);
      expect(g.conserved).toBeNull();
    }
  });
});
