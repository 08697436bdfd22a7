/**
 * Comparison chart configurations, checked without a DOM against values worked out by hand
 * in each test (min–max decimation as in common plotting practice: each bucket keeps its
 * least and greatest value).
 */
import { describe, expect, it } from 'vitest';
import {
  budgetBarConfig,
  clampRange,
  compareChartConfig,
  decimalYears,
  formatYearMonth,
  fullRange,
  minMaxDecimate,
  rangeWords,
  zoomRange
} from './compare-chart-config';
import type { RoleBudget } from '$lib/engine/compare/budget-by-role';

describe('minMaxDecimate(xs, ys, days, from, to, buckets)', () => {
  const xs = Array.from({ length: 100 }, (_, i) => i);
  it('keeps every point when there are few (at most two per bucket)', () => {
    expect(minMaxDecimate(xs.slice(0, 10), xs.slice(0, 10), xs.slice(0, 10), 0, 9, 5)).toHaveLength(10);
  });
  it('keeps the least and the greatest of each bucket in x order, so a one-day peak survives', () => {
    const ys = xs.map((i) => (i === 37 ? 1000 : i % 2)); // 0,1,0,1,… with a bloom on day 37
    const out = minMaxDecimate(xs, ys, xs, 0, 99, 10); // buckets of 9.9: [0,9.9), [9.9,19.8), …
    expect(out.length).toBeLessThanOrEqual(20);
    expect(out.some((p) => p.y === 1000 && p.x === 37)).toBe(true);
    // bucket 0 holds x 0..9: min 0 at x 0, max 1 at x 1
    expect(out.slice(0, 2).map((p) => [p.x, p.y])).toEqual([
      [0, 0],
      [1, 1]
    ]);
    for (let i = 1; i < out.length; i++) expect(out[i].x).toBeGreaterThan(out[i - 1].x);
  });
  it('cuts to the window with one point beyond each edge', () => {
    const out = minMaxDecimate(xs, xs, xs, 20.5, 30.5, 100);
    expect(out[0].x).toBe(20);
    expect(out.at(-1)!.x).toBe(31);
  });
  it('keeps a gap (NaN) inside a bucket', () => {
    const ys = xs.map((i) => (i >= 50 && i < 60 ? NaN : 1));
    const out = minMaxDecimate(xs, ys, xs, 0, 99, 10);
    expect(out.some((p) => Number.isNaN(p.y))).toBe(true);
  });
});

describe('zoomRange / clampRange / fullRange', () => {
  const full = { from: 2027, to: 2047 };
  it('zoom in halves the window about its centre; out doubles it within the whole', () => {
    expect(zoomRange(full, full, 'in')).toEqual({ from: 2032, to: 2042 });
    expect(zoomRange({ from: 2032, to: 2042 }, full, 'out')).toEqual(full);
  });
  it('earlier and later move by half a window and stop at the ends', () => {
    expect(zoomRange({ from: 2032, to: 2042 }, full, 'later')).toEqual({ from: 2037, to: 2047 });
    expect(zoomRange({ from: 2037, to: 2047 }, full, 'later')).toEqual({ from: 2037, to: 2047 });
    expect(zoomRange({ from: 2028, to: 2038 }, full, 'earlier')).toEqual({ from: 2027, to: 2037 });
  });
  it('never goes below one month, and puts reversed ends right', () => {
    const r = clampRange({ from: 2030.5, to: 2030.5 }, full);
    expect(r.to - r.from).toBeCloseTo(1 / 12, 12);
    expect(clampRange({ from: 2040, to: 2030 }, full)).toEqual({ from: 2030, to: 2040 });
  });
  it('fullRange spans the runs to whole years', () => {
    expect(fullRange([{ start: '2027-01-01', times: [0, 7305] }])).toEqual(full);
    expect(fullRange([{ start: '2027-03-01', times: [0, 100] }])).toEqual({ from: 2027, to: 2028 });
  });
  it('rangeWords and formatYearMonth say the window in dates', () => {
    expect(rangeWords({ from: 2031, to: 2032.5 })).toBe('2031-01-01 to 2032-07-02');
    expect(formatYearMonth(2031.5)).toBe('2031-07');
    expect(formatYearMonth(2031.55)).toBe('');
  });
});

describe('compareChartConfig(input)', () => {
  const times = Array.from({ length: 7306 }, (_, i) => i); // 2027-01-01 .. 2047-01-01
  const mk = (id: string, colour: string) => ({
    runId: id,
    label: id,
    colour,
    dash: [8, 4],
    start: '2027-01-01',
    times,
    values: times.map((t) => Math.sin(t / 58) + 2),
    xs: decimalYears('2027-01-01', times)
  });
  const series = Array.from({ length: 8 }, (_, i) => mk(`run${i}`, `#00000${i}`));

  it('draws static, unparsed {x, y} points, one dataset per run plus one per target line', () => {
    const c = compareChartConfig({ series, unit: 'ug/L', targets: [{ value: 25, label: 'Target 25 ug/L' }] });
    expect(c.options!.animation).toBe(false);
    expect(c.options!.parsing).toBe(false);
    expect(c.data.datasets).toHaveLength(9);
    expect(c.data.datasets[8].label).toBe('Target 25 ug/L');
    expect(c.data.datasets[8].data.map((p) => p.y)).toEqual([25, 25]);
    expect(c.data.datasets[3].borderColor).toBe('#000003');
    expect(c.data.datasets[3].borderDash).toEqual([8, 4]);
  });

  it('reduces 8 runs × 7,306 days to at most two points per bucket each', () => {
    const c = compareChartConfig({ series, unit: 'ug/L', buckets: 400 });
    for (const d of c.data.datasets) expect(d.data.length).toBeLessThanOrEqual(2 * 400 + 2);
  });

  it('sets the x axis to the zoom window and keeps only its points', () => {
    const c = compareChartConfig({ series, unit: 'ug/L', range: { from: 2030, to: 2031 } });
    const x = c.options!.scales!.x as { min: number; max: number };
    expect([x.min, x.max]).toEqual([2030, 2031]);
    const d = c.data.datasets[0].data;
    expect(d.length).toBeLessThanOrEqual(367);
    expect(d[0].x).toBeLessThan(2030);
    expect(d[1].x).toBeGreaterThanOrEqual(2030);
  });
});

describe('budgetBarConfig(budget)', () => {
  const line = (key: string, crossing: 'import' | 'export' | 'internal', perYear: number[], derived = false) => ({
    key,
    label: key,
    group: 'imports' as const,
    crossing,
    role: null,
    flows: ['f'],
    measures: [],
    derived,
    perYear,
    total: perYear.reduce((a, b) => a + b, 0)
  });
  const budget: RoleBudget = {
    unit: 'kg',
    element: 'P',
    years: [
      { year: 2027, from: '2027-01-01', to: '2028-01-01' },
      { year: 2028, from: '2028-01-01', to: '2029-01-01' }
    ],
    lines: [
      line('import:externalLoad', 'import', [100, 90]),
      line('export:outflow', 'export', [60, 50]),
      line('sediment:sedimentation', 'internal', [55, 50]),
      line('sediment:netSedimentation', 'internal', [45, 40], true),
      line('sediment:release', 'internal', [7, 6]),
      line('internal:uptake', 'internal', [300, 280])
    ],
    notBooked: [],
    imported: [100, 90],
    exported: [60, 50],
    storageChange: [40, 40],
    residual: [0, 0],
    totals: { imported: 190, exported: 110, storageChange: 80, residual: 0 }
  };
  it('stacks imports up and exports down at the boundary, release up and net sedimentation down at the sediment; gross and internal lines stay out', () => {
    const c = budgetBarConfig(budget);
    expect(c.data.labels).toEqual(['2027', '2028']);
    const by = Object.fromEntries(c.data.datasets.map((d) => [d.label!.split(' (')[0], d]));
    expect(Object.keys(by)).toEqual(['import:externalLoad', 'export:outflow', 'sediment:netSedimentation', 'sediment:release']);
    expect(by['import:externalLoad'].data).toEqual([100, 90]);
    expect(by['export:outflow'].data).toEqual([-60, -50]);
    expect(by['export:outflow'].stack).toBe('boundary');
    expect(by['sediment:netSedimentation'].data).toEqual([-45, -40]);
    expect(by['sediment:release'].stack).toBe('sediment');
    expect(c.options!.animation).toBe(false);
  });
});
