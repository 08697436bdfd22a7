/**
 * A linear three-box chain A → B → C against the Bateman equations.
 *
 * Sources:
 * - Bateman, H. (1910) Proc. Cambridge Philos. Soc. 15: 423–427 (citation [M]):
 *   A = A0 e^(−kA t); B = A0 kA/(kB − kA)(e^(−kA t) − e^(−kB t)) (kA ≠ kB),
 *   B = A0 kA t e^(−k t) (kA = kB = k); C = A0 − A − B for a pure sink.
 * - Check values and the open chain (kC = 0.2, C exported): check-values 6.4 [D].
 * - Closure bookkeeping: check-values 7.2 (common practice): lost mass = cumulative export.
 */
import { describe, expect, it } from 'vitest';
import { simulate } from '../../../src/lib/engine';
import { CHAIN_VOLUME, MG_TO_KG, at, chain, relErr, scenario, why } from './fixtures';

const SOLVER = { rtol: 1e-10, atol: 1e-14, maxStep: 0.5, maxSteps: 1_000_000 };
const KG_PER_UNIT = CHAIN_VOLUME * MG_TO_KG; // 1 mg/m^3 over 2.5e6 m^3 = 2.5 kg

/** Bateman (1910) for A0 = 1, B0 = C0 = 0. */
function bateman(kA: number, kB: number, t: number) {
  const A = Math.exp(-kA * t);
  const B = kA === kB ? kA * t * Math.exp(-kA * t) : (kA / (kB - kA)) * (Math.exp(-kA * t) - Math.exp(-kB * t));
  return { A, B, C: 1 - A - B };
}

const table: { kA: number; kB: number; t: number; A: number; B: number; C: number }[] = [
  { kA: 1, kB: 0.5, t: 0.5, A: 0.606530659713, B: 0.344540246718, C: 0.04892909357 },
  { kA: 1, kB: 0.5, t: 1, A: 0.367879441171, B: 0.477302437082, C: 0.154818121746 },
  { kA: 1, kB: 0.5, t: 2, A: 0.135335283237, B: 0.46508831587, C: 0.399576400894 },
  { kA: 1, kB: 0.5, t: 5, A: 0.006737946999, B: 0.15069410325, C: 0.842567949751 },
  { kA: 1, kB: 0.5, t: 10, A: 0.00004539993, B: 0.013385094139, C: 0.986569505932 },
  { kA: 1, kB: 1, t: 1, A: 0.367879441171, B: 0.367879441171, C: 0.264241117657 },
  { kA: 1, kB: 1, t: 2, A: 0.135335283237, B: 0.270670566473, C: 0.59399415029 },
  { kA: 0.3, kB: 2, t: 5, A: 0.223130160148, B: 0.039367898862, C: 0.737501940989 }
];

describe('Bateman (1910) closed forms', () => {
  it.each(table)('reproduce check-values 6.4 at kA = $kA, kB = $kB, t = $t', (row) => {
    const got = bateman(row.kA, row.kB, row.t);
    // The table is printed to 12 decimals.
    expect(Math.abs(got.A - row.A)).toBeLessThan(1e-12);
    expect(Math.abs(got.B - row.B)).toBeLessThan(1e-12);
    expect(Math.abs(got.C - row.C)).toBeLessThan(1e-12);
  });

  it('B peaks at t* = ln(kA/kB)/(kA − kB) with B(t*) = 0.5 for kA = 1, kB = 0.5', () => {
    const tStar = Math.log(2) / 0.5;
    expect(Math.abs(tStar - 1.386294361)).toBeLessThan(1e-9);
    expect(Math.abs(bateman(1, 0.5, tStar).B - 0.5)).toBeLessThan(1e-15);
  });
});

describe('simulate(chain) matches the Bateman solution (rates in 1/d, states in mg/m^3)', () => {
  const pairs = [
    { kA: 1, kB: 0.5 },
    { kA: 1, kB: 1 },
    { kA: 0.3, kB: 2 }
  ];

  it.each(pairs)('kA = $kA /d, kB = $kB /d: A, B, C to 1e-7 relative at the tabulated times', ({ kA, kB }) => {
    const m = chain(kA, kB);
    // Output every 0.5 d over 10 d (20 steps), so t = 0.5 lies on the grid.
    const run = simulate(m, scenario(m, { end: 10, outputStep: 0.5, solver: SOLVER }));
    expect(run.status, why(run)).toBe('ok');
    const rows = table.filter((r) => r.kA === kA && r.kB === kB);
    expect(rows.length).toBeGreaterThan(0);
    for (const row of rows) {
      expect(relErr(at(run, 'A', row.t), row.A)).toBeLessThan(1e-7);
      expect(relErr(at(run, 'B', row.t), row.B)).toBeLessThan(1e-7);
      expect(relErr(at(run, 'C', row.t), row.C)).toBeLessThan(1e-7);
    }
  });

  it.each(pairs)('kA = $kA /d, kB = $kB /d: every grid point agrees with the closed form to 1e-7', ({ kA, kB }) => {
    const m = chain(kA, kB);
    const run = simulate(m, scenario(m, { end: 10, outputStep: 0.5, solver: SOLVER }));
    expect(run.status, why(run)).toBe('ok');
    expect(run.times.length).toBe(21);
    for (let i = 1; i < run.times.length; i++) {
      const want = bateman(kA, kB, run.times[i]);
      expect(relErr(run.series.A[i], want.A)).toBeLessThan(1e-7);
      expect(relErr(run.series.B[i], want.B)).toBeLessThan(1e-7);
      expect(relErr(run.series.C[i], want.C)).toBeLessThan(1e-7);
    }
  });

  it('the closed chain keeps its mass: imported = exported = 0, A + B + C = 1', () => {
    const m = chain(1, 0.5);
    const run = simulate(m, scenario(m, { end: 10, outputStep: 0.5, solver: SOLVER }));
    expect(run.closure.imported).toBe(0);
    expect(run.closure.exported).toBe(0);
    expect(relErr(run.closure.initialMass, KG_PER_UNIT)).toBeLessThan(1e-12);
    expect(relErr(run.closure.finalMass, KG_PER_UNIT)).toBeLessThan(1e-12);
    expect(run.closure.relativeResidual).toBeLessThan(1e-11);
    expect(run.closure.ok).toBe(true);
    for (let i = 0; i < run.times.length; i++) {
      expect(Math.abs(run.series.A[i] + run.series.B[i] + run.series.C[i] - 1)).toBeLessThan(1e-12);
    }
  });
});

describe('simulate(open chain, kC = 0.2 /d) exports what the chain loses', () => {
  // check-values 6.4, open chain (kA = 1, kB = 0.5, kC = 0.2).
  const open = [
    { t: 1, C: 0.143769504668, lost: 0.011048617078 },
    { t: 5, C: 0.50122127411, lost: 0.341346675642 },
    { t: 10, C: 0.259545433325, lost: 0.727024072607 }
  ];

  it.each(open)('at t = $t d: C = $C and closure.exported = lost × 2.5 kg', ({ t, C, lost }) => {
    const m = chain(1, 0.5, 0.2);
    const run = simulate(m, scenario(m, { end: t, outputStep: 0.5, solver: SOLVER }));
    expect(run.status, why(run)).toBe('ok');
    expect(relErr(at(run, 'C', t), C)).toBeLessThan(1e-7);
    // A and B do not see kC: still Bateman.
    const closed = bateman(1, 0.5, t);
    expect(relErr(at(run, 'A', t), closed.A)).toBeLessThan(1e-7);
    expect(relErr(at(run, 'B', t), closed.B)).toBeLessThan(1e-7);
    // Lost = 1 − A − B − C, in kg: the export booked by the closure.
    expect(relErr(run.closure.exported, lost * KG_PER_UNIT)).toBeLessThan(1e-7);
    expect(run.closure.imported).toBe(0);
    expect(relErr(run.closure.initialMass - run.closure.finalMass, run.closure.exported)).toBeLessThan(1e-9);
    expect(run.closure.relativeResidual).toBeLessThan(1e-9);
    expect(run.closure.ok).toBe(true);
    const booked = run.budget.reduce((a, y) => a + (y.flows.lossC ?? NaN), 0);
    expect(relErr(booked, run.closure.exported)).toBeLessThan(1e-12);
  });
});
