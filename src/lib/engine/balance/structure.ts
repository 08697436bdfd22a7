/**
 * Structural findings: what the shape of a valid model says before anything is run.
 * None of them makes a model invalid (validation has already passed); each points at
 * something a modeller usually did not mean, or says what kind of system it is.
 *
 * Codes (stable; tests check codes, not wording):
 *   state_no_flows       a state no flow enters or leaves: it keeps its initial value
 *   state_drains_only    a conserved state that flows only leave: it can only lose mass
 *   state_unreachable    (open models) a conserved state no chain of flows leads to from an import
 *   parameter_unused     a parameter no expression or size reads
 *   forcing_unused       a forcing no expression reads
 *   derived_unused       a derived quantity no expression reads and that is not reported
 *   model_closed         (info) no flow crosses the boundary: the total stays constant
 *   model_export_only    (info) mass leaves across the boundary and none comes in
 *   model_import_only    (info) mass comes in across the boundary and none leaves
 *
 * "Uses" are direct: a parameter read only by an unused derived quantity counts as used,
 * and the derived quantity is the finding. Flow directions are taken as written (a rate
 * may turn negative in a run; structure cannot know).
 */
import type { ModelDoc } from '../document/types';
import { analyzeModel, type AnalyzedModel } from '../document/validate-model';
import { ModelInvalidError } from '../compile/errors';
import { symbolsOf } from '../expr/ir';

export type FindingCode =
  | 'state_no_flows'
  | 'state_drains_only'
  | 'state_unreachable'
  | 'parameter_unused'
  | 'forcing_unused'
  | 'derived_unused'
  | 'model_closed'
  | 'model_export_only'
  | 'model_import_only';

export interface StructureFinding {
  code: FindingCode;
  /** `warning`: probably not meant; `info`: what kind of system this is. */
  level: 'warning' | 'info';
  /** The item's id; the model's id for whole-model findings. */
  id: string;
  /** JSON path of the item in the model document (`states[4]`); '' for the whole model. */
  path: string;
  /** Words a modeller understands. */
  message: string;
}

const quote = (s: string) => `\`${s}\``;

function list(ids: string[], max = 6): string {
  const shown = ids.slice(0, max).map(quote);
  return ids.length > max ? `${shown.join(', ')} and ${ids.length - max} more` : shown.join(ids.length === 2 ? ' and ' : ', ');
}

const plural = (n: number, one: string, many: string) => (n === 1 ? one : many);

export function structureFindings(model: ModelDoc | AnalyzedModel): StructureFinding[] {
  let a: AnalyzedModel;
  if ('kinds' in model) a = model;
  else {
    const r = analyzeModel(model);
    if (!r.model) throw new ModelInvalidError(r.problems);
    a = r.model;
  }
  const doc = a.doc;
  const element = doc.conserved.element;
  const pathOf = (section: 'states' | 'parameters' | 'forcings' | 'derived', id: string) => {
    const items = (doc[section] ?? []) as { id: string }[];
    return `${section}[${items.findIndex((x) => x.id === id)}]`;
  };
  const out: StructureFinding[] = [];

  // ---- states
  const ins = a.states.map(() => [] as string[]);
  const outs = a.states.map(() => [] as string[]);
  for (const f of a.flows) {
    if (f.from !== undefined) outs[f.from].push(f.id);
    if (f.to !== undefined) ins[f.to].push(f.id);
  }
  for (const s of a.states) {
    const i = s.index;
    if (!ins[i].length && !outs[i].length) {
      out.push({
        code: 'state_no_flows',
        level: 'warning',
        id: s.id,
        path: pathOf('states', s.id),
        message: `state ${quote(s.id)} has no flows: nothing enters or leaves it, so it keeps its initial value`
      });
    } else if (s.conserved && !ins[i].length) {
      const n = outs[i].length;
      out.push({
        code: 'state_drains_only',
        level: 'warning',
        id: s.id,
        path: pathOf('states', s.id),
        message:
          `state ${quote(s.id)} drains only: ${plural(n, 'flow', 'flows')} ${list(outs[i])} ${plural(n, 'takes', 'take')} ${element} out ` +
          `and no flow brings any in, so it can only lose mass until it is empty`
      });
    }
  }

  // ---- boundary: imports and exports of conserved mass
  const imports = a.flows.filter((f) => f.from === undefined && a.states[f.basis].conserved);
  const exports = a.flows.filter((f) => f.to === undefined && a.states[f.basis].conserved);
  if (imports.length) {
    // Breadth-first along the flows' directions from every state an import enters.
    const reached = new Set<number>(imports.map((f) => f.to as number));
    const queue = [...reached];
    while (queue.length) {
      const x = queue.shift() as number;
      for (const f of a.flows) {
        if (f.from === x && f.to !== undefined && !reached.has(f.to)) {
          reached.add(f.to);
          queue.push(f.to);
        }
      }
    }
    for (const s of a.states) {
      if (!s.conserved || reached.has(s.index) || (!ins[s.index].length && !outs[s.index].length)) continue;
      out.push({
        code: 'state_unreachable',
        level: 'warning',
        id: s.id,
        path: pathOf('states', s.id),
        message:
          `state ${quote(s.id)} cannot be reached from any import: no chain of flows leads to it from ` +
          `${list(imports.map((f) => f.id))}, so ${element} that enters the lake never arrives there`
      });
    }
  }

  // ---- symbols nobody reads
  const read = new Set<string>();
  for (const f of a.flows) symbolsOf(f.ir, read);
  for (const d of a.derived) symbolsOf(d.ir, read);
  for (const f of a.forcings) if (f.ir) symbolsOf(f.ir, read);
  const readBySize = new Set<string>();
  for (const s of a.states) symbolsOf(s.sizeIr, readBySize);

  for (const p of a.parameters) {
    if (read.has(p.id) || readBySize.has(p.id)) continue;
    out.push({
      code: 'parameter_unused',
      level: 'warning',
      id: p.id,
      path: pathOf('parameters', p.id),
      message: `parameter ${quote(p.id)} is not used: no rate, derived quantity, forcing or size reads it`
    });
  }
  for (const f of a.forcings) {
    if (read.has(f.id)) continue;
    out.push({
      code: 'forcing_unused',
      level: 'warning',
      id: f.id,
      path: pathOf('forcings', f.id),
      message: `forcing ${quote(f.id)} is not used: no rate or derived quantity reads it`
    });
  }
  for (const d of doc.derived ?? []) {
    const ad = a.derived.find((x) => x.id === d.id);
    if (!ad || ad.report || read.has(d.id)) continue;
    out.push({
      code: 'derived_unused',
      level: 'warning',
      id: d.id,
      path: pathOf('derived', d.id),
      message: `derived quantity ${quote(d.id)} is not used: no rate or other derived quantity reads it, and it is not reported (set "report": true to record it in runs)`
    });
  }

  // ---- the whole model
  const whole = (code: FindingCode, message: string) => out.push({ code, level: 'info', id: doc.id, path: '', message });
  if (!imports.length && !exports.length) {
    whole('model_closed', `the model is closed: no flow crosses the boundary, so the total ${element} stays constant`);
  } else if (!imports.length) {
    whole(
      'model_export_only',
      `the model only exports: ${list(exports.map((f) => f.id))} ${plural(exports.length, 'carries', 'carry')} ${element} out and no flow brings any in, so the total ${element} can only fall`
    );
  } else if (!exports.length) {
    whole(
      'model_import_only',
      `the model only imports: ${list(imports.map((f) => f.id))} ${plural(imports.length, 'brings', 'bring')} ${element} in and no flow carries any out, so the total ${element} can only rise`
    );
  }
  return out;
}
