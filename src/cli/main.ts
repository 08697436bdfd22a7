/**
 * The command line over the engine (argv → engine → JSON), for batch work.
 *   npm run cli -- validate MODEL [SCENARIO]
 *   npm run cli -- equations MODEL
 *   npm run cli -- run MODEL [SCENARIO] [--out FILE]
 * Exit codes, for every command now and later: 0 all is well; 1 a check failed (a run
 * failed or its closure fell outside tolerance); 2 invalid input or usage, with every
 * problem on stderr, one a line, with file and path, and never a stack trace.
 */
import { readFileSync, writeFileSync, renameSync, unlinkSync } from 'node:fs';
import { basename } from 'node:path';
import { gzipSync, gunzipSync } from 'node:zlib';
import {
  validateModel,
  validateScenario,
  massBalances,
  simulate,
  formatProblem,
  hasErrors,
  type ModelDoc,
  type Problem,
  type ScenarioDoc
} from '../lib/engine/index';
import { parseJson } from '../lib/engine/document/json';
import { ENGINE_VERSION, digestOf, sweep, SweepInputError } from '../lib/engine/index';
import { buildBundle, verifyBundle, type Bundle } from '../lib/archive/bundle';
import { appendEntry, type LogEntry } from '../lib/archive/log';
import { recordDigest } from '../lib/archive/record';
import { reproduceRun } from '../lib/archive/reproduce';
import { ensembleCommand, ENSEMBLE_USAGE } from './ensemble';
import { runFitCommand, FIT_USAGE } from './fit';
import { morrisCommand, MORRIS_USAGE } from './morris';

export const EXIT_OK = 0;
export const EXIT_CHECK_FAILED = 1;
export const EXIT_INVALID = 2;

const USAGE = `usage:
  lakeledger validate MODEL [SCENARIO]        check documents; problems on stderr
  lakeledger equations MODEL                  print each state's mass balance
  lakeledger run MODEL [SCENARIO] [--out FILE]   run; the run document as JSON
  lakeledger archive MODEL SCENARIO... --out BUNDLE [--by LABEL]
                                              run each scenario; write a gzip bundle with the log
  lakeledger verify BUNDLE                    recheck every digest and the log's chain
  lakeledger reproduce BUNDLE RUN_ID          rerun an archived run and compare
  lakeledger sweep MODEL --target NAME --from A --to B --steps N --indicator ID
                   [--start-low ID=V,...] [--start-high ID=V,...] [--separation F] [--out FILE]
                                              long-run states over a range, from a low and a high start
${ENSEMBLE_USAGE}
${MORRIS_USAGE}
${FIT_USAGE}
exit codes: 0 ok, 1 a check failed (run failed, closure outside tolerance, a digest or
the chain broken, a reproduction that differs), 2 invalid input or usage`;

export interface Io {
  out(text: string): void;
  err(text: string): void;
  readFile(path: string): string;
  writeFile(path: string, text: string): void;
  /** Bytes, for bundles (gzip). Optional so that older in-memory test Ios still work. */
  readBytes?(path: string): Uint8Array;
  writeBytes?(path: string, bytes: Uint8Array): void;
  gzip?(bytes: Uint8Array): Uint8Array;
  gunzip?(bytes: Uint8Array): Uint8Array;
  /** The runtime, for reproduce reports (e.g. `node v20.20.2`). */
  runtime?: string;
  /** The user's label for the log (LAKELEDGER_USER), when --by is not given. */
  user?: string;
  now(): Date;
  clock(): number;
}

class InputError extends Error {
  constructor(readonly lines: string[]) {
    super(lines.join('\n'));
  }
}

function readDoc(io: Io, file: string): unknown {
  let text: string;
  try {
    text = io.readFile(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError([`error: ${file}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code ?? (e as Error).message})`]);
  }
  const r = parseJson(text);
  if (!r.ok) throw new InputError(r.problems.map((p) => `error: ${file}: ${p.path || '(document)'}: ${p.message} [${p.code}]`));
  return r.value;
}

function report(io: Io, problems: Problem[], file: string): void {
  for (const p of problems) io.err(formatProblem(p, file));
}

/** Options that take a value, besides --out and --by (the sweep's). */
const VALUE_OPTIONS = new Set(['target', 'from', 'to', 'steps', 'indicator', 'start-low', 'start-high', 'separation', 'n', 'seed', 'threads', 'meet', 'trajectories', 'levels']);

function parseArgs(argv: string[]): { command?: string; positional: string[]; out?: string; by?: string; options: Map<string, string>; help: boolean } {
  const positional: string[] = [];
  const options = new Map<string, string>();
  let out: string | undefined;
  let by: string | undefined;
  let help = false;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const named = /^--([a-z-]+)(?:=(.*))?$/.exec(a);
    if (named && VALUE_OPTIONS.has(named[1])) {
      let v = named[2];
      if (v === undefined) {
        if (i + 1 >= argv.length) throw new InputError([`error: --${named[1]} needs a value`, USAGE]);
        v = argv[++i];
      }
      options.set(named[1], v);
      continue;
    }
    if (a === '--out' || a === '-o') {
      if (i + 1 >= argv.length) throw new InputError(['error: --out needs a file name', USAGE]);
      out = argv[++i];
    } else if (a.startsWith('--out=')) out = a.slice(6);
    else if (a === '--by') {
      if (i + 1 >= argv.length) throw new InputError(['error: --by needs a label (who is archiving)', USAGE]);
      by = argv[++i];
    } else if (a.startsWith('--by=')) by = a.slice(5);
    else if (a === '--help' || a === '-h') help = true;
    else if (a.startsWith('-')) throw new InputError([`error: unknown option '${a}'`, USAGE]);
    else positional.push(a);
  }
  return { command: positional.shift(), positional, out, by, options, help };
}

/** Loads and validates MODEL [SCENARIO]; problems go to stderr; errors throw InputError. */
function load(io: Io, modelFile: string, scenarioFile?: string): { model: ModelDoc; scenario?: ScenarioDoc } {
  const model = readDoc(io, modelFile);
  const mp = validateModel(model);
  report(io, mp, modelFile);
  if (hasErrors(mp)) throw new InputError([]);
  let scenario: ScenarioDoc | undefined;
  if (scenarioFile) {
    const s = readDoc(io, scenarioFile);
    const sp = validateScenario(s, model as ModelDoc);
    report(io, sp, scenarioFile);
    if (hasErrors(sp)) throw new InputError([]);
    scenario = s as ScenarioDoc;
  }
  return { model: model as ModelDoc, scenario };
}

export function main(argv: string[], io: Io): number {
  try {
    // fit has options of its own (--params, --scenario) and parses them itself.
    if (argv[0] === 'fit') return runFitCommand(argv.slice(1), io);
    const args = parseArgs(argv);
    if (args.help || !args.command) {
      (args.help ? io.out : io.err)(USAGE);
      return args.help ? EXIT_OK : EXIT_INVALID;
    }
    const [a, b, ...rest] = args.positional;
    switch (args.command) {
      case 'validate': {
        if (!a || rest.length) throw new InputError(['error: validate takes MODEL [SCENARIO]', USAGE]);
        load(io, a, b);
        io.err(`ok: ${[a, b].filter(Boolean).map((f) => basename(f!)).join(' and ')} valid`);
        return EXIT_OK;
      }
      case 'equations': {
        if (!a || b) throw new InputError(['error: equations takes MODEL', USAGE]);
        const { model } = load(io, a);
        const mb = massBalances(model);
        io.out(`Mass balances of ${model.id} (${mb.element}, ${mb.unit}); each rate is in its basis state's unit per day`);
        for (const s of mb.states) io.out(`  ${s.equation}    [${s.unit}/d]${s.conserved ? '' : '  (not conserved)'}`);
        io.out(`Whole system: ${mb.identity}`);
        return EXIT_OK;
      }
      case 'run': {
        if (!a || rest.length) throw new InputError(['error: run takes MODEL [SCENARIO] [--out FILE]', USAGE]);
        const { model, scenario } = load(io, a, b);
        const run = simulate(model, scenario, { now: io.now, clock: io.clock });
        const text = JSON.stringify(run, null, 1) + '\n';
        if (args.out) io.writeFile(args.out, text);
        else io.out(text);
        for (const w of run.warnings) io.err(`warning: ${w.message} [${w.code}]`);
        if (run.status !== 'ok') {
          io.err(`error: the run ${run.status}: ${run.error?.message ?? ''} [${run.error?.code ?? run.status}]`);
          return EXIT_CHECK_FAILED;
        }
        const c = run.closure;
        io.err(
          `${c.ok ? 'ok' : 'error'}: ${run.scenario} ran ${run.times.length} outputs with ${run.solver.method}${run.solver.switchedAt !== null ? ` (switched on day ${run.solver.switchedAt.toFixed(2)})` : ''}, ${run.solver.steps} steps; mass ${c.ok ? 'closed' : 'NOT closed'}: residual ${c.relativeResidual.toExponential(2)} of throughput (tolerance ${c.tolerance})`
        );
        return c.ok ? EXIT_OK : EXIT_CHECK_FAILED;
      }
      case 'archive':
        return archive(io, args.positional, args.out, args.by ?? io.user ?? 'command line');
      case 'sweep':
        return sweepCommand(io, args.positional, args.options, args.out);
      case 'ensemble':
        return ensembleCommand(io, args.positional, args.options, args.out);
      case 'morris':
        return morrisCommand(io, args.positional, args.options, args.out);
      case 'verify': {
        if (!a || b) throw new InputError(['error: verify takes BUNDLE', USAGE]);
        const bundle = readBundle(io, a);
        const findings = verifyBundle(bundle);
        for (const f of findings) io.err(`error: ${a}: ${f.kind ? `${f.kind}${f.id ? ` ${f.id}` : ''}: ` : ''}${f.message} [${f.code}]`);
        if (findings.some((f) => f.code === 'not_a_bundle' || f.code === 'missing_part')) return EXIT_INVALID;
        if (findings.length) return EXIT_CHECK_FAILED;
        const bb = bundle as Bundle;
        io.err(`ok: ${basename(a)}: ${bb.models.length} models, ${bb.scenarios.length} scenarios, ${bb.runs.length} runs and ${bb.log.length} log entries; every digest and the chain hold (head ${bb.log.at(-1)?.digest ?? 'none'})`);
        return EXIT_OK;
      }
      case 'reproduce': {
        if (!a || !b || rest.length) throw new InputError(['error: reproduce takes BUNDLE RUN_ID', USAGE]);
        const bundle = readBundle(io, a);
        const findings = verifyBundle(bundle);
        if (findings.length) {
          for (const f of findings) io.err(`error: ${a}: ${f.message} [${f.code}]`);
          io.err('error: the bundle does not verify; nothing was reproduced');
          return findings.some((f) => f.code === 'not_a_bundle' || f.code === 'missing_part') ? EXIT_INVALID : EXIT_CHECK_FAILED;
        }
        const bb = bundle as Bundle;
        if (!bb.runs.some((r) => r.id === b)) throw new InputError([`error: ${a}: no run '${b}' (runs: ${bb.runs.map((r) => r.id).join(', ') || 'none'})`]);
        const rep = reproduceRun(bb, b, { engine: ENGINE_VERSION, options: { now: io.now, clock: io.clock } });
        if (rep.identical) {
          io.err(`ok: run ${b} reproduced bitwise identical (${ENGINE_VERSION}${io.runtime ? `, ${io.runtime}` : ''})`);
          return EXIT_OK;
        }
        for (const d of rep.differences) io.err(`difference: ${d}`);
        io.err(
          `error: run ${b} is not identical${rep.withinTolerance ? ` but agrees within ${rep.tolerance.toExponential(1)} (10 × rtol)` : ''}; reproduced with ${ENGINE_VERSION}${io.runtime ? ` on ${io.runtime}` : ''}`
        );
        return EXIT_CHECK_FAILED;
      }
      default:
        throw new InputError([`error: unknown command '${args.command}'`, USAGE]);
    }
  } catch (e) {
    if (e instanceof InputError) {
      for (const l of e.lines) io.err(l);
      return EXIT_INVALID;
    }
    io.err(`error: internal error: ${(e as Error).message} (please report)`);
    return EXIT_INVALID;
  }
}

function readBundle(io: Io, file: string): unknown {
  let bytes: Uint8Array;
  try {
    bytes = io.readBytes ? io.readBytes(file) : new TextEncoder().encode(io.readFile(file));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError([`error: ${file}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code ?? (e as Error).message})`]);
  }
  if (bytes[0] === 0x1f && bytes[1] === 0x8b) {
    if (!io.gunzip) throw new InputError([`error: ${file}: a gzip file, and this runtime cannot decompress`]);
    try {
      bytes = io.gunzip(bytes);
    } catch (e) {
      throw new InputError([`error: ${file}: the gzip data is damaged or truncated (${(e as Error).message})`]);
    }
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new InputError([`error: ${file}: not a bundle (not UTF-8 text)`]);
  }
  const r = parseJson(text);
  if (!r.ok) throw new InputError(r.problems.map((p) => `error: ${file}: not a bundle: ${p.message} [${p.code}]`));
  return r.value;
}

function numberOption(options: Map<string, string>, name: string): number {
  const v = options.get(name);
  if (v === undefined) throw new InputError([`error: sweep needs --${name}`, USAGE]);
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x)) throw new InputError([`error: --${name} must be a number, got '${v}'`]);
  return x;
}

function startOption(options: Map<string, string>, name: string): Record<string, number> | undefined {
  const v = options.get(name);
  if (v === undefined) return undefined;
  const out: Record<string, number> = {};
  for (const part of v.split(',')) {
    const m = /^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(.+?)\s*$/.exec(part);
    const x = m ? Number(m[2]) : NaN;
    if (!m || !Number.isFinite(x)) throw new InputError([`error: --${name}: '${part}' is not ID=VALUE (e.g. --${name} VEG=0.8,BFI=40)`]);
    out[m[1]] = x;
  }
  return out;
}

/** sweep MODEL --target … : long-run states over a range from both starts (lakeledger.sweep/1). */
function sweepCommand(io: Io, files: string[], options: Map<string, string>, out?: string): number {
  const [modelFile, ...extra] = files;
  if (!modelFile || extra.length) throw new InputError(['error: sweep takes MODEL and options', USAGE]);
  const { model } = load(io, modelFile);
  const target = options.get('target');
  const indicator = options.get('indicator');
  if (!target) throw new InputError(['error: sweep needs --target (a parameter, swept by value, or a forcing, swept as a scale factor)', USAGE]);
  if (!indicator) throw new InputError(['error: sweep needs --indicator (a state or reported quantity, e.g. Chl)', USAGE]);
  let doc;
  try {
    doc = sweep(model, {
      target,
      indicator,
      from: numberOption(options, 'from'),
      to: numberOption(options, 'to'),
      steps: numberOption(options, 'steps'),
      startLow: startOption(options, 'start-low'),
      startHigh: startOption(options, 'start-high'),
      separation: options.has('separation') ? numberOption(options, 'separation') : undefined,
      onProgress: ({ done, total }) => {
        if (done === total || done % 5 === 0) io.err(`sweep: ${done} of ${total} long runs`);
      }
    });
  } catch (e) {
    if (e instanceof SweepInputError) throw new InputError([`error: ${modelFile}: ${e.message} [${e.code}]`]);
    throw e;
  }
  const text = JSON.stringify(doc, null, 1) + '\n';
  if (out) io.writeFile(out, text);
  else io.out(text);
  for (const n of doc.notSettled) io.err(`error: ${target} = ${n.value}, ${n.start} start: ${n.message}`);
  io.err(
    `${doc.notSettled.length ? 'error' : 'ok'}: ${doc.values.length} values of ${target}; ${doc.bistable.length ? `two states between ${doc.bistable.map(([a, b]) => `${fmtNum(a)}–${fmtNum(b)}`).join(', ')}, switch points ${doc.switchPoints.map(fmtNum).join(', ')}` : 'one state throughout'}`
  );
  return doc.notSettled.length ? EXIT_CHECK_FAILED : EXIT_OK;
}

const fmtNum = (x: number) => String(Number(x.toPrecision(5)));

/** archive MODEL SCENARIO... --out BUNDLE: runs each scenario and writes the bundle with its log. */
function archive(io: Io, files: string[], out: string | undefined, by: string): number {
  const [modelFile, ...scenarioFiles] = files;
  if (!modelFile || scenarioFiles.length === 0 || !out) throw new InputError(['error: archive takes MODEL SCENARIO... --out BUNDLE', USAGE]);
  const { model } = load(io, modelFile);
  const scenarios = scenarioFiles.map((f) => load(io, modelFile, f).scenario!);
  const ids = new Set<string>();
  for (const [i, s] of scenarios.entries()) {
    if (ids.has(s.id)) throw new InputError([`error: ${scenarioFiles[i]}: a second scenario with id '${s.id}'`]);
    ids.add(s.id);
  }
  const at = () => io.now().toISOString();
  let head: LogEntry | null = null;
  const log: LogEntry[] = [];
  const add = (e: Parameters<typeof appendEntry>[1]) => {
    head = appendEntry(head, e);
    log.push(head);
  };
  add({ action: 'create', subject: { kind: 'model', id: model.id, digest: digestOf(model) }, by, at: at(), note: `from ${basename(modelFile)}` });
  for (const [i, s] of scenarios.entries()) add({ action: 'create', subject: { kind: 'scenario', id: s.id, digest: digestOf(s) }, by, at: at(), note: `from ${basename(scenarioFiles[i])}` });
  let failed = 0;
  const runs = scenarios.map((s) => {
    const run = simulate(model, s, { now: io.now, clock: io.clock });
    add({ action: 'run', subject: { kind: 'run', id: run.id, digest: recordDigest(run) }, by, at: at(), note: `${s.id}: ${run.status}, closure ${run.closure.ok ? 'ok' : 'failed'}` });
    if (run.status !== 'ok' || !run.closure.ok) {
      failed++;
      io.err(`error: ${s.id}: the run ${run.status}${run.error ? `: ${run.error.message}` : ''}${run.status === 'ok' ? ': closure outside tolerance' : ''}`);
    } else io.err(`ok: ${s.id}: run ${run.id}, closure ${run.closure.relativeResidual.toExponential(2)} of throughput`);
    return run;
  });
  add({ action: 'export', subject: { kind: 'bundle', id: basename(out), digest: null }, by, at: at(), note: `${runs.length} runs` });
  const bundle = buildBundle({ models: [model], scenarios, runs, log, createdAt: at(), engine: ENGINE_VERSION });
  const text = JSON.stringify(bundle);
  const bytes = new TextEncoder().encode(text);
  if (io.writeBytes && io.gzip) io.writeBytes(out, io.gzip(bytes));
  else io.writeFile(out, text);
  io.err(`ok: wrote ${out}: 1 model, ${scenarios.length} scenarios, ${runs.length} runs, ${log.length} log entries (head ${log[log.length - 1].digest})`);
  return failed ? EXIT_CHECK_FAILED : EXIT_OK;
}

/** Writes beside the target and renames, so a failed write never leaves half a file. */
function writeAtomic(path: string, text: string | Uint8Array): void {
  const tmp = `${path}.partial-${process.pid}`;
  try {
    writeFileSync(tmp, text);
    renameSync(tmp, path);
  } catch (e) {
    try {
      unlinkSync(tmp);
    } catch {
      /* nothing to clean */
    }
    throw new InputError([`error: ${path}: cannot write the file (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`]);
  }
}

const nodeIo: Io = {
  out: (t) => process.stdout.write(t.endsWith('\n') ? t : t + '\n'),
  err: (t) => process.stderr.write(t.endsWith('\n') ? t : t + '\n'),
  readFile: (p) => readFileSync(p, 'utf8'),
  writeFile: writeAtomic,
  readBytes: (p) => new Uint8Array(readFileSync(p)),
  writeBytes: writeAtomic,
  gzip: (b) => new Uint8Array(gzipSync(b)),
  gunzip: (b) => new Uint8Array(gunzipSync(b)),
  runtime: `node ${process.version}`,
  user: process.env.LAKELEDGER_USER,
  now: () => new Date(),
  clock: () => performance.now()
};

const invokedDirectly = process.argv[1] && /main\.(ts|js|mjs)$/.test(process.argv[1]);
if (invokedDirectly) {
  // A reader that stops early (`| head`) closes the pipe: that ends the output, not in a stack trace.
  process.stdout.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    process.stderr.write(`error: cannot write the output (${e.code ?? e.message})\n`);
    process.exit(EXIT_INVALID);
  });
  process.exitCode = main(process.argv.slice(2), nodeIo);
}
