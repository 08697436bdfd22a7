import { describe, expect, it } from 'vitest';
import { bandChartConfig, bandFillPlugin, describeBandChart, withAlpha } from './band-chart-config';
import type { Band } from './ensemble-view';

const band: Band = { days: [0, 365], p05: [1, 2], p25: [2, 3], p50: [3, 4], p75: [4, 5], p95: [5, 6], members: 20 };

describe('bandChartConfig', () => {
  it('makes five line datasets per scenario (bands as dotted edges, the median in its colour and dash) and pairs for shading', () => {
    const c = bandChartConfig({
      series: [
        { label: 'Baseline', colour: '#000000', dash: [], start: '2027-01-01', band },
        { label: 'Option', colour: '#0072B2', dash: [8, 4], start: '2027-01-01', band }
      ],
      unit: 'ug/L',
      target: { value: 25, label: 'Target 25 ug/L' }
    });
    const ds = c.data.datasets;
    expect(ds).toHaveLength(11);
    expect(ds[4]).toMatchObject({ label: 'Baseline: median', borderColor: '#000000', borderDash: [] });
    expect(ds[9]).toMatchObject({ label: 'Option: median', borderColor: '#0072B2', borderDash: [8, 4] });
    expect(ds[5].label).toBe('Option: 5th percentile');
    expect(ds[5].borderWidth).toBe(0);
    expect(c.options?.scales?.x).toMatchObject({ min: 2027, max: 2028 });
    expect(ds[4].data[1]).toEqual({ x: 2028, y: 4, day: 365 });
    expect(ds[10]).toMatchObject({ label: 'Target 25 ug/L' });
    expect(ds[10].data.map((p) => [p.x, p.y])).toEqual([[2027, 25], [2028, 25]]);
    expect(c.options?.animation).toBe(false);
    expect(c.plugins).toHaveLength(1);
  });

  it('shades between each pair of edges with a polygon over the finite points', () => {
    const calls: string[] = [];
    const ctx = new Proxy({} as Record<string, unknown>, {
      get: (_t, k) => (k === 'fillStyle' ? '' : (...a: unknown[]) => calls.push(`${String(k)}(${a.join(',')})`)),
      set: (_t, k, v) => (calls.push(`${String(k)}=${v}`), true)
    });
    const meta = (ys: number[]) => ({ data: ys.map((y, i) => ({ x: i * 10, y })) });
    const metas = [meta([5, 6, NaN, 7]), meta([1, 2, NaN, 3])];
    const chart = { ctx, chartArea: { left: 0, top: 0, right: 100, bottom: 100 }, getDatasetMeta: (i: number) => metas[i] };
    const plugin = bandFillPlugin([[0, 1, 'rgba(0, 0, 0, 0.1)']]);
    (plugin.beforeDatasetsDraw as (c: unknown) => void)(chart);
    // one polygon over points 0–1 (point 3 alone is too short), upper edge forward then lower back
    expect(calls.filter((c) => c === 'fill()')).toHaveLength(1);
    expect(calls).toContain('moveTo(0,1)');
    expect(calls).toContain('lineTo(10,6)');
    expect(calls).toContain('fillStyle=rgba(0, 0, 0, 0.1)');
  });

  it('has colours with alpha and words for readers who cannot see the chart', () => {
    expect(withAlpha('#D55E00', 0.5)).toBe('rgba(213, 94, 0, 0.5)');
    expect(withAlpha('red', 0.5)).toBe('red');
    const words = describeBandChart('Chlorophyll-a', { series: [{ label: 'Baseline', colour: '#000000', dash: [], start: '2027-01-01', band }], unit: 'ug/L' });
    expect(words).toBe('Chlorophyll-a, percentile bands over time. Baseline (20 members) ends with median 4 ug/L, 5–95 % from 2 to 6.');
  });
});
