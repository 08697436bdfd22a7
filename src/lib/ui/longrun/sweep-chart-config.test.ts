import { describe, expect, it } from 'vitest';
import type { SweepDoc } from '$lib/engine/longrun/sweep';
import { BAND_FILL, BRANCH_STYLES, SWEEP_BANDS_ID, sweepBandsPlugin, sweepChartConfig, type SweepPoint } from './sweep-chart-config';
import { endStateOf, progressWords, refinedRanges, shortLabel, sweepRows, sweepSummary } from './sweep-words';

const doc = {
  format: 'lakeledger.sweep/1',
  kind: 'parameter',
  values: [100, 150, 200, 250, 300],
  low: [10, 12, null, 15, 80],
  high: [10, 60, 70, 75, 80],
  bistable: [[150, 250]],
  switchPoints: [131.2, 271.9],
  notSettled: [{ value: 200, start: 'low', message: 'did not settle' }]
} as unknown as SweepDoc;

const input = { doc, xTitle: 'Pin [mg/m^3]', yTitle: 'Chl [ug/L]' };

describe('sweepChartConfig(input)', () => {
  it('draws one line per start, told apart by colour, marker shape and dash', () => {
    const c = sweepChartConfig(input);
    const [clear, turbid] = c.data.datasets;
    expect(clear.label).toBe('From the clear start');
    expect(turbid.label).toBe('From the turbid start');
    expect(clear.borderColor).not.toBe(turbid.borderColor);
    expect(clear.pointStyle).not.toBe(turbid.pointStyle);
    expect(clear.borderDash).toEqual([]);
    expect((turbid.borderDash as number[]).length).toBeGreaterThan(0);
    expect(c.options?.plugins?.legend?.labels?.usePointStyle).toBe(true);
    expect([clear.borderColor, turbid.borderColor]).toEqual([BRANCH_STYLES.clear.colour, BRANCH_STYLES.turbid.colour]);
  });

  it('puts each swept value on x and a start that did not settle as a gap (null), never zero', () => {
    const c = sweepChartConfig(input);
    expect(c.data.datasets[0].data).toEqual<SweepPoint[]>([
      { x: 100, y: 10 },
      { x: 150, y: 12 },
      { x: 200, y: null },
      { x: 250, y: 15 },
      { x: 300, y: 80 }
    ]);
    expect(c.data.datasets[0].spanGaps).toBe(false);
    expect(c.options?.scales?.x).toMatchObject({ type: 'linear', min: 100, max: 300, title: { text: 'Pin [mg/m^3]' } });
  });

  it('hands the bistable ranges and switch points to its band plugin', () => {
    const c = sweepChartConfig(input);
    expect(c.plugins).toContain(sweepBandsPlugin);
    // shaded out to the switch points that narrow the range between the steps
    expect((c.options?.plugins as Record<string, unknown>)[SWEEP_BANDS_ID]).toEqual({ ranges: [[131.2, 271.9]], switchPoints: [131.2, 271.9] });
  });

  it('refuses a sweep whose results do not match its values', () => {
    expect(() => sweepChartConfig({ ...input, doc: { ...doc, low: [1] } })).toThrow(/5 values but 1 and 5/);
  });

  it('the band plugin shades each range across the chart area and labels each switch point', () => {
    const rects: number[][] = [];
    const texts: string[] = [];
    const fills: string[] = [];
    const ctx = {
      save() {},
      restore() {},
      beginPath() {},
      moveTo() {},
      lineTo() {},
      stroke() {},
      setLineDash() {},
      set fillStyle(v: string) { fills.push(v); },
      fillRect: (...a: number[]) => rects.push(a),
      fillText: (t: string) => texts.push(t)
    };
    const chart = {
      ctx,
      chartArea: { left: 0, right: 200, top: 0, bottom: 100 },
      scales: { x: { getPixelForValue: (v: number) => v - 100 } },
      options: { plugins: { [SWEEP_BANDS_ID]: { ranges: [[150, 250]], switchPoints: [131.2, 271.9] } } }
    };
    (sweepBandsPlugin.beforeDatasetsDraw as unknown as (c: unknown) => void)(chart);
    expect(rects).toEqual([[47, 0, 106, 100]]);
    // the plugin draws what it is given; the config gives it the refined ranges (test above)
    expect(fills[0]).toBe(BAND_FILL);
    expect(texts).toEqual(['S1 131', 'S2 272']);
  });
});

describe('sweep words', () => {
  it('refinedRanges(doc) widens a range to the switch points between it and its neighbours, and only those', () => {
    expect(refinedRanges(doc)).toEqual([[131.2, 271.9]]);
    // a range at the sweep's end has no neighbour there; a switch point beyond a neighbour is not taken
    expect(refinedRanges({ values: [1, 2, 3, 4], bistable: [[3, 4]], switchPoints: [1.5, 2.6] })).toEqual([[2.6, 4]]);
    expect(refinedRanges({ values: [1, 2, 3, 4], bistable: [[2, 2]], switchPoints: [] })).toEqual([[2, 2]]);
  });

  it('shortLabel(label) drops a trailing remark in brackets and lower-cases the first letter unless an acronym', () => {
    expect(shortLabel('Total P concentration of the inflow (the external load is Q * Pin, about 1460 kg P/yr)')).toBe('total P concentration of the inflow');
    expect(shortLabel('TP in the water')).toBe('TP in the water');
    expect(shortLabel('(only a remark)')).toBe('(only a remark)');
  });

  it('sweepRows(doc) marks values inside a bistable range as two states and names a start that did not settle', () => {
    expect(sweepRows(doc).map((r) => r.verdict)).toEqual(['one state', 'two states', 'did not settle from the clear start', 'two states', 'one state']);
  });

  it('sweepSummary(doc) gives the range and every switch point with its number and unit', () => {
    const text = sweepSummary(doc, 'inflow total P (Pin)', 'mg/m^3').join(' ');
    expect(text).toContain('From 150 mg/m^3 to 250 mg/m^3 of inflow total P (Pin)');
    expect(text).toContain('S1 at 131 mg/m^3, S2 at 272 mg/m^3');
    expect(text).toContain('200 mg/m^3 from the clear start');
    expect(text).toContain('from about 131 mg/m^3 to 272 mg/m^3');
  });

  it('sweepSummary says so when no range holds two states, and a forcing is written as a factor', () => {
    const one = { ...doc, kind: 'forcing', bistable: [], switchPoints: [], notSettled: [] } as unknown as SweepDoc;
    const text = sweepSummary(one, 'inflow (Q)', '1').join(' ');
    expect(text).toMatch(/no range with two states/);
    expect(text).toContain('from × 100 to × 300');
  });

  it('endStateOf(series) takes each state\'s last finite value; progressWords counts long runs', () => {
    expect(endStateOf({ A: [1, 2, 3], B: [4, Number.NaN], C: [9] }, ['A', 'B'])).toEqual({ A: 3 });
    expect(progressWords(3, 8)).toBe('3 of 8 long runs done (38 %)');
  });
});

import demo from '../../../../static/examples/demo-lake.model.json';
import type { ModelDoc } from '$lib/engine/document/types';
import { defaultIndicator, defaultRange, defaultTarget, indicatorChoices, targetChoices } from './sweep-setup';

describe('sweep setup', () => {
  const model = demo as unknown as ModelDoc;
  it('defaultTarget(model) is the first parameter an external-load rate names (the demo lake: Pin)', () => {
    expect(defaultTarget(model)).toBe('Pin');
    const noLoad = { ...model, flows: model.flows.map((f) => ({ ...f, role: undefined })) };
    expect(defaultTarget(noLoad)).toBe(targetChoices(model)[0].id);
  });
  it('defaultIndicator(model) is the series with the role chlorophyll; indicators list reported quantities, then states', () => {
    expect(defaultIndicator(model)).toBe('Chl');
    const c = indicatorChoices(model);
    expect(c.some((x) => x.id === 'flush')).toBe(false);
    expect(c.at(-1)).toMatchObject({ id: 'SEDinert', kind: 'state' });
  });
  it('targets are parameters (sizes left out) and forcings; default range is half to one and a half', () => {
    const t = targetChoices(model);
    expect(t.filter((x) => x.kind === 'forcing').map((x) => x.id)).toEqual(['T', 'I', 'Q']);
    expect(defaultRange(t.find((x) => x.id === 'Pin'))).toEqual({ from: 125, to: 375 });
    expect(defaultRange(t.find((x) => x.id === 'Q'))).toEqual({ from: 0.5, to: 1.5 });
  });
});
