/**
 * Turns "run these scenarios" into run plans from saved revisions: the model's draft and
 * each scenario's draft become revisions first (so every run names the exact versions it
 * used), and a scenario that cannot be saved is refused with its problems, in words.
 */
import type { ModelDoc } from '$lib/engine/document/types';
import type { CommitResult, ScenarioLibrary } from '$lib/storage/types';
import type { RunPlan } from './run-queue.svelte';

export interface Refusal {
  /** Scenario key, or '' for the model itself. */
  key: string;
  title: string;
  message: string;
}

function problemWords(problems: { severity: string; path: string; message: string }[]): string {
  const errors = problems.filter((p) => p.severity === 'error');
  const first = errors[0];
  const more = errors.length > 1 ? ` (and ${errors.length - 1} more)` : '';
  return first ? `${first.path ? `${first.path}: ` : ''}${first.message}${more}` : 'it has problems';
}

export async function planRuns(
  commitModel: () => Promise<CommitResult>,
  modelKey: string,
  scenarios: ScenarioLibrary,
  scenarioKeys: readonly string[]
): Promise<{ plans: RunPlan[]; refusals: Refusal[] }> {
  const m = await commitModel();
  if (!m.ok) return { plans: [], refusals: [{ key: '', title: 'the model', message: `the model's draft cannot be saved as a revision: ${problemWords(m.problems)}` }] };
  const model: ModelDoc = m.revision.doc;
  const plans: RunPlan[] = [];
  const refusals: Refusal[] = [];
  for (const key of scenarioKeys) {
    const entry = await scenarios.get(key);
    if (!entry) {
      refusals.push({ key, title: key, message: 'this scenario is no longer in the library' });
      continue;
    }
    const r = await scenarios.commit(key, model, 'run');
    if (!r.ok) {
      refusals.push({ key, title: entry.title, message: `cannot run: ${problemWords(r.problems)}` });
      continue;
    }
    plans.push({
      model,
      scenario: r.revision.doc,
      title: typeof r.revision.doc.title === 'string' && r.revision.doc.title.trim() ? r.revision.doc.title : r.revision.doc.id,
      modelKey,
      modelRevision: m.revision.number,
      scenarioKey: key,
      scenarioRevision: r.revision.number
    });
  }
  return { plans, refusals };
}
