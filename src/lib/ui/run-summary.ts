/**
 * What a run says in words: closure, solver, time taken, errors. Pure functions, so that
 * every screen words a run the same way and tests can check the words.
 */
import type { ClosureDoc, RunErrorDoc, RunSolverDoc } from '$lib/engine/document/types';
import { isoDateAt } from './chart-config';

const integer = new Intl.NumberFormat('en', { maximumFractionDigits: 0 });
/** Masses: four significant digits, so a small lake's 0.512 kg does not read as 1 kg. */
const mass = new Intl.NumberFormat('en', { maximumSignificantDigits: 4 });

/** A small ratio in short scientific notation: 3e-12, 2.5e-7, 0. */
export function formatRatio(x: number): string {
  if (!Number.isFinite(x)) return '–';
  if (x === 0) return '0';
  return x.toExponential(1).replace('.0e', 'e').replace('e+', 'e');
}

export interface ClosureWords {
  closed: boolean;
  /** `closed` or `not closed`: the status in a word, never a colour alone. */
  word: 'closed' | 'not closed';
  /** "Mass balance closed: residual 3e-12 of throughput". */
  text: string;
  /** The books behind it: "kg P: initial 1,234, final 1,200, imported 800, exported 834". */
  detail: string;
}

export function describeClosure(closure: ClosureDoc, element?: string): ClosureWords {
  const closed = closure.ok;
  const word = closed ? 'closed' : 'not closed';
  const residual = `residual ${formatRatio(closure.relativeResidual)} of throughput`;
  const text = closed
    ? `Mass balance ${word}: ${residual}`
    : `Mass balance ${word}: ${residual}, above the tolerance ${formatRatio(closure.tolerance)}`;
  const unit = element ? `${closure.unit} ${element}` : closure.unit;
  const m = (v: number) => mass.format(v);
  const detail =
    `${unit}: initial ${m(closure.initialMass)}, final ${m(closure.finalMass)}, ` +
    `imported ${m(closure.imported)}, exported ${m(closure.exported)}`;
  return { closed, word, text, detail };
}

const METHOD_NAMES: Record<RunSolverDoc['method'], string> = {
  auto: 'automatic choice',
  odex: 'odex (explicit extrapolation)',
  stiff: 'stiff (Rosenbrock)',
  dp54: 'Dormand–Prince 5(4) (explicit Runge–Kutta)'
};

/** The solver in words, e.g. "odex (explicit extrapolation)", with a switch if there was one. */
export function describeSolverMethod(solver: RunSolverDoc): string {
  const name = METHOD_NAMES[solver.method] ?? solver.method;
  if (solver.switchedAt === null || solver.switchedAt === undefined) return name;
  return `${solver.startedWith === 'dp54' ? 'Dormand–Prince 5(4)' : 'odex'}, then the stiff method from day ${integer.format(solver.switchedAt)}`;
}

/** "2,412 steps (31 rejected), 30,120 evaluations". */
export function describeSolverSteps(solver: RunSolverDoc): string {
  return (
    `${integer.format(solver.steps)} steps (${integer.format(solver.rejected)} rejected), ` +
    `${integer.format(solver.evaluations)} evaluations`
  );
}

/** "41 ms", "1.2 s". */
export function formatDuration(ms: number): string {
  if (!Number.isFinite(ms) || ms < 0) return '–';
  return ms < 1000 ? `${Math.round(ms)} ms` : `${(ms / 1000).toFixed(1)} s`;
}

/** The error of a failed run with where it happened, e.g. "… (day 135, 2027-05-16, flow uptake)". */
export function describeRunError(error: RunErrorDoc, start?: string): string {
  const where: string[] = [];
  if (typeof error.time === 'number' && Number.isFinite(error.time)) {
    where.push(`day ${integer.format(error.time)}`);
    if (start) {
      try {
        where.push(isoDateAt(start, error.time));
      } catch {
        // A malformed start only loses the date, not the message.
      }
    }
  }
  if (error.flow) where.push(`flow ${error.flow}`);
  return where.length ? `${error.message} (${where.join(', ')})` : error.message;
}

/** Whole days from ISO date `start` to ISO date `end` (UTC), NaN when either is malformed. */
export function daysBetween(start: string, end: string): number {
  return Math.round((Date.parse(end) - Date.parse(start)) / 86_400_000);
}

/** The closure at a glance, for lists: "closed, 3e-12 of throughput" or "not closed, 2e-3 of throughput". */
export function closureAtAGlance(closure: ClosureDoc | null | undefined, status?: 'ok' | 'failed' | 'cancelled'): string {
  if (status === 'failed') return 'run failed: no closure';
  if (!closure) return '–';
  return `${closure.ok ? 'closed' : 'not closed'}, ${formatRatio(closure.relativeResidual)} of throughput`;
}
