/**
 * `fit` on the command line, called directly with an in-memory Io: the lakeledger.fit/1
 * fields, exit codes 0, 1 and 2, and the shipped demo observations read without a problem.
 * The small lake (test/engine/fit/fixtures.ts) has the hand-solved P(t) = Lin/k + (P0 − Lin/k)e^(−kt).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { runFitCommand } from '../../src/cli/fit';
import type { Io } from '../../src/cli/main';
import { smallLake, twoYears, pExact, isoDay } from '../engine/fit/fixtures';

function memoryIo(files: Record<string, string>) {
  const out: string[] = [];
  const err: string[] = [];
  const written: Record<string, string> = {};
  const io: Io = {
    out: (t) => out.push(t),
    err: (t) => err.push(t),
    readFile: (p) => {
      if (!(p in files)) throw Object.assign(new Error('no such file'), { code: 'ENOENT' });
      return files[p];
    },
    writeFile: (p, t) => (written[p] = t),
    now: () => new Date('2031-06-01T00:00:00Z'),
    clock: () => 0
  };
  return { io, out, err, written };
}

// observations from the hand-solved P(t) at Lin = 0.6, k = 0.005 (not from the engine)
const csv = ['date,variable,value,unit', ...Array.from({ length: 24 }, (_, i) => 15 + 30 * i).map((d) => `${isoDay(d)},P,${pExact(d, 0.6, 0.005)},mg/m^3`)].join('\n');
const files = { 'lake.json': JSON.stringify(smallLake()), 'two.json': JSON.stringify(twoYears()), 'obs.csv': csv };

describe('lakeledger fit', () => {
  it('fits Lin and k and writes lakeledger.fit/1 (exit 0)', () => {
    const { io, written, err } = memoryIo(files);
    const code = runFitCommand(['lake.json', 'obs.csv', '--params', 'Lin,k', '--scenario', 'two.json', '--out', 'fit.json'], io);
    expect(code, err.join('\n')).toBe(0);
    const doc = JSON.parse(written['fit.json']);
    expect(doc.format).toBe('lakeledger.fit/1');
    expect(Object.keys(doc.params)).toEqual(['Lin', 'k']);
    // the engine's solution agrees with the hand-solved one to the solver's tolerance
    expect(doc.params.Lin).toBeCloseTo(0.6, 3);
    expect(doc.params.k).toBeCloseTo(0.005, 5);
    expect(doc.objective.after).toBeLessThan(1e-4 * doc.objective.before);
    expect(doc.statistics.P.n).toBe(24);
    expect(doc.statistics.P.nse).toBeGreaterThan(0.9999);
    expect(doc.statistics.P.rmse).toBeLessThan(0.05);
    expect(doc.statistics.P.growing.pairs + doc.statistics.P.rest.pairs).toBe(24);
    expect(err.at(-1)).toMatch(/^ok: fitted Lin, k/);
  });

  it('without --scenario runs from the time origin to the last observation', () => {
    const { io, out } = memoryIo(files);
    expect(runFitCommand(['lake.json', 'obs.csv', '--params', 'k', '--max-iterations', '3'], io)).toBe(0);
    const doc = JSON.parse(out.join(''));
    expect(doc.period).toEqual({ start: '2027-01-01', end: isoDay(15 + 30 * 23) });
  });

  const refused: [string, string[], RegExp][] = [
    ['an unknown parameter', ['lake.json', 'obs.csv', '--params', 'k,kX'], /unknown parameter 'kX'.*\[unknown_parameter\]/],
    ['a parameter without a range', ['lake.json', 'obs.csv', '--params', 'yChl'], /'yChl' has no range.*\[parameter_without_range\]/],
    ['an unreadable file', ['lake.json', 'missing.csv', '--params', 'k'], /missing\.csv: cannot read the file \(no such file\)/],
    ['no --params', ['lake.json', 'obs.csv'], /fit needs --params/],
    ['an unknown option', ['lake.json', 'obs.csv', '--params', 'k', '--fast'], /unknown option '--fast'/]
  ];
  for (const [what, args, message] of refused) {
    it(`refuses ${what} (exit 2)`, () => {
      const { io, err } = memoryIo(files);
      expect(runFitCommand(args, io)).toBe(2);
      expect(err.join('\n')).toMatch(message);
    });
  }

  it('refuses an unknown variable, naming it and its line (exit 2)', () => {
    const { io, err } = memoryIo({ ...files, 'bad.csv': `${csv}\n2027-03-01,Phos,4,mg/m^3` });
    expect(runFitCommand(['lake.json', 'bad.csv', '--params', 'k'], io)).toBe(2);
    expect(err.join('\n')).toMatch(/bad\.csv: line 26: unknown variable 'Phos'.*\[unknown_variable\]/);
  });

  it('a row without a value (NA) is a warning naming its line, left out; the fit goes on and writes intervals (exit 0)', () => {
    const { io, err, out } = memoryIo({ ...files, 'na.csv': `${csv}\n2027-03-01,P,NA,mg/m^3` });
    expect(runFitCommand(['lake.json', 'na.csv', '--params', 'Lin,k', '--scenario', 'two.json'], io), err.join('\n')).toBe(0);
    expect(err.join('\n')).toMatch(/warning: na\.csv: line 26: .*left out \[missing_value\]/);
    const doc = JSON.parse(out.join(''));
    expect(doc.statistics.P.n).toBe(24);
    // exact data: the intervals are narrow and hold the fitted values
    expect(doc.intervals.k.bounded).toBe(true);
    expect(doc.intervals.k.low).toBeLessThanOrEqual(doc.params.k);
    expect(doc.intervals.k.high).toBeGreaterThanOrEqual(doc.params.k);
    expect(doc.intervals.k.high - doc.intervals.k.low).toBeLessThan(1e-4);
  });

  it('exit 1 when the fit fails (the run at the starting values cannot finish)', () => {
    const sc = { ...twoYears(), solver: { method: 'odex', maxSteps: 3 } };
    const { io, err } = memoryIo({ ...files, 'tight.json': JSON.stringify(sc) });
    expect(runFitCommand(['lake.json', 'obs.csv', '--params', 'k', '--scenario', 'tight.json'], io)).toBe(1);
    expect(err.join('\n')).toMatch(/error: the fit failed/);
  });

  it('reads the shipped demo observations and fits one parameter of the demo lake', () => {
    const demo = {
      'model.json': readFileSync('static/examples/demo-lake.model.json', 'utf8'),
      'obs.csv': readFileSync('static/examples/demo-lake.observations.csv', 'utf8')
    };
    const { io, out, err } = memoryIo(demo);
    const code = runFitCommand(['model.json', 'obs.csv', '--params', 'chlP', '--max-iterations', '4'], io);
    expect(code, err.join('\n')).toBe(0);
    const doc = JSON.parse(out.join(''));
    expect(Object.keys(doc.statistics).sort()).toEqual(['Chl', 'DP', 'Secchi', 'TP']);
    expect(doc.objective.after).toBeLessThan(doc.objective.before);
    expect(doc.variables.Chl.residual).toBe('log');
    expect(doc.statistics.Chl.log10.n).toBeGreaterThan(0);
    expect(doc.observations.rows).toBe(270);
    expect(doc.period.end).toBe('2031-12-18');
  }, 60000);
});
