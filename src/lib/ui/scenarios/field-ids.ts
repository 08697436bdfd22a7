/**
 * Where a problem of a scenario draft is shown: its JSON path (`measures[2].fraction`)
 * maps to the id of one control (`sc-measures-2-fraction`); a cost's path maps to the cost
 * fields of the measure it belongs to. Summary entries say the place in words.
 */
import type { Problem } from '$lib/engine/document/types';
import { measureIdAt } from './scenario-edits';

export const FIELD_PREFIX = 'sc-';

/** `measures[2].repeat.count` → `sc-measures-2-repeat-count`. */
export function pathId(path: string): string {
  return FIELD_PREFIX + (path === '' ? 'doc' : path.replace(/\[(\d+)\]/g, '-$1').replace(/\./g, '-'));
}

/** Control id for a measure's field. */
export const measureFieldId = (index: number, field: string) => pathId(`measures[${index}].${field}`);
/** Control id for a measure's cost field. */
export const costFieldId = (index: number, field: 'amount' | 'currency' | 'note') => `${FIELD_PREFIX}measures-${index}-cost-${field}`;

/** The control a problem belongs to (costs go to their measure's cost fields). */
export function problemFieldId(path: string, draft: unknown): string {
  const cost = /^costs\[(\d+)\](?:\.(\w+))?$/.exec(path);
  if (cost) {
    const d = draft as { costs?: { measure?: unknown }[]; measures?: unknown[] } | null;
    const measure = d?.costs?.[Number(cost[1])]?.measure;
    const n = Array.isArray(d?.measures) ? d!.measures!.length : 0;
    for (let i = 0; i < n; i++) {
      if (measureIdAt(draft, i) === measure) {
        const f = cost[2] === 'currency' || cost[2] === 'note' ? cost[2] : 'amount';
        return costFieldId(i, f);
      }
    }
    return pathId(path);
  }
  return pathId(path);
}

/** Control ids with their problems. */
export function problemsByField(problems: readonly Problem[], draft: unknown): Map<string, Problem[]> {
  const out = new Map<string, Problem[]>();
  for (const p of problems) {
    const id = problemFieldId(p.path, draft);
    (out.get(id) ?? out.set(id, []).get(id)!).push(p);
  }
  return out;
}

const FIELD_WORDS: Record<string, string> = {
  id: 'id',
  title: 'title',
  model: 'model',
  'period.start': 'period start',
  'period.end': 'period end',
  'period.outputStep': 'output step',
  period: 'period',
  initialState: 'initial state',
  'solver.method': 'solver method',
  'solver.rtol': 'relative tolerance',
  'solver.atol': 'absolute tolerance',
  'solver.maxStep': 'largest step',
  'solver.maxSteps': 'most steps',
  solver: 'solver',
  notes: 'notes',
  format: 'format',
  measures: 'measures',
  costs: 'costs'
};

/** The place of a problem in words: `measure fishOut (2), fraction`. */
export function placeWords(path: string, draft: unknown): string {
  const m = /^measures\[(\d+)\](?:\.(.+))?$/.exec(path);
  if (m) {
    const i = Number(m[1]);
    return `measure ${measureIdAt(draft, i)} (${i + 1})${m[2] ? `, ${m[2].replace(/\./g, ' ')}` : ''}`;
  }
  const c = /^costs\[(\d+)\](?:\.(.+))?$/.exec(path);
  if (c) {
    const measure = (draft as { costs?: { measure?: unknown }[] } | null)?.costs?.[Number(c[1])]?.measure;
    return `cost of ${typeof measure === 'string' ? measure : `entry ${Number(c[1]) + 1}`}${c[2] ? `, ${c[2]}` : ''}`;
  }
  return FIELD_WORDS[path] ?? (path || 'the document');
}
