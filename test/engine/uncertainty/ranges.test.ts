/**
 * withCalibratedRanges: a calibration's 95 % intervals become triangular ranges with the
 * mode at the fitted value; the Latin hypercube then keeps every draw inside them and puts
 * the sample median near the mode's side as a triangular distribution does (the median of
 * a triangle on [a, b] with mode c ≥ (a+b)/2 is a + √((b − a)(c − a)/2): Johnson & Kotz
 * 1995, Continuous Univariate Distributions, vol. 2, ch. 26 (common practice)).
 */
import { describe, expect, it } from 'vitest';
import { withCalibratedRanges } from '../../../src/lib/engine/uncertainty/ranges';
import { sampleModel } from '../../../src/lib/engine/uncertainty/lhs';
import { smallLake } from '../fit/fixtures';

describe('withCalibratedRanges', () => {
  it('replaces the fitted parameters\' ranges, sets their values, and leaves the model as it was', () => {
    const model = smallLake();
    const before = structuredClone(model);
    const r = withCalibratedRanges(model, { k: { value: 0.006, low: 0.005, high: 0.0075, bounded: true }, kq: { value: 0.01, low: 0.005, high: 0.015, bounded: false } });
    expect(model).toEqual(before);
    expect(r.replaced).toEqual(['k']);
    expect(r.kept).toEqual(['kq']);
    const k = r.model.parameters.find((p) => p.id === 'k')!;
    expect(k.value).toBe(0.006);
    expect(k.range).toEqual({ min: 0.005, max: 0.0075, distribution: 'triangular' });
    expect(r.model.parameters.find((p) => p.id === 'kq')!.range).toEqual(before.parameters.find((p) => p.id === 'kq')!.range);
  });

  it('an ensemble over the new ranges stays inside the interval, with the median of the triangle', () => {
    const { model } = withCalibratedRanges(smallLake(), { k: { value: 0.007, low: 0.005, high: 0.0075, bounded: true } });
    const s = sampleModel(model, 400, 11);
    const ks = s.members.map((m) => m.parameters.k).sort((a, b) => a - b);
    expect(ks[0]).toBeGreaterThanOrEqual(0.005);
    expect(ks[ks.length - 1]).toBeLessThanOrEqual(0.0075);
    const median = (ks[199] + ks[200]) / 2;
    const a = 0.005, b = 0.0075, c = 0.007;
    const want = a + Math.sqrt(((b - a) * (c - a)) / 2);
    // Latin hypercube strata: the sample median is within one stratum's width of the true one
    expect(Math.abs(median - want)).toBeLessThan((b - a) / 100);
  });

  it('refuses an unknown parameter and an interval that does not hold its value, by code', () => {
    const code = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return (e as { code: string }).code;
      }
      return 'none';
    };
    expect(code(() => withCalibratedRanges(smallLake(), { nope: { value: 1, low: 0, high: 2, bounded: true } }))).toBe('invalid_range');
    expect(code(() => withCalibratedRanges(smallLake(), { k: { value: 0.1, low: 0.005, high: 0.0075, bounded: true } }))).toBe('invalid_range');
  });
});
