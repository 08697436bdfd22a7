/**
 * What the Long run screen offers for a model, as pure functions: the quantities a sweep
 * can vary (parameters by value, forcings as a scale factor), the series an indicator can
 * be (states and reported derived quantities, the chlorophyll role first), the default
 * target (a parameter read by an external-load flow) and default ranges.
 */
import type { ModelDoc } from '$lib/engine/document/types';

export interface Choice {
  id: string;
  kind: 'parameter' | 'forcing' | 'state' | 'derived';
  label: string;
  unit: string;
  /** A parameter's value (default range around it). */
  value?: number;
  role?: string;
}

export function targetChoices(model: ModelDoc): Choice[] {
  const sizes = new Set(model.states.map((s) => s.size).filter((x): x is string => typeof x === 'string'));
  return [
    ...model.parameters.filter((p) => !sizes.has(p.id)).map((p) => ({ id: p.id, kind: 'parameter' as const, label: p.label ?? p.id, unit: p.unit ?? '', value: p.value })),
    ...(model.forcings ?? []).map((f) => ({ id: f.id, kind: 'forcing' as const, label: f.label ?? f.id, unit: f.unit ?? '' }))
  ];
}

export function indicatorChoices(model: ModelDoc): Choice[] {
  const derived = (model.derived ?? []).filter((d) => d.report).map((d) => ({ id: d.id, kind: 'derived' as const, label: d.label ?? d.id, unit: d.unit ?? '', role: d.role }));
  derived.sort((a, b) => Number(b.role === 'chlorophyll') - Number(a.role === 'chlorophyll'));
  return [...derived, ...model.states.map((s) => ({ id: s.id, kind: 'state' as const, label: s.label ?? s.id, unit: s.unit ?? '' }))];
}

/** The indicator by the role `chlorophyll`, else the first reported quantity, else the first state. */
export function defaultIndicator(model: ModelDoc): string {
  return indicatorChoices(model)[0]?.id ?? '';
}

/** The first parameter that an external-load flow's rate names, in the order written, else the first parameter. */
export function defaultTarget(model: ModelDoc): string {
  const params = new Set(targetChoices(model).filter((c) => c.kind === 'parameter').map((c) => c.id));
  for (const f of model.flows.filter((x) => x.role === 'externalLoad')) {
    const hit = (String(f.rate).match(/[A-Za-z_][A-Za-z0-9_]*/g) ?? []).find((id) => params.has(id));
    if (hit) return hit;
  }
  return [...params][0] ?? '';
}

/** From half to one and a half times the value (a forcing: factors 0.5 to 1.5). */
export function defaultRange(choice: Choice | undefined): { from: number; to: number } {
  if (!choice || choice.kind === 'forcing' || !choice.value) return { from: 0.5, to: 1.5 };
  const tidy = (x: number) => Number(x.toPrecision(3));
  return { from: tidy(choice.value * 0.5), to: tidy(choice.value * 1.5) };
}
