/**
 * `lakeledger morris MODEL SCENARIO --indicator ID [--trajectories R] [--levels P] [--seed S] [--out FILE]`:
 * Morris elementary-effects screening of the model's ranged inputs under one scenario
 * (engine/uncertainty/morris-model.ts), one thread; writes `lakeledger.morris/1` with the
 * inputs ranked by μ*. Exit 0 every run ran and closed; 1 some runs failed or did not
 * close (their effects are left out and counted; the file is still written); 2 bad usage
 * or input.
 */
import { validateModel, validateScenario, formatProblem, hasErrors, type ModelDoc, type ScenarioDoc } from '../lib/engine/index';
import { morrisOfModel } from '../lib/engine/uncertainty/morris-model';
import { UncertaintyInputError } from '../lib/engine/uncertainty/errors';
import { UsageError, readDoc, wholeOption } from './ensemble';
import type { Io } from './main';

export const MORRIS_USAGE = `  lakeledger morris MODEL SCENARIO --indicator ID [--trajectories R] [--levels P] [--seed S] [--out FILE]
                                              Morris screening of the ranged inputs (lakeledger.morris/1);
                                              ID a state or reported series, its last-five-year mean`;

export function morrisCommand(io: Io, files: string[], options: Map<string, string>, out: string | undefined): number {
  try {
    const [modelFile, scenarioFile, ...more] = files;
    if (!modelFile || !scenarioFile || more.length) throw new UsageError(['error: morris takes MODEL SCENARIO --indicator ID [--trajectories R] [--levels P] [--seed S] [--out FILE]']);
    const indicator = options.get('indicator');
    if (!indicator) throw new UsageError(['error: morris needs --indicator ID (a state or reported series)']);
    const r = options.has('trajectories') ? wholeOption(options, 'trajectories', 'trajectories', 2, 1000) : 10;
    const levels = options.has('levels') ? wholeOption(options, 'levels', 'grid levels (even)', 2, 100) : 4;
    const seed = options.has('seed') ? wholeOption(options, 'seed', 'a whole number that fixes the design', 0, 0xffffffff) : 1;
    const model = readDoc(io, modelFile);
    const mp = validateModel(model);
    for (const p of mp) io.err(formatProblem(p, modelFile));
    if (hasErrors(mp)) throw new UsageError([]);
    const scenario = readDoc(io, scenarioFile);
    const sp = validateScenario(scenario, model as ModelDoc);
    for (const p of sp) io.err(formatProblem(p, scenarioFile));
    if (hasErrors(sp)) throw new UsageError([]);
    let doc;
    try {
      doc = morrisOfModel(model as ModelDoc, scenario as ScenarioDoc, {
        indicator,
        trajectories: r,
        levels,
        seed,
        onProgress: ({ done, total }) => io.err(`morris: ${done} of ${total} trajectories`)
      });
    } catch (e) {
      if (e instanceof UncertaintyInputError) throw new UsageError([`error: ${modelFile}: ${e.message} [${e.code}]`]);
      throw e;
    }
    const text = JSON.stringify(doc, null, 1) + '\n';
    if (out) io.writeFile(out, text);
    else io.out(text);
    const top = doc.inputs.slice(0, 5).map((i) => `${i.id} ${i.muStar === null ? '–' : Number(i.muStar.toPrecision(3))}`).join(', ');
    if (doc.failedRuns) io.err(`error: ${doc.failedRuns} of ${doc.evaluations} runs failed or did not close; their elementary effects are left out (see "used" per input)`);
    io.err(`${doc.failedRuns ? 'error' : 'ok'}: ${doc.trajectories} trajectories, ${doc.evaluations} runs; largest mu* for ${indicator}: ${top}${out ? `; wrote ${out}` : ''}`);
    return doc.failedRuns ? 1 : 0;
  } catch (e) {
    if (e instanceof UsageError) {
      for (const l of e.lines) io.err(l);
      return 2;
    }
    throw e;
  }
}
