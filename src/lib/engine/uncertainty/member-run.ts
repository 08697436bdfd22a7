/**
 * One ensemble member under one scenario, as the worker sends it to the Uncertainty screen
 * and as an ensemble record keeps it (archive/records.ts): status, closure, the indicator
 * values and, on a thinned grid, the role series.
 */
export interface MemberRun {
  /** `ok` ran to the end (closed or not); `failed` with the engine's code and message. */
  status: 'ok' | 'failed';
  closed: boolean;
  relativeResidual: number | null;
  /** Null for a member that ran and closed; `closure_failed` or the run's error code. */
  code: string | null;
  message: string | null;
  /** Indicator values by column key (null where there is none, e.g. a short period). */
  values: Record<string, number | null>;
  /**
   * Series by role (`chlorophyll`, `totalP`, `secchi`) on the thinned daily grid: the
   * value on day 0, g, 2g, … of the period (g = gridDays). Absent (null) for a failed
   * member, and in a record that does not keep the members' series.
   */
  series: Record<string, number[]> | null;
  /** Run warnings that bear on the numbers (the engine's MEMBER_WARNINGS); the member still counts. */
  warnings?: { code: string; id?: string; message: string }[];
}

/** Run warnings an ensemble lists per member: the numbers count, but deserve a look. */
export const MEMBER_WARNINGS: ReadonlySet<string> = new Set(['near_absolute_tolerance', 'negative_state']);
