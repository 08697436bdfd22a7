/**
 * Morris (1991, Technometrics 33: 161–174) elementary-effects screening.
 *
 * The k inputs are scaled to the unit cube and restricted to a grid of p levels
 * {0, 1/(p−1), …, 1}. A trajectory starts at a random grid point and moves one input at a
 * time, each once, in a random order, by Δ = p/(2(p − 1)) (for even p every level then has
 * a partner level Δ away, so the levels are equally likely to be sampled). The start value
 * of input i is drawn from the levels {0, …, 1 − Δ}, and with probability ½ it starts at
 * the upper partner (x + Δ) and steps down: this is the randomised orientation matrix
 * B* = (J x* + (Δ/2)[(2B − J)D* + J])P* of Morris's paper, written as a loop. Each step
 * gives one elementary effect EE_i = (f(x′) − f(x)) / (x′_i − x_i); r trajectories give
 * r effects per input for r·(k + 1) model evaluations.
 *
 * Measures per input: μ (mean EE), μ* = mean |EE| (Campolongo, Cariboni & Saltelli 2007,
 * Environmental Modelling & Software 22: 1509–1518; it does not let effects of opposite
 * sign cancel), and σ (sample standard deviation of EE, divisor r − 1: non-linear or
 * interacting effects). Seeded with mulberry32, so one seed gives one design.
 *
 * Inputs here are on the unit cube; a model's parameters come in through their quantile
 * functions (distributions.ts) inside f.
 */
import { mulberry32 } from '../balance/identity';
import { UncertaintyInputError } from './errors';

export interface MorrisOptions {
  /** Trajectories (r ≥ 2). Default 10. */
  trajectories?: number;
  /** Grid levels (even, ≥ 2). Default 4. */
  levels?: number;
  seed?: number;
}

export interface MorrisEffect {
  index: number;
  mu: number;
  muStar: number;
  sigma: number;
  /** The r elementary effects, in trajectory order. */
  effects: number[];
}

export interface MorrisResult {
  trajectories: number;
  levels: number;
  delta: number;
  evaluations: number;
  effects: MorrisEffect[];
  /** The design: r trajectories of k + 1 points each. */
  design: number[][][];
}

/** r trajectories of k + 1 points on the p-level grid of the unit cube. */
export function morrisDesign(k: number, r: number, p: number, rnd: () => number): { design: number[][][]; moved: number[][] } {
  const delta = p / (2 * (p - 1));
  const low = p / 2; // levels 0 … p/2 − 1 (i.e. 0 … 1 − Δ) can step up by Δ
  const design: number[][][] = [];
  const moved: number[][] = [];
  for (let t = 0; t < r; t++) {
    const x = new Array<number>(k);
    for (let i = 0; i < k; i++) {
      const level = Math.floor(rnd() * low) / (p - 1);
      x[i] = rnd() < 0.5 ? level : level + delta;
    }
    const order = Array.from({ length: k }, (_, i) => i);
    for (let j = k - 1; j > 0; j--) {
      const q = Math.floor(rnd() * (j + 1));
      [order[j], order[q]] = [order[q], order[j]];
    }
    const points = [x.slice()];
    for (const i of order) {
      // the partner level: up by Δ from the lower half of the levels, else down by Δ
      x[i] = x[i] + delta <= 1 + 1e-12 ? x[i] + delta : x[i] - delta;
      points.push(x.slice());
    }
    design.push(points);
    moved.push(order);
  }
  return { design, moved };
}

export function morris(f: (x: number[]) => number, k: number, options: MorrisOptions = {}): MorrisResult {
  const r = options.trajectories ?? 10;
  const p = options.levels ?? 4;
  if (!Number.isInteger(k) || k < 1) throw new UncertaintyInputError('invalid_morris_settings', `Morris screening needs at least one input, got ${k}`);
  if (!Number.isInteger(r) || r < 2) throw new UncertaintyInputError('invalid_morris_settings', `Morris screening needs at least 2 trajectories, got ${r}`);
  if (!Number.isInteger(p) || p < 2 || p % 2) throw new UncertaintyInputError('invalid_morris_settings', `Morris levels must be an even whole number ≥ 2, got ${p}`);
  const delta = p / (2 * (p - 1));
  const { design, moved } = morrisDesign(k, r, p, mulberry32(options.seed ?? 0));
  const ee: number[][] = Array.from({ length: k }, () => []);
  let evaluations = 0;
  design.forEach((points, t) => {
    let prev = f(points[0]);
    evaluations++;
    moved[t].forEach((i, s) => {
      const next = f(points[s + 1]);
      evaluations++;
      ee[i].push((next - prev) / (points[s + 1][i] - points[s][i]));
      prev = next;
    });
  });
  const effects = ee.map((e, index) => {
    const mu = e.reduce((a, b) => a + b, 0) / e.length;
    const muStar = e.reduce((a, b) => a + Math.abs(b), 0) / e.length;
    const sigma = Math.sqrt(e.reduce((a, b) => a + (b - mu) ** 2, 0) / (e.length - 1));
    return { index, mu, muStar, sigma, effects: e };
  });
  return { trajectories: r, levels: p, delta, evaluations, effects, design };
}
