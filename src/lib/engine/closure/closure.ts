/**
 * Stage 5: the mass closure of a run and its per-year budget.
 * M(t) = Σ value × m(x) over conserved states; residual(t) = M(t) − M(0) − (imported(t) −
 * exported(t)), imports and exports integrated by the solver beside the states plus the
 * remove/add amounts at their dates. relativeResidual = max |residual| / max(M(0),
 * max M(t), total imported, total exported); a run where all of these are zero is closed
 * by definition (shared/design/documents.md, Run).
 */
import type { BudgetYearDoc, ClosureDoc } from '../document/types';
import type { RawRun } from '../solve/integrate';
import { massOf } from '../solve/integrate';
import { isoOfDay } from '../solve/schedule';

/** Default closure tolerance: well above round-off (1e-13 seen), far below any real leak. */
export const DEFAULT_CLOSURE_TOLERANCE = 1e-9;

export function closureOf(
  raw: RawRun,
  m: Float64Array,
  conserved: boolean[],
  unit: string,
  tolerance = DEFAULT_CLOSURE_TOLERANCE
): ClosureDoc {
  const n = raw.times.length;
  const y = new Float64Array(m.length);
  const M0 = raw.initialMass;
  let maxM = Math.abs(M0);
  let maxResidual = 0;
  let finalMass = M0;
  for (let k = 0; k < n; k++) {
    for (let i = 0; i < m.length; i++) y[i] = raw.states[i][k];
    const M = massOf(y, m, conserved);
    finalMass = M;
    maxM = Math.max(maxM, Math.abs(M));
    const r = M - M0 - (raw.imported[k] - raw.exported[k]);
    if (Math.abs(r) > Math.abs(maxResidual) || Number.isNaN(r)) maxResidual = r;
  }
  const imported = n ? raw.imported[n - 1] : 0;
  const exported = n ? raw.exported[n - 1] : 0;
  const scale = Math.max(Math.abs(M0), maxM, Math.abs(imported), Math.abs(exported));
  const relativeResidual = scale === 0 ? 0 : Math.abs(maxResidual) / scale;
  return {
    unit,
    initialMass: M0,
    finalMass,
    imported,
    exported,
    maxResidual: Math.abs(maxResidual),
    relativeResidual,
    tolerance,
    ok: Number.isFinite(relativeResidual) && relativeResidual <= tolerance
  };
}

export function budgetOf(raw: RawRun, flowIds: string[], measureIds: string[], startDay: number): BudgetYearDoc[] {
  return raw.years.map((yr) => {
    const flows: Record<string, number> = {};
    flowIds.forEach((id, k) => (flows[id] = yr.flows[k]));
    const measures: Record<string, number> = {};
    for (const id of measureIds) if (yr.measures.has(id)) measures[id] = yr.measures.get(id)!;
    const storageChange = yr.massEnd - yr.massStart;
    const from = isoOfDay(startDay + yr.fromDay);
    return {
      year: Number(from.slice(0, 4)),
      from,
      to: isoOfDay(startDay + yr.toDay),
      flows,
      measures,
      imported: yr.imported,
      exported: yr.exported,
      storageChange,
      residual: storageChange - (yr.imported - yr.exported)
    };
  });
}
