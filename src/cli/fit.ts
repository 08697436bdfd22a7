/**
 * `lakeledger fit MODEL OBS.csv --params a,b,c [--scenario S] [--weights ID=W,...]
 *  [--max-iterations N] [--station NAME] [--out FILE]`:
 * fits the named parameters within their ranges to the monitoring data (engine/fit/), and
 * writes `lakeledger.fit/1` with the fitted values, the objective before and after, and the
 * goodness of fit per variable at the fitted values. Without --scenario the period runs from
 * the model's time origin to the last observation date (no measures, output every day).
 * Exit 0 when the fit ran (warnings on stderr), 1 when it failed (the run at the starting
 * values failed), 2 for bad usage or input: an unknown parameter, a parameter without a
 * range, a file that cannot be read, a CSV row that cannot be read (named by line), an
 * unknown variable.
 */
import { basename } from 'node:path';
import { validateModel, validateScenario, formatProblem, hasErrors, digestOf, ENGINE_VERSION, type ModelDoc, type ScenarioDoc } from '../lib/engine/index';
import { parseJson } from '../lib/engine/document/json';
import { SCENARIO_FORMAT } from '../lib/engine/document/types';
import { parseObservations, type ObservationSet } from '../lib/engine/fit/observations';
import { calibrate, type FitVariable } from '../lib/engine/fit/calibrate';
import { matchRun } from '../lib/engine/fit/match';
import { fitStatistics } from '../lib/engine/fit/statistics';
import { FitInputError } from '../lib/engine/fit/errors';
import type { Io } from './main';

export const FIT_FORMAT = 'lakeledger.fit/1';

export const FIT_USAGE = `  lakeledger fit MODEL OBS.csv --params A,B,... [--scenario S] [--weights ID=W,...]
                [--max-iterations N] [--station NAME] [--out FILE]
                                              fit parameters within their ranges to monitoring data
                                              (lakeledger.fit/1)`;

class UsageError extends Error {
  constructor(readonly lines: string[]) {
    super(lines.join('\n'));
  }
}

function readText(io: Io, file: string): string {
  try {
    return io.readFile(file);
  } catch (e) {
    const code = (e as { code?: string }).code;
    throw new UsageError([`error: ${file}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code ?? (e as Error).message})`]);
  }
}

function readDoc(io: Io, file: string): unknown {
  const r = parseJson(readText(io, file));
  if (!r.ok) throw new UsageError(r.problems.map((p) => `error: ${file}: ${p.path || '(document)'}: ${p.message} [${p.code}]`));
  return r.value;
}

const VALUE_OPTIONS = new Set(['params', 'scenario', 'out', 'weights', 'max-iterations', 'station']);

function parse(args: string[]): { positional: string[]; options: Map<string, string>; help: boolean } {
  const positional: string[] = [];
  const options = new Map<string, string>();
  let help = false;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const named = /^--([a-z-]+)(?:=(.*))?$/.exec(a);
    if (named && VALUE_OPTIONS.has(named[1])) {
      let v = named[2];
      if (v === undefined) {
        if (i + 1 >= args.length) throw new UsageError([`error: --${named[1]} needs a value`, 'usage:', FIT_USAGE]);
        v = args[++i];
      }
      options.set(named[1], v);
    } else if (a === '-o') {
      if (i + 1 >= args.length) throw new UsageError(['error: -o needs a file name', 'usage:', FIT_USAGE]);
      options.set('out', args[++i]);
    } else if (a === '--help' || a === '-h') help = true;
    else if (a.startsWith('-')) throw new UsageError([`error: unknown option '${a}'`, 'usage:', FIT_USAGE]);
    else positional.push(a);
  }
  return { positional, options, help };
}

/** The period a fit runs without a scenario: the model's time origin to the last observation. */
function fitScenario(model: ModelDoc, set: ObservationSet): ScenarioDoc {
  const start = typeof model.timeOrigin === 'string' ? model.timeOrigin : '2027-01-01';
  const last = set.points.reduce((m, p) => (p.date > m ? p.date : m), start);
  const end = last > start ? last : new Date(Date.parse(`${start}T00:00:00Z`) + 86400000).toISOString().slice(0, 10);
  return { format: SCENARIO_FORMAT, id: 'fit_period', title: 'Observation period (no measures)', model: model.id, period: { start, end, outputStep: 1 } } as ScenarioDoc;
}

export function runFitCommand(args: string[], io: Io): number {
  try {
    const { positional, options, help } = parse(args);
    if (help) {
      io.out(`usage:\n${FIT_USAGE}`);
      return 0;
    }
    const [modelFile, obsFile, ...extra] = positional;
    if (!modelFile || !obsFile || extra.length) throw new UsageError(['error: fit takes MODEL OBS.csv and --params', 'usage:', FIT_USAGE]);
    const paramsText = options.get('params');
    if (!paramsText) throw new UsageError(['error: fit needs --params (the parameters to fit, comma-separated, each with a range in the model)', 'usage:', FIT_USAGE]);
    const params = paramsText.split(',').map((s) => s.trim()).filter(Boolean);
    if (!params.length) throw new UsageError(['error: --params names no parameter']);

    const model = readDoc(io, modelFile);
    const mp = validateModel(model);
    for (const p of mp) io.err(formatProblem(p, modelFile));
    if (hasErrors(mp)) return 2;
    const md = model as ModelDoc;

    let scenario: ScenarioDoc | undefined;
    const scenarioFile = options.get('scenario');
    if (scenarioFile) {
      const s = readDoc(io, scenarioFile);
      const sp = validateScenario(s, md);
      for (const p of sp) io.err(formatProblem(p, scenarioFile));
      if (hasErrors(sp)) return 2;
      scenario = s as ScenarioDoc;
    }

    let maxIterations: number | undefined;
    if (options.has('max-iterations')) {
      const v = options.get('max-iterations')!;
      maxIterations = Number(v);
      if (!Number.isInteger(maxIterations) || maxIterations < 1 || maxIterations > 1000) throw new UsageError([`error: --max-iterations must be a whole number from 1 to 1000, got '${v}'`]);
    }
    const weights = new Map<string, number>();
    for (const part of (options.get('weights') ?? '').split(',').filter((s) => s.trim())) {
      const m = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(.+?)\s*$/.exec(part);
      const w = m ? Number(m[2]) : NaN;
      if (!m || !Number.isFinite(w) || w < 0) throw new UsageError([`error: --weights: '${part}' is not ID=WEIGHT with a weight ≥ 0 (e.g. --weights Chl=2,TP=1)`]);
      weights.set(m[1], w);
    }

    const set = parseObservations(readText(io, obsFile), md, options.has('station') ? { combine: 'station', station: options.get('station') } : {});
    // A row without a measurement (empty, NA, -) is reported and left out; any other row
    // that cannot be read stops the command: it would change the fit unseen.
    const missing = set.problems.filter((p) => p.code === 'missing_value');
    const blocking = set.problems.filter((p) => p.code !== 'missing_value');
    for (const p of missing) io.err(`warning: ${obsFile}: line ${p.line}: ${p.message}; the row is left out [${p.code}]`);
    if (blocking.length) {
      for (const p of blocking) io.err(`error: ${obsFile}: line ${p.line}: ${p.message} [${p.code}]`);
      io.err(`error: ${obsFile}: ${blocking.length} rows cannot be used; nothing was fitted`);
      return 2;
    }
    if (!set.points.length) throw new UsageError([`error: ${obsFile}: no observations`]);
    for (const id of weights.keys()) {
      if (!set.variables[id]) throw new UsageError([`error: --weights: no observations of '${id}' in ${obsFile} (variables: ${Object.keys(set.variables).join(', ')})`]);
    }
    const sc = scenario ?? fitScenario(md, set);
    const variables: FitVariable[] = Object.keys(set.variables).map((id) => ({ id, weight: weights.get(id) ?? 1 }));

    let result;
    try {
      result = calibrate(md, sc, set, {
        parameters: params,
        variables,
        maxIterations,
        onProgress: ({ iteration, evaluations, objective }) => io.err(`fit: iteration ${iteration}, ${evaluations} runs, objective ${fmt(objective)}`)
      });
    } catch (e) {
      if (e instanceof FitInputError) throw new UsageError([`error: ${e.code === 'unknown_variable' || e.code === 'no_observations' ? obsFile : modelFile}: ${e.message} [${e.code}]`]);
      throw e;
    }
    for (const w of result.warnings) io.err(`warning: ${w.message} [${w.code}]`);
    if (result.status !== 'ok' || !result.run) {
      io.err(`error: the fit ${result.status}: ${result.error?.message ?? ''} [${result.error?.code ?? result.status}]`);
      return 1;
    }

    const logVariables = Object.entries(result.variables).filter(([, v]) => v.residual === 'log').map(([id]) => id);
    const stats = fitStatistics(matchRun(set, result.run), { logVariables });
    const statistics = Object.fromEntries(Object.entries(stats).map(([id, s]) => [id, { ...s.all, growing: s.growing, rest: s.rest, outside: s.outside }]));
    const doc = {
      format: FIT_FORMAT,
      model: md.id,
      modelDigest: digestOf(md),
      scenario: sc.id,
      period: { start: sc.period.start, end: sc.period.end },
      observations: { file: basename(obsFile), rows: set.rows, used: set.used, points: set.points.length, combine: set.combine },
      engine: ENGINE_VERSION,
      params: result.parameters,
      initial: result.initial,
      ranges: result.ranges,
      variables: result.variables,
      objective: result.objective,
      path: result.path,
      iterations: result.iterations,
      evaluations: result.evaluations,
      converged: result.converged,
      intervals: result.intervals ?? {},
      statistics,
      warnings: result.warnings
    };
    const text = JSON.stringify(doc, null, 1) + '\n';
    const out = options.get('out');
    if (out) io.writeFile(out, text);
    else io.out(text);
    io.err(
      `ok: fitted ${params.join(', ')} in ${result.iterations} iterations (${result.evaluations} runs): objective ${fmt(result.objective.before)} → ${fmt(result.objective.after)}; ${Object.entries(result.parameters).map(([k, v]) => `${k} = ${fmt(v)}`).join(', ')}`
    );
    return 0;
  } catch (e) {
    if (e instanceof UsageError) {
      for (const l of e.lines) io.err(l);
      return 2;
    }
    io.err(`error: internal error: ${(e as Error).message} (please report)`);
    return 2;
  }
}

const fmt = (x: number) => String(Number(x.toPrecision(5)));
