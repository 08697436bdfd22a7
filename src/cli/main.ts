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

export const EXIT_OK = 0;
export const EXIT_CHECK_FAILED = 1;
export const EXIT_INVALID = 2;

const USAGE = `usage:
  lakeledger validate MODEL [SCENARIO]        check documents; problems on stderr
  lakeledger equations MODEL                  print each state's mass balance
  lakeledger run MODEL [SCENARIO] [--out FILE]   run; the run document as JSON
exit codes: 0 ok, 1 a check failed (run failed or closure outside tolerance), 2 invalid input or usage`;

export interface Io {
  out(text: string): void;
  err(text: string): void;
  readFile(path: string): string;
  writeFile(path: string, text: string): void;
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

function parseArgs(argv: string[]): { command?: string; positional: string[]; out?: string; help: boolean } {
  const positional: string[] = [];
  let out: string | undefined;
  let help = false;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--out' || a === '-o') {
      if (i + 1 >= argv.length) throw new InputError(['error: --out needs a file name', USAGE]);
      out = argv[++i];
    } else if (a.startsWith('--out=')) out = a.slice(6);
    else if (a === '--help' || a === '-h') help = true;
    else if (a.startsWith('-')) throw new InputError([`error: unknown option '${a}'`, USAGE]);
    else positional.push(a);
  }
  return { command: positional.shift(), positional, out, help };
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

/** Writes beside the target and renames, so a failed write never leaves half a file. */
function writeAtomic(path: string, text: string): void {
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
