/**
 * Ranges a calibration produced, as the ranges an ensemble samples from. A calibration gives
 * each fitted parameter a value and a linearised 95 % interval (fit/calibrate.ts); the
 * ensemble then samples that parameter from a triangular distribution over the interval
 * with its mode at the fitted value (the model's value is set to the fitted value when it
 * differs), and every other input keeps the model's own range. The triangle is a bounded
 * stand-in for the bell shape the linearisation implies (a choice of ours, said on screen);
 * an interval that is not bounded (the data did not see the parameter) keeps the model's
 * range. Pure: returns a new document, the model is not changed.
 */
import type { ModelDoc } from '../document/types';
import { UncertaintyInputError } from './errors';

export interface CalibratedRange {
  /** The fitted value. */
  value: number;
  low: number;
  high: number;
  bounded: boolean;
}

export interface RangesApplied {
  model: ModelDoc;
  /** Parameters whose range came from the calibration. */
  replaced: string[];
  /** Parameters of the calibration that kept the model's range (unbounded interval). */
  kept: string[];
}

export function withCalibratedRanges(model: ModelDoc, ranges: Readonly<Record<string, CalibratedRange>>): RangesApplied {
  const doc = structuredClone(model);
  const replaced: string[] = [];
  const kept: string[] = [];
  for (const [id, r] of Object.entries(ranges)) {
    const p = doc.parameters.find((x) => x.id === id);
    if (!p) throw new UncertaintyInputError('invalid_range', `the calibration names parameter '${id}', which model '${model.id}' does not have`);
    if (!r.bounded) {
      kept.push(id);
      continue;
    }
    if (!(Number.isFinite(r.low) && Number.isFinite(r.high) && Number.isFinite(r.value) && r.low < r.high && r.low <= r.value && r.value <= r.high)) {
      throw new UncertaintyInputError('invalid_range', `the calibrated range of '${id}' [${r.low}, ${r.high}] around ${r.value} is not an interval holding its value`);
    }
    p.value = r.value;
    p.range = { min: r.low, max: r.high, distribution: 'triangular' };
    replaced.push(id);
  }
  return { model: doc, replaced, kept };
}
