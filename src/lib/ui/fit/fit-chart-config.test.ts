import { describe, expect, it } from 'vitest';
import type { ObservationPoint } from '$lib/engine/fit/observations';
import type { Pair } from '$lib/engine/fit/match';
import { OBS_KINDS, describeObservationChart, objectivePathConfig, observationChartConfig, observationWindow, residualChartConfig, residualPoints } from './fit-chart-config';

const pt = (date: string, value: number, censored: ObservationPoint['censored'] = null): ObservationPoint => ({ variable: 'DP', date, value, censored, n: 1, stations: [], lines: [2] });
const points = [pt('2027-03-01', 10), pt('2027-06-01', 3, 'below'), pt('2028-08-01', 12)];
const times = Array.from({ length: 1000 }, (_, i) => i);
const values = times.map((t) => 5 + t / 100);

describe('observationChartConfig(input)', () => {
  const cfg = observationChartConfig({ label: 'Dissolved P', unit: 'mg/m^3', start: '2027-01-01', times, values, points });
  const ds = cfg.data.datasets;
  it('draws the simulated line and one marker set per kind present, censored ones by another shape', () => {
    expect(ds.map((d) => d.label)).toEqual(['Simulated', OBS_KINDS.measured.label, OBS_KINDS.below.label]);
    const measured = ds[1] as unknown as { pointStyle: string; rotation: number; showLine: boolean };
    const below = ds[2] as unknown as { pointStyle: string; rotation: number };
    expect(measured.showLine).toBe(false);
    expect([measured.pointStyle, below.pointStyle]).toEqual(['circle', 'triangle']);
    expect(below.rotation).toBe(180);
    expect(ds[2].data).toEqual([{ x: expect.closeTo(2027.413, 2), y: 3, date: '2027-06-01' }]);
  });
  it('shows the whole years of the observations and cuts the line to them', () => {
    expect(cfg.options?.scales?.x).toMatchObject({ min: 2027, max: 2029 });
    expect(ds[0].data.every((p) => p.x >= 2027 && p.x <= 2029)).toBe(true);
    expect(ds[0].data.length).toBeLessThan(times.length);
  });
  it('adds a dashed second line when given', () => {
    const c = observationChartConfig({ label: 'x', unit: 'u', start: '2027-01-01', times, values, points, second: { label: 'Fitted', start: '2027-01-01', times, values } });
    expect(c.data.datasets[1]).toMatchObject({ label: 'Fitted', borderDash: [6, 3] });
  });
  it('says in words how many values are censored', () => {
    expect(describeObservationChart({ label: 'Dissolved P', unit: 'mg/m^3', start: '2027-01-01', times, values, points })).toContain('3 observations (1 below a detection limit, 0 lower bounds)');
  });
});

describe('observationWindow(points)', () => {
  it('is at least one whole year, and null without points', () => {
    expect(observationWindow([{ date: '2027-05-01' }])).toEqual({ min: 2027, max: 2028 });
    expect(observationWindow([])).toBeNull();
  });
});

describe('residualPoints(pairs) and residualChartConfig', () => {
  const pair = (date: string, obs: number, sim: number, censored: Pair['censored'] = null): Pair => ({ date, month: Number(date.slice(5, 7)), obs, sim, censored });
  const pairs = [pair('2027-03-01', 10, 12), pair('2027-06-01', 3, 2, 'below'), pair('2027-07-01', 3, 5, 'below')];
  it('gives sim − obs, leaves out censored pairs the simulation agrees with and marks counted ones', () => {
    const r = residualPoints(pairs);
    expect(r.points.map((p) => p.y)).toEqual([2]);
    expect(r.censored.map((p) => p.y)).toEqual([2]);
    expect(r.leftOut).toBe(1);
    const cfg = residualChartConfig({ label: 'DP', unit: 'mg/m^3', pairs });
    expect(cfg.data.datasets).toHaveLength(2);
    expect(cfg.options?.scales?.y).toMatchObject({ title: { text: 'residual [mg/m^3]' } });
  });
});

describe('objectivePathConfig(path)', () => {
  it('puts iteration 0 first and one point per entry', () => {
    const cfg = objectivePathConfig([1, 0.6, 0.5]);
    expect(cfg.data.datasets[0].data).toEqual([{ x: 0, y: 1 }, { x: 1, y: 0.6 }, { x: 2, y: 0.5 }]);
    expect(cfg.options?.scales?.x).toMatchObject({ min: 0, max: 2 });
  });
});
