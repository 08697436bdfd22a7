/**
 * Goodness of fit per series, over all observations and per season.
 *   residual e = sim − obs (in the series' unit)
 *   RMSE = sqrt(mean e²); bias = mean e (positive: the model is too high)
 *   NSE  = 1 − Σe² / Σ(obs − mean obs)²   (Nash & Sutcliffe 1970, eq. for R², their
 *          "efficiency"; 1 is a perfect fit, 0 no better than the observed mean)
 * The log variant (for chlorophyll, whose errors grow with its level) is the same three on
 * log10 values; pairs where either value is ≤ 0 are left out of it and counted.
 * Censored observations (common practice for detection limits, not from one source): a
 * below-limit observation counts, at its limit, only when the simulation is above the limit
 * (then e = sim − limit); an above-bound observation (Secchi on the bottom) only when the
 * simulation is below the bound. Otherwise the pair agrees with the data and is left out
 * of every sum (it is counted in `consistent`).
 * Seasons: `growing` April–September (months 4–9, UTC dates) and `rest` (October–March).
 */
import type { Pair, Matched } from './match';

export interface Scores {
  /** Pairs that entered the sums. */
  n: number;
  rmse: number | null;
  bias: number | null;
  nse: number | null;
}

export interface SeasonStatistics extends Scores {
  /** All pairs of the season, counted or not. */
  pairs: number;
  /** Censored pairs the simulation agrees with (left out of the sums). */
  consistent: number;
  meanObs: number | null;
  meanSim: number | null;
  /** On log10 values, for the series named in `logVariables`. */
  log10?: Scores & { nonPositive: number };
}

export interface VariableStatistics {
  all: SeasonStatistics;
  growing: SeasonStatistics;
  rest: SeasonStatistics;
  /** Observations outside the run's period (not paired). */
  outside: number;
}

export interface StatisticsOptions {
  /** Series that also get log10 scores (e.g. the chlorophyll-role series). */
  logVariables?: readonly string[];
  /** First and last month of the growing season (default 4 and 9). */
  growing?: readonly [number, number];
}

/** The residual a pair contributes on scale `f`, or null when a censored pair agrees with the data. */
export function censoredResidual(p: Pair, f: (x: number) => number = (x) => x): number | null {
  if (p.censored === 'below' && p.sim <= p.obs) return null;
  if (p.censored === 'above' && p.sim >= p.obs) return null;
  return f(p.sim) - f(p.obs);
}

/** RMSE, bias and NSE of (obs, sim) pairs already chosen. */
export function scores(obs: readonly number[], sim: readonly number[]): Scores {
  const n = obs.length;
  if (n === 0) return { n: 0, rmse: null, bias: null, nse: null };
  let se = 0;
  let sb = 0;
  let mo = 0;
  for (let i = 0; i < n; i++) mo += obs[i];
  mo /= n;
  let st = 0;
  for (let i = 0; i < n; i++) {
    const e = sim[i] - obs[i];
    se += e * e;
    sb += e;
    st += (obs[i] - mo) ** 2;
  }
  return { n, rmse: Math.sqrt(se / n), bias: sb / n, nse: n >= 2 && st > 0 ? 1 - se / st : null };
}

function seasonStatistics(pairs: readonly Pair[], log: boolean): SeasonStatistics {
  const obs: number[] = [];
  const sim: number[] = [];
  const lobs: number[] = [];
  const lsim: number[] = [];
  let consistent = 0;
  let nonPositive = 0;
  for (const p of pairs) {
    if (censoredResidual(p) === null) {
      consistent++;
      continue;
    }
    obs.push(p.obs);
    sim.push(p.sim);
    if (log) {
      if (p.obs > 0 && p.sim > 0) {
        lobs.push(Math.log10(p.obs));
        lsim.push(Math.log10(p.sim));
      } else nonPositive++;
    }
  }
  const mean = (xs: number[]) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null);
  const out: SeasonStatistics = { pairs: pairs.length, consistent, ...scores(obs, sim), meanObs: mean(obs), meanSim: mean(sim) };
  if (log) out.log10 = { ...scores(lobs, lsim), nonPositive };
  return out;
}

export function fitStatistics(matched: Matched, options: StatisticsOptions = {}): Record<string, VariableStatistics> {
  const [g0, g1] = options.growing ?? [4, 9];
  const logs = new Set(options.logVariables ?? []);
  const out: Record<string, VariableStatistics> = Object.create(null);
  for (const [id, pairs] of Object.entries(matched.pairs)) {
    const log = logs.has(id);
    const inGrowing = (p: Pair) => p.month >= g0 && p.month <= g1;
    out[id] = {
      all: seasonStatistics(pairs, log),
      growing: seasonStatistics(pairs.filter(inGrowing), log),
      rest: seasonStatistics(pairs.filter((p) => !inGrowing(p)), log),
      outside: matched.outside[id] ?? 0
    };
  }
  return out;
}
