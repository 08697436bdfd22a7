/**
 * Arrow widths from a run: each flow's mean annual mass, on a log scale.
 *
 * The mean annual mass of a flow is the mass it moved over the whole run (the sum of its
 * `budget[].flows` entries, in the conserved unit) divided by the run's length in years of
 * 365.25 days (from the first budget year's `from` to the last one's `to`), so partial
 * first and last years count for what they are. A flow whose rate changed sign moved its
 * net mass; the width follows the size of that net mass.
 *
 * The width scale: the largest mean mass gets FLOW_WIDTHS.max px; every factor of ten less
 * takes (max - min) / decades px off; masses more than `decades` factors of ten below the
 * largest, zero or missing get FLOW_WIDTHS.min. Before a run every arrow is
 * FLOW_WIDTHS.even wide. Log, because a lake's flows span five orders of magnitude (plant
 * uptake of a few kg beside resuspension of tens of tonnes); on a linear scale all but two
 * arrows would be hairlines.
 */
import type { RunDoc } from '$lib/engine/document/types';

export const FLOW_WIDTHS = Object.freeze({
  /** Every arrow before a run (px). */
  even: 1.5,
  /** The smallest width after a run (px). */
  min: 1,
  /** The width of the largest flow (px). Keep below LAYOUT_DEFAULTS.edgeEdge. */
  max: 9,
  /** Factors of ten between the largest flow and the smallest width. */
  decades: 4
});

const DAY_MS = 86_400_000;
const YEAR_DAYS = 365.25;

function dayOf(iso: string): number {
  return Date.parse(`${iso}T00:00:00Z`) / DAY_MS;
}

/** The run's length in years of 365.25 days, from its budget (0 without one). */
export function runYears(run: Pick<RunDoc, 'budget'>): number {
  const b = run.budget;
  if (b.length === 0) return 0;
  const days = dayOf(b[b.length - 1].to) - dayOf(b[0].from);
  return Number.isFinite(days) && days > 0 ? days / YEAR_DAYS : b.length;
}

/**
 * Each flow's mean annual mass (conserved unit per year), for the ids given; a flow the
 * budget does not list is left out.
 */
export function meanAnnualMasses(run: Pick<RunDoc, 'budget'>, flowIds: readonly string[]): Record<string, number> {
  const years = runYears(run);
  const out: Record<string, number> = Object.create(null);
  if (years === 0) return out;
  for (const id of flowIds) {
    let sum = 0;
    let seen = false;
    for (const year of run.budget) {
      const m = Object.hasOwn(year.flows, id) ? year.flows[id] : undefined;
      if (typeof m === 'number' && Number.isFinite(m)) {
        sum += m;
        seen = true;
      }
    }
    if (seen) out[id] = sum / years;
  }
  return out;
}

/** The width for a mean mass `mass` when the largest one is `largest` (both in one unit). */
export function widthForMass(mass: number, largest: number): number {
  const { min, max, decades } = FLOW_WIDTHS;
  const m = Math.abs(mass);
  if (!(largest > 0) || !(m > 0) || !Number.isFinite(m)) return min;
  const below = Math.log10(largest / m); // factors of ten below the largest
  return Math.max(min, Math.min(max, max - ((max - min) * below) / decades));
}

/** Stroke widths (px) of the flows `flowIds`: even before a run (`run` null), else by mean annual mass. */
export function flowWidths(run: Pick<RunDoc, 'budget'> | null, flowIds: readonly string[]): Record<string, number> {
  const out: Record<string, number> = Object.create(null);
  if (!run) {
    for (const id of flowIds) out[id] = FLOW_WIDTHS.even;
    return out;
  }
  const masses = meanAnnualMasses(run, flowIds);
  const largest = Math.max(0, ...Object.values(masses).map(Math.abs).filter(Number.isFinite));
  for (const id of flowIds) out[id] = widthForMass(masses[id] ?? 0, largest);
  return out;
}
