/**
 * What the Runs screen runs and charts, as pure functions: the scenario for a model (the
 * shipped baseline for an example that has one, else the engine's default baseline) and the
 * two series to chart (chlorophyll and total P by role; for a model without a chlorophyll
 * role, its first reported quantities, then its states).
 */
import { defaultScenario } from '$lib/engine/simulate';
import type { ModelDoc, RunDoc, ScenarioDoc } from '$lib/engine/document/types';
import { seriesByRole } from '$lib/ui/series-by-role';

/** The scenario a model's baseline run uses. */
export function baselineFor(model: ModelDoc, shipped: Readonly<Record<string, ScenarioDoc>>): ScenarioDoc {
  const s = shipped[model.id];
  return s && s.model === model.id ? s : defaultScenario(model);
}

export interface ChartPick {
  /** The series id in the run. */
  id: string;
  /** The role it was found by, when it was. */
  role?: string;
  title: string;
  unit: string;
  values: number[];
}

/** Roles charted first, in this order. */
export const CHART_ROLES = ['chlorophyll', 'totalP'] as const;

/** Up to `count` series to chart for a finished run. */
export function chartPicks(model: ModelDoc, run: RunDoc, count = 2): ChartPick[] {
  const picks: ChartPick[] = [];
  const byRole = CHART_ROLES.map((role) => ({ role, found: seriesByRole(model, run, role) }));
  if (byRole[0].found) {
    for (const { role, found } of byRole) {
      if (found && picks.length < count) picks.push({ id: found.id, role, title: found.label, unit: found.unit, values: found.values });
    }
  }
  const candidates = [
    ...(model.derived ?? []).filter((d) => d.report).map((d) => ({ id: d.id, label: d.label, unit: d.unit })),
    ...model.states.map((s) => ({ id: s.id, label: s.label, unit: s.unit }))
  ];
  for (const c of candidates) {
    if (picks.length >= count) break;
    if (picks.some((p) => p.id === c.id)) continue;
    const values = run.series[c.id];
    if (!values) continue;
    picks.push({ id: c.id, title: c.label ?? c.id, unit: run.units[c.id] ?? c.unit, values });
  }
  return picks;
}
