/**
 * The indicators of one run for the comparison: what a lake manager reads off a scenario.
 * Series are found by the `role` of the model's reported derived quantities
 * (`chlorophyll`, `totalP`, `dissolvedP`, `secchi`), never by id, and computed from daily
 * values (indicators/daily.ts), so a run on another output step gives the same numbers.
 *
 * Definitions (each a calendar-year statistic, then the mean of the last `lastYears` whole
 * years of the run; a year counts only when its window lies wholly inside the run):
 * - chlorophyll-a, dissolved P, Secchi depth: the growing-season mean (April–September by
 *   default, seasonal.ts);
 * - total P: the annual mean (January–December), and its growing-season mean for the TSI;
 * - target (user-set, none by default; in the series' unit): the days of each year's window
 *   on which it is not met (above it; for Secchi depth, where deeper is better, below it),
 *   summed over the last years, and the first year from which the window mean meets it
 *   every year to the end of the run;
 * - Carlson's (1977) trophic state index of the growing-season means of chlorophyll-a,
 *   total P and Secchi depth (the index of the mean, not the mean of daily indices), in the
 *   variant asked for (indicators/carlson-tsi.ts; default `exact`, the base-2 forms).
 * A role the model does not report, or a run that did not finish, gives `ok: false` with
 * the reason in words. Non-finite days are skipped (seasonal.ts).
 */
import type { ModelDoc, RunDoc } from '../document/types';
import { toDaily, type DailySeries } from '../indicators/daily';
import {
  annualMeans,
  daysAbove,
  firstYearMetAndStays,
  GROWING_SEASON,
  seasonalMeans,
  type Season,
  type YearValue
} from '../indicators/seasonal';
import { DEFAULT_TSI_VARIANT, tsiChlorophyll, tsiSecchi, tsiTotalP, type TsiVariant } from '../indicators/carlson-tsi';
import { parseUnit } from '../expr/math';

/** The roles the comparison reads, in the order it shows them. */
export const INDICATOR_ROLES = ['chlorophyll', 'totalP', 'dissolvedP', 'secchi'] as const;
export type IndicatorRole = (typeof INDICATOR_ROLES)[number];

export interface RoleSpec {
  role: IndicatorRole;
  /** Words for the quantity. */
  name: string;
  /** The window of the yearly statistic. */
  window: 'season' | 'year';
  /** `lower`: a lower value is better (a target is an upper limit); `higher`: the reverse. */
  better: 'lower' | 'higher';
}

export const ROLE_SPECS: Readonly<Record<IndicatorRole, RoleSpec>> = Object.freeze({
  chlorophyll: { role: 'chlorophyll', name: 'Chlorophyll-a', window: 'season', better: 'lower' },
  totalP: { role: 'totalP', name: 'Total phosphorus', window: 'year', better: 'lower' },
  dissolvedP: { role: 'dissolvedP', name: 'Dissolved phosphorus', window: 'season', better: 'lower' },
  secchi: { role: 'secchi', name: 'Secchi depth', window: 'season', better: 'higher' }
});

export interface IndicatorOptions {
  /** Growing season, months inclusive. Default April–September. */
  season?: Season;
  /** Targets by role, in the unit of that role's series. None by default. */
  targets?: Partial<Record<string, number>>;
  /** Years at the end of the run that the "last years" values average. Default 5. */
  lastYears?: number;
  /** Carlson TSI coefficients. Default `exact` (base-2 forms). */
  tsiVariant?: TsiVariant;
}

export const DEFAULT_INDICATOR_OPTIONS = Object.freeze({
  season: GROWING_SEASON,
  lastYears: 5,
  tsiVariant: DEFAULT_TSI_VARIANT
});

export interface TargetIndicators {
  /** The target, in the series' unit. */
  value: number;
  better: 'lower' | 'higher';
  /** Per year: days of the window on which the target is not met. */
  daysNotMet: YearValue[];
  /** Sum of `daysNotMet` over the last years (NaN when the run has fewer whole years). */
  daysNotMetLast: number;
  /** First year from which the window mean meets the target every year to the end, or null. */
  firstYearMet: number | null;
}

export interface RoleIndicators {
  ok: true;
  role: IndicatorRole;
  seriesId: string;
  label: string;
  /** As the model writes it. */
  unit: string;
  window: 'season' | 'year';
  /** The yearly statistic (season or annual mean). */
  perYear: YearValue[];
  /** Mean of the last years' values (NaN when there are fewer). */
  last: number;
  /** Growing-season means (the same as `perYear` for a seasonal role). */
  seasonPerYear: YearValue[];
  seasonLast: number;
  target: TargetIndicators | null;
}

export interface Missing {
  ok: false;
  /** Why there is no value, in words. */
  reason: string;
}

export interface TsiPart {
  ok: true;
  /** Per year: the index of that year's growing-season mean. */
  perYear: YearValue[];
  /** The index of the mean over the last years of the growing-season means. */
  last: number;
}

export interface RunIndicators {
  runId: string;
  status: RunDoc['status'];
  season: Season;
  lastYears: number;
  /** The calendar years the "last" values average (empty when the run is too short). */
  lastYearList: number[];
  tsiVariant: TsiVariant;
  roles: Record<IndicatorRole, RoleIndicators | (Missing & { role: IndicatorRole })>;
  tsi: { chlorophyll: TsiPart | Missing; totalP: TsiPart | Missing; secchi: TsiPart | Missing };
}

/** The first reported derived quantity with `role` that the run recorded. */
export function findRoleSeries(model: ModelDoc, run: RunDoc, role: string): { id: string; label: string; unit: string } | Missing {
  const withRole = (model.derived ?? []).filter((d) => d.role === role);
  if (withRole.length === 0) return { ok: false, reason: `the model has no derived quantity with role \`${role}\`` };
  for (const d of withRole) {
    if (run.series[d.id]) return { id: d.id, label: d.label ?? d.id, unit: run.units[d.id] ?? d.unit };
  }
  return {
    ok: false,
    reason: `the run did not record ${withRole.map((d) => `\`${d.id}\``).join(', ')} (role \`${role}\`; set report: true)`
  };
}

const meanOf = (v: number[]) => (v.length ? v.reduce((a, b) => a + b, 0) / v.length : NaN);

/** The values of the years in `years` (NaN when one is missing). */
function meanOver(values: YearValue[], years: number[]): number {
  if (years.length === 0) return NaN;
  const by = new Map(values.map((v) => [v.year, v.value]));
  const picked = years.map((y) => by.get(y));
  if (picked.some((v) => v === undefined)) return NaN;
  return meanOf(picked as number[]);
}

function sumOver(values: YearValue[], years: number[]): number {
  if (years.length === 0) return NaN;
  const by = new Map(values.map((v) => [v.year, v.value]));
  let s = 0;
  for (const y of years) {
    const v = by.get(y);
    if (v === undefined) return NaN;
    s += v;
  }
  return s;
}

/** Factor that turns a value in `unit` into `to`, or null when the dimensions differ. */
export function unitFactor(unit: string, to: string): number | null {
  if (unit.trim() === to) return 1;
  const a = parseUnit(unit);
  const b = parseUnit(to);
  if ('error' in a || 'error' in b) return null;
  if (a.dims.length !== b.dims.length || a.dims.some((d, i) => Math.abs(d - b.dims[i]) > 1e-12)) return null;
  return a.si / b.si;
}

function roleIndicators(
  model: ModelDoc,
  run: RunDoc,
  role: IndicatorRole,
  season: Season,
  years: number[],
  target: number | undefined
): { result: RoleIndicators | Missing; daily: DailySeries | null } {
  const found = findRoleSeries(model, run, role);
  if ('ok' in found) return { result: found, daily: null };
  const spec = ROLE_SPECS[role];
  const daily = toDaily(run.start, run.times, run.series[found.id]);
  const seasonPerYear = seasonalMeans(daily, season);
  const perYear = spec.window === 'season' ? seasonPerYear : annualMeans(daily);
  let t: TargetIndicators | null = null;
  if (typeof target === 'number' && Number.isFinite(target)) {
    const win = spec.window === 'season' ? season : null;
    const daysNotMet =
      spec.better === 'lower'
        ? daysAbove(daily, target, win)
        : // days below a lower limit: the days in the window minus those at or above it
          belowDays(daily, target, win);
    t = {
      value: target,
      better: spec.better,
      daysNotMet,
      daysNotMetLast: sumOver(daysNotMet, years),
      firstYearMet: firstYearMetAndStays(perYear, spec.better === 'lower' ? (v) => v <= target : (v) => v >= target)
    };
  }
  return {
    result: {
      ok: true,
      role,
      seriesId: found.id,
      label: found.label,
      unit: found.unit,
      window: spec.window,
      perYear,
      last: meanOver(perYear, years),
      seasonPerYear,
      seasonLast: meanOver(seasonPerYear, years),
      target: t
    },
    daily
  };
}

/** Days per year (within `season` when given) on which the value is below `limit`. */
function belowDays(series: DailySeries, limit: number, season: Season | null): YearValue[] {
  const negated: DailySeries = { start: series.start, values: series.values.map((v) => -v) };
  return daysAbove(negated, -limit, season);
}

/**
 * The years that the "last years" values average: the last `n` whole calendar years of
 * the run (1 January to 31 December inside it), the same years for every indicator; empty
 * when the run has fewer.
 */
export function lastYearsOf(run: RunDoc, n: number): number[] {
  if (run.times.length === 0 || n <= 0) return [];
  const t0 = Date.parse(`${run.start}T00:00:00Z`);
  const first = new Date(t0 + Math.ceil(run.times[0] - 1e-9) * 86400000);
  const last = new Date(t0 + Math.floor(run.times[run.times.length - 1] + 1e-9) * 86400000);
  const y0 = first.getUTCMonth() === 0 && first.getUTCDate() === 1 ? first.getUTCFullYear() : first.getUTCFullYear() + 1;
  const y1 = last.getUTCMonth() === 11 && last.getUTCDate() === 31 ? last.getUTCFullYear() : last.getUTCFullYear() - 1;
  if (y1 - y0 + 1 < n) return [];
  return Array.from({ length: n }, (_, i) => y1 - n + 1 + i);
}

const TSI_UNITS = { chlorophyll: 'mg/m^3', totalP: 'mg/m^3', secchi: 'm' } as const;

function tsiPart(
  r: RoleIndicators | Missing,
  which: keyof typeof TSI_UNITS,
  variant: TsiVariant,
  years: number[]
): TsiPart | Missing {
  if (!r.ok) return r;
  const f = unitFactor(r.unit, TSI_UNITS[which]);
  if (f === null) return { ok: false, reason: `\`${r.seriesId}\` is in ${r.unit}, which does not convert to ${TSI_UNITS[which]}` };
  const fn = which === 'chlorophyll' ? tsiChlorophyll : which === 'totalP' ? tsiTotalP : tsiSecchi;
  const perYear = r.seasonPerYear.map((y) => ({ year: y.year, days: y.days, value: fn(y.value * f, variant) }));
  return { ok: true, perYear, last: fn(r.seasonLast * f, variant) };
}

/** The indicators of `run` of `model` (see the file comment for definitions). */
export function runIndicators(run: RunDoc, model: ModelDoc, options: IndicatorOptions = {}): RunIndicators {
  const season = options.season ?? DEFAULT_INDICATOR_OPTIONS.season;
  const lastYears = options.lastYears ?? DEFAULT_INDICATOR_OPTIONS.lastYears;
  const tsiVariant = options.tsiVariant ?? DEFAULT_INDICATOR_OPTIONS.tsiVariant;
  const targets = options.targets ?? {};
  const failed: Missing | null =
    run.status === 'ok'
      ? null
      : { ok: false, reason: run.status === 'failed' ? `the run failed: ${run.error?.message ?? 'no message'}` : 'the run was cancelled' };
  const years = failed ? [] : lastYearsOf(run, lastYears);
  const roles = {} as RunIndicators['roles'];
  for (const role of INDICATOR_ROLES) {
    roles[role] = failed ? { ...failed, role } : { ...roleIndicators(model, run, role, season, years, targets[role]).result, role };
  }
  const tsi = {
    chlorophyll: failed ?? tsiPart(roles.chlorophyll, 'chlorophyll', tsiVariant, years),
    totalP: failed ?? tsiPart(roles.totalP, 'totalP', tsiVariant, years),
    secchi: failed ?? tsiPart(roles.secchi, 'secchi', tsiVariant, years)
  };
  return { runId: run.id, status: run.status, season, lastYears, lastYearList: years, tsiVariant, roles, tsi };
}

// ---------------------------------------------------------------------------------------
// The headline values as one flat list: what the table shows and what is compared.

export type HeadlineKind = 'value' | 'days' | 'year' | 'index';

export interface Headline {
  /** Stable key, e.g. `chlorophyll.last`, `chlorophyll.daysNotMet`, `tsi.totalP`. */
  key: string;
  role: string;
  /** Words for the column, e.g. "Chlorophyll-a, growing-season mean, last 5 years". */
  label: string;
  /** Unit of `value` ("days", "year", "TSI" for the index). */
  unit: string;
  kind: HeadlineKind;
  better: 'lower' | 'higher' | 'earlier';
  /** The value, or null with `reason`. A year value is a calendar year. */
  value: number | null;
  reason?: string;
}

const monthName = (m: number) =>
  ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'][m - 1];

/** "April–September". */
export function seasonWords(s: Season): string {
  return `${monthName(s.fromMonth)}–${monthName(s.toMonth)}`;
}

/**
 * The headline values of a run, in table order: for each role its last-years mean, then
 * (when a target is set) days not met and the first year met, then the three TSI values.
 * Keys and labels do not depend on the run, so the lists of several runs line up.
 */
export function headlines(ind: RunIndicators, targets: Partial<Record<string, number>> = {}): Headline[] {
  const out: Headline[] = [];
  const n = ind.lastYears;
  const fin = (v: number) => (Number.isFinite(v) ? v : null);
  const tooShort = `the run has fewer than ${n} whole years`;
  for (const role of INDICATOR_ROLES) {
    const spec = ROLE_SPECS[role];
    const r = ind.roles[role];
    const window = spec.window === 'season' ? 'growing-season mean' : 'annual mean';
    const unit = r.ok ? r.unit : '';
    const v = r.ok ? fin(r.last) : null;
    out.push({
      key: `${role}.last`,
      role,
      label: `${spec.name}, ${window}, last ${n} years`,
      unit,
      kind: 'value',
      better: spec.better,
      value: v,
      ...(v === null ? { reason: r.ok ? tooShort : r.reason } : {})
    });
    const target = targets[role];
    if (typeof target === 'number' && Number.isFinite(target)) {
      const t = r.ok ? r.target : null;
      const word = spec.better === 'lower' ? 'above' : 'below';
      const days = t ? fin(t.daysNotMetLast) : null;
      out.push({
        key: `${role}.daysNotMet`,
        role,
        label: `${spec.name}: days ${word} ${target} ${unit}, last ${n} years`.replace(/\s+,/, ','),
        unit: 'days',
        kind: 'days',
        better: 'lower',
        value: days,
        ...(days === null ? { reason: r.ok ? tooShort : r.reason } : {})
      });
      const first = t ? t.firstYearMet : null;
      out.push({
        key: `${role}.firstYearMet`,
        role,
        label: `${spec.name}: first year the ${window} meets ${target} ${unit} and stays`,
        unit: 'year',
        kind: 'year',
        better: 'earlier',
        value: first,
        ...(first === null ? { reason: r.ok ? 'not met to the end of the run' : r.reason } : {})
      });
    }
  }
  const tsiNames = { chlorophyll: 'chlorophyll-a', totalP: 'total P', secchi: 'Secchi depth' } as const;
  for (const which of ['chlorophyll', 'totalP', 'secchi'] as const) {
    const p = ind.tsi[which];
    const v = p.ok ? fin(p.last) : null;
    out.push({
      key: `tsi.${which}`,
      role: which,
      label: `Carlson TSI from ${tsiNames[which]} (${seasonWords(ind.season)}, last ${n} years, ${ind.tsiVariant} coefficients)`,
      unit: 'TSI',
      kind: 'index',
      better: 'lower',
      value: v,
      ...(v === null ? { reason: p.ok ? tooShort : p.reason } : {})
    });
  }
  return out;
}
