import { describe, expect, it } from 'vitest';
import type { TooltipItem } from 'chart.js';
import {
  RUN_PALETTE,
  decimalYear,
  describeSeriesChart,
  formatValue,
  isoDateAt,
  seriesChartConfig,
  summariseSeries,
  yearTick,
  type TimePoint
} from './chart-config';

describe('decimalYear and isoDateAt', () => {
  it.each<[string, number, number]>([
    ['2027-01-01', 0, 2027],
    ['2027-01-01', 365, 2028], // 2027 has 365 days
    ['2028-01-01', 183, 2028.5], // 2028 is a leap year: 366 days
    ['2027-07-01', 184, 2028],
    ['2027-01-01', 7305, 2047] // 20 years with five leap days
  ])('decimalYear(%s, %d) = %d', (start, day, year) => {
    expect(decimalYear(start, day)).toBeCloseTo(year, 12);
  });

  it.each<[string, number, string]>([
    ['2027-01-01', 0, '2027-01-01'],
    ['2027-01-01', 59, '2027-03-01'],
    ['2028-01-01', 59, '2028-02-29'],
    ['2027-01-01', 7305, '2047-01-01'],
    ['2027-01-01', 10.75, '2027-01-11']
  ])('isoDateAt(%s, %d) = %s', (start, day, iso) => {
    expect(isoDateAt(start, day)).toBe(iso);
  });

  it('refuses a start that is not an ISO date, naming it', () => {
    expect(() => decimalYear('1/1/2027', 0)).toThrow(/invalid start: "1\/1\/2027"/);
  });
});

describe('formatValue and yearTick', () => {
  it.each<[number, string]>([
    [12.3456, '12.3'],
    [0.04567, '0.0457'],
    [1500, '1500'],
    [0, '0'],
    [3e-12, '3.00e-12'],
    [2.5e7, '2.50e+7'],
    [Number.NaN, '–']
  ])('formatValue(%d) = %s', (v, s) => {
    expect(formatValue(v)).toBe(s);
  });

  it('yearTick labels whole years and leaves fractions blank', () => {
    expect([2030, 2030.5, '2035', '2035.25'].map(yearTick)).toEqual(['2030', '', '2035', '']);
  });
});

describe('seriesChartConfig', () => {
  const times = [0, 182, 365, 548, 731]; // 2028 is a leap year: day 731 is 2029-01-01
  const input = {
    times,
    start: '2027-01-01',
    series: [
      { label: 'Chlorophyll-a', unit: 'ug/L', values: [2, 30, 3, Number.POSITIVE_INFINITY, 4] },
      { label: 'Chlorophyll-a, half load', unit: 'ug/L', values: new Float64Array([2, 20, 2, 15, 2]) }
    ]
  };

  it('puts calendar years on x, values on y, non-finite values as gaps', () => {
    const config = seriesChartConfig(input);
    const data = config.data.datasets[0].data;
    expect(data.map((p) => p.day)).toEqual(times);
    expect(data[0].x).toBe(2027);
    expect(data[2].x).toBe(2028);
    expect(data[4].x).toBe(2029);
    expect(data.map((p) => p.y)).toEqual([2, 30, 3, Number.NaN, 4]);
    expect(config.data.datasets[1].data.map((p) => p.y)).toEqual([2, 20, 2, 15, 2]);
  });

  it('colours series from RUN_PALETTE in order, from the offset', () => {
    expect(seriesChartConfig(input).data.datasets.map((d) => d.borderColor)).toEqual(RUN_PALETTE.slice(0, 2));
    const shifted = seriesChartConfig({ ...input, paletteOffset: 7 });
    expect(shifted.data.datasets.map((d) => d.borderColor)).toEqual([RUN_PALETTE[7], RUN_PALETTE[0]]);
  });

  it('titles the y axis with the unit as written, spans whole years on x, shows a legend only for several series', () => {
    const config = seriesChartConfig(input);
    const scales = config.options!.scales!;
    expect(scales.y!.title).toMatchObject({ display: true, text: 'ug/L' });
    expect([scales.x!.min, scales.x!.max]).toEqual([2027, 2029]);
    expect(config.options!.plugins!.legend!.display).toBe(true);
    expect(seriesChartConfig({ ...input, series: input.series.slice(0, 1) }).options!.plugins!.legend!.display).toBe(false);
  });

  it('is ready for Chart.js decimation: unparsed {x, y} points, linear x', () => {
    const config = seriesChartConfig(input);
    expect(config.options!.parsing).toBe(false);
    expect(config.options!.scales!.x!.type).toBe('linear');
    expect(config.options!.plugins!.decimation).toMatchObject({ enabled: true, algorithm: 'min-max' });
  });

  it('tooltips give the ISO date and the value with its unit', () => {
    const config = seriesChartConfig(input);
    const callbacks = config.options!.plugins!.tooltip!.callbacks!;
    const raw: TimePoint = { x: 2027.5, y: 30.04, day: 182 };
    const item = { raw, dataset: { label: 'Chlorophyll-a' } } as unknown as TooltipItem<'line'>;
    const title = callbacks.title as unknown as (items: TooltipItem<'line'>[]) => string;
    const label = callbacks.label as unknown as (item: TooltipItem<'line'>) => string;
    expect(title([item])).toBe('2027-07-02');
    expect(label(item)).toBe('Chlorophyll-a: 30 ug/L');
  });

  it('refuses series of different units, naming them', () => {
    expect(() =>
      seriesChartConfig({ ...input, series: [input.series[0], { label: 'TP', unit: 'mg/m^3', values: times }] })
    ).toThrow(/different units \(ug\/L, mg\/m\^3\)/);
  });

  it('refuses a series whose length differs from the times', () => {
    expect(() => seriesChartConfig({ ...input, series: [{ label: 'x', unit: '1', values: [1, 2] }] })).toThrow(
      /2 values for 5 times/
    );
  });

  it('refuses an empty list of series', () => {
    expect(() => seriesChartConfig({ ...input, series: [] })).toThrow(/no series/);
  });
});

describe('summariseSeries and describeSeriesChart', () => {
  it('summariseSeries ignores non-finite values', () => {
    expect(summariseSeries([1, Number.NaN, 3, Number.NEGATIVE_INFINITY, 5])).toEqual({ min: 1, max: 5, mean: 3, count: 3 });
  });

  it('summariseSeries of no finite values is NaN with count 0', () => {
    expect(summariseSeries([Number.NaN])).toEqual({ min: Number.NaN, max: Number.NaN, mean: Number.NaN, count: 0 });
  });

  it('describeSeriesChart names range, mean, unit and period', () => {
    expect(
      describeSeriesChart({ times: [0, 365], start: '2027-01-01', series: [{ label: 'Total P', unit: 'mg/m^3', values: [40, 60] }] })
    ).toBe('Total P from 40 to 60 mg/m^3, mean 50 mg/m^3, 2027-01-01 to 2028-01-01.');
  });
});
