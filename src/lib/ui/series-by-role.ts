/**
 * Finding a run's series by what it means (`role` on the model's derived quantities),
 * never by a hard-coded id: another model may call its chlorophyll `CHLa`.
 */
import type { ModelDoc, RunDoc } from '$lib/engine/document/types';

export interface RoleSeries {
  id: string;
  /** The model's label, else the id. */
  label: string;
  /** As the model writes it. */
  unit: string;
  values: number[];
}

/** The series of the first reported derived quantity with `role`, or null when the run has none. */
export function seriesByRole(model: ModelDoc, run: RunDoc, role: string): RoleSeries | null {
  for (const d of model.derived ?? []) {
    if (d.role !== role) continue;
    const values = run.series[d.id];
    if (!values) continue;
    return { id: d.id, label: d.label ?? d.id, unit: run.units[d.id] ?? d.unit, values };
  }
  return null;
}
