/**
 * Latin hypercube sampling (McKay, Beckman & Conover 1979, Technometrics 21: 239–245):
 * each of k inputs has its probability range cut into n strata of equal probability, and
 * each stratum of each input is used by exactly one of the n sets; the pairing across
 * inputs is random. Set j takes, for input i, u = (π_i(j) + v)/n with π_i a random
 * permutation of 0…n−1 and v uniform on [0, 1), then x = F_i⁻¹(u) (distributions.ts).
 *
 * The order of draws from the generator is fixed, so one seed gives the same sets on every
 * machine: input by input (parameters in model order, then states in model order), first
 * the permutation (Fisher–Yates from the last position down, j = ⌊rnd·(i+1)⌋), then the
 * n jitters in set order. The generator is mulberry32 (balance/identity.ts).
 */
import type { ModelDoc } from '../document/types';
import { mulberry32 } from '../balance/identity';
import { marginalOf, quantile, type Marginal } from './distributions';
import { UncertaintyInputError } from './errors';

/** n × k points in the unit cube, one stratum per set and input. */
export function latinHypercube(n: number, k: number, rnd: () => number): number[][] {
  const out: number[][] = Array.from({ length: n }, () => new Array<number>(k));
  const perm = new Array<number>(n);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < n; j++) perm[j] = j;
    for (let j = n - 1; j > 0; j--) {
      const r = Math.floor(rnd() * (j + 1));
      const t = perm[j];
      perm[j] = perm[r];
      perm[r] = t;
    }
    for (let j = 0; j < n; j++) out[j][i] = (perm[j] + rnd()) / n;
  }
  return out;
}

export interface SampledInput {
  kind: 'parameter' | 'state';
  id: string;
  marginal: Marginal;
}

/** One set: values by id in the model's units, for runner.run({ parameters, initial }). */
export interface MemberDraw {
  parameters: Record<string, number>;
  initial: Record<string, number>;
}

export interface ModelSample {
  seed: number;
  n: number;
  inputs: SampledInput[];
  members: MemberDraw[];
}

/** The inputs that have a range: parameters' `range`, then states' `initialRange`, in model order. */
export function uncertainInputs(model: ModelDoc): SampledInput[] {
  const inputs: SampledInput[] = [];
  for (const p of model.parameters ?? []) if (p.range) inputs.push({ kind: 'parameter', id: p.id, marginal: marginalOf(p.range, p.value, 'parameter', p.id) });
  for (const s of model.states ?? []) if (s.initialRange) inputs.push({ kind: 'state', id: s.id, marginal: marginalOf(s.initialRange, s.initial, 'state', s.id) });
  return inputs;
}

export function checkSize(n: number): void {
  if (!Number.isInteger(n) || n < 1) throw new UncertaintyInputError('invalid_ensemble_size', `the number of members must be a whole number of at least 1, got ${n}`);
}

export function checkSeed(seed: number): void {
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) throw new UncertaintyInputError('invalid_seed', `the seed must be a whole number from 0 to 4294967295, got ${seed}`);
}

/** n sets over the model's ranges by Latin hypercube, seeded. */
export function sampleModel(model: ModelDoc, n: number, seed: number): ModelSample {
  checkSize(n);
  checkSeed(seed);
  const inputs = uncertainInputs(model);
  if (inputs.length === 0) throw new UncertaintyInputError('nothing_to_sample', `model '${model.id}' has no parameter with a range and no state with an initialRange: nothing to sample`);
  const unit = latinHypercube(n, inputs.length, mulberry32(seed));
  const members = unit.map((row) => {
    const m: MemberDraw = { parameters: {}, initial: {} };
    inputs.forEach((inp, i) => ((inp.kind === 'parameter' ? m.parameters : m.initial)[inp.id] = quantile(inp.marginal, row[i])));
    return m;
  });
  return { seed, n, inputs, members };
}
