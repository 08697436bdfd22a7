/**
 * `lakeledger ensemble MODEL SCENARIO... --n N --seed S [--threads T] [--out FILE]`:
 * N Latin-hypercube parameter sets, the same sets under every scenario (common random
 * numbers), each series summarised over the members by its last-five-year mean
 * (`lakeledger.ensemble/1`, engine/uncertainty/ensemble.ts). The sets are drawn here,
 * once; the members are split into contiguous slices, one worker thread per core
 * (ensemble-worker.ts), and the slices are joined in member order, so the document is the
 * same from one thread and from many; only `timing` differs between runs.
 * Exit 0 when every member ran and closed, 1 when some failed or did not close (the file
 * is still written), 2 for bad usage or input.
 */
import { Worker, MessageChannel, receiveMessageOnPort, type MessagePort } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { validateModel, validateScenario, formatProblem, hasErrors, type ModelDoc, type ScenarioDoc } from '../lib/engine/index';
import { parseJson } from '../lib/engine/document/json';
import { sampleModel, type ModelSample } from '../lib/engine/uncertainty/lhs';
import { runMembers, joinMembers, ensembleDocument, checkScenarios, type MembersResult, type EnsembleDoc, type SeriesTarget } from '../lib/engine/uncertainty/ensemble';
import { UncertaintyInputError } from '../lib/engine/uncertainty/errors';
import { summarisedSeriesIds } from '../lib/engine/uncertainty/window';
import type { Io } from './main';

export const ENSEMBLE_USAGE = `  lakeledger ensemble MODEL SCENARIO... --n N --seed S [--threads T] [--meet ID<=X,ID>=Y] [--out FILE]
                                              N parameter sets (Latin hypercube) under each scenario;
                                              last-five-year means summarised (lakeledger.ensemble/1);
                                              --meet: share of sets meeting each target, Wilson 95 %`;

/** Parses `--meet Chl<=25,Secchi>=1.2` against the series ids. */
export function parseTargets(text: string, seriesIds: readonly string[]): SeriesTarget[] {
  const out: SeriesTarget[] = [];
  for (const part of text.split(',').map((x) => x.trim()).filter(Boolean)) {
    const m = /^([A-Za-z_][A-Za-z0-9_]*)\s*(<=|>=)\s*(\S+)$/.exec(part);
    const limit = m ? Number(m[3]) : NaN;
    if (!m || !Number.isFinite(limit)) throw new UsageError([`error: --meet: '${part}' is not ID<=LIMIT or ID>=LIMIT with a number (e.g. --meet Chl<=25,Secchi>=1.2)`]);
    if (!seriesIds.includes(m[1])) throw new UsageError([`error: --meet: '${m[1]}' is not a state or reported series of the model (${seriesIds.join(', ')})`]);
    if (out.some((t) => t.id === m[1])) throw new UsageError([`error: --meet: '${m[1]}' is named twice`]);
    out.push({ id: m[1], direction: m[2] === '<=' ? 'at_most' : 'at_least', limit });
  }
  return out;
}

/** Largest ensemble the command accepts (memory for the outcomes stays small below it). */
export const MAX_MEMBERS = 100000;
/** A worker that has not said it started within this time is replaced by the command's thread. */
const WORKER_START_MS = 60000;

export class UsageError extends Error {
  constructor(readonly lines: string[]) {
    super(lines.join('\n'));
  }
}

export function readDoc(io: Io, file: string): unknown {
  let text: string;
  try {
    text = io.readFile(file);
  } catch (e) {
    const code = (e as { code?: string }).code;
    throw new UsageError([`error: ${file}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code ?? (e as Error).message})`]);
  }
  const r = parseJson(text);
  if (!r.ok) throw new UsageError(r.problems.map((p) => `error: ${file}: ${p.path || '(document)'}: ${p.message} [${p.code}]`));
  return r.value;
}

export function wholeOption(options: Map<string, string>, name: string, what: string, min: number, max: number, command = 'ensemble'): number {
  const v = options.get(name);
  if (v === undefined) throw new UsageError([`error: ${command} needs --${name} (${what})`]);
  const x = Number(v);
  if (v.trim() === '' || !Number.isInteger(x) || x < min || x > max) throw new UsageError([`error: --${name} must be a whole number from ${min} to ${max}, got '${v}'`]);
  return x;
}

export interface EnsembleRun {
  doc: EnsembleDoc;
  threads: number;
  wallMs: number;
}

/** Runs the sample's members on `threads` threads (1: this thread only) and builds the document. */
export function runEnsembleThreads(model: ModelDoc, scenarios: ScenarioDoc[], sample: ModelSample, threads: number, onProgress?: (done: number, total: number) => void, clock: () => number = () => performance.now(), targets: readonly SeriesTarget[] = []): EnsembleRun {
  const t0 = clock();
  const n = sample.members.length;
  const k = Math.max(1, Math.min(threads, n));
  let result: MembersResult;
  if (k === 1) {
    result = runMembers(model, scenarios, sample.members, { onProgress: ({ done }) => onProgress?.(done, n) });
  } else {
    result = joinMembers(runInWorkers(model, scenarios, sample, k, onProgress));
  }
  const doc = ensembleDocument(model, sample, result, targets);
  return { doc, threads: k, wallMs: clock() - t0 };
}

/**
 * The worker's source is TypeScript. Node does not pass a loader registered in this thread
 * on to a worker, so each worker starts from a two-line script that registers tsx's loader
 * in its own thread and then imports ensemble-worker.ts.
 */
function workerBootstrap(): string {
  const api = pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api')).href.replace(/index\.cjs$/, 'index.mjs');
  const entry = new URL('./ensemble-worker.ts', import.meta.url).href;
  return `import(${JSON.stringify(api)}).then(({ tsImport }) => tsImport(${JSON.stringify(entry)}, ${JSON.stringify(import.meta.url)}));`;
}

interface Slot {
  worker: Worker;
  port: MessagePort;
  offset: number;
  count: number;
  ready: boolean;
  done: number;
  result: MembersResult | null;
  error: string | null;
}

/** Splits the members into contiguous slices; waits synchronously for every worker. */
function runInWorkers(model: ModelDoc, scenarios: ScenarioDoc[], sample: ModelSample, k: number, onProgress?: (done: number, total: number) => void): MembersResult[] {
  const n = sample.members.length;
  const flag = new Int32Array(new SharedArrayBuffer(4));
  const cancel = new Int32Array(new SharedArrayBuffer(4));
  const bootstrap = workerBootstrap();
  const slots: Slot[] = [];
  for (let w = 0; w < k; w++) {
    const offset = Math.floor((w * n) / k);
    const end = Math.floor(((w + 1) * n) / k);
    const { port1, port2 } = new MessageChannel();
    const worker = new Worker(bootstrap, {
      eval: true,
      workerData: { model, scenarios, draws: sample.members.slice(offset, end), offset, port: port2, flag: flag.buffer, cancel: cancel.buffer },
      transferList: [port2]
    });
    worker.unref();
    // failures come as messages; an 'error' event after the command returned must not crash it
    worker.on('error', () => {});
    slots.push({ worker, port: port1, offset, count: end - offset, ready: false, done: 0, result: null, error: null });
  }
  const began = Date.now();
  let reported = 0;
  for (;;) {
    const seen = Atomics.load(flag, 0);
    for (const s of slots) {
      for (let m = receiveMessageOnPort(s.port); m; m = receiveMessageOnPort(s.port)) {
        const msg = m.message as { type: string; done?: number; result?: MembersResult; message?: string };
        if (msg.type === 'ready') s.ready = true;
        else if (msg.type === 'progress') s.done = msg.done!;
        else if (msg.type === 'done') s.result = msg.result!;
        else if (msg.type === 'error') s.error = msg.message!;
      }
    }
    const done = slots.reduce((a, s) => a + s.done, 0);
    if (onProgress && done !== reported) {
      reported = done;
      onProgress(done, n);
    }
    if (slots.every((s) => s.result || s.error)) break;
    // A worker that never starts (its loader failed) is not waited for forever: its slice
    // runs here instead, with the same result.
    if (Date.now() - began > WORKER_START_MS) {
      for (const s of slots) {
        if (s.ready || s.result || s.error) continue;
        void s.worker.terminate();
        s.result = runMembers(model, scenarios, sample.members.slice(s.offset, s.offset + s.count), { offset: s.offset });
        s.done = s.count;
      }
    }
    Atomics.wait(flag, 0, seen, 1000);
  }
  for (const s of slots) {
    s.port.close();
    void s.worker.terminate();
  }
  const failed = slots.find((s) => s.error);
  if (failed) throw new Error(`a worker thread failed: ${failed.error}`);
  return slots.map((s) => s.result!);
}

/** The command; returns the exit code. */
export function ensembleCommand(io: Io, files: string[], options: Map<string, string>, out: string | undefined): number {
  try {
    const [modelFile, ...scenarioFiles] = files;
    if (!modelFile || scenarioFiles.length === 0) throw new UsageError(['error: ensemble takes MODEL SCENARIO... --n N --seed S [--threads T] [--out FILE]']);
    const n = wholeOption(options, 'n', 'the number of members', 1, MAX_MEMBERS);
    const seed = wholeOption(options, 'seed', 'a whole number that fixes the draws', 0, 0xffffffff);
    const threads = options.has('threads') ? wholeOption(options, 'threads', 'worker threads', 1, 256) : Math.max(1, availableParallelism());
    const model = readDoc(io, modelFile);
    const mp = validateModel(model);
    for (const p of mp) io.err(formatProblem(p, modelFile));
    if (hasErrors(mp)) throw new UsageError([]);
    const scenarios = scenarioFiles.map((f) => {
      const s = readDoc(io, f);
      const sp = validateScenario(s, model as ModelDoc);
      for (const p of sp) io.err(formatProblem(p, f));
      if (hasErrors(sp)) throw new UsageError([]);
      return s as ScenarioDoc;
    });
    let sample: ModelSample;
    try {
      checkScenarios(scenarios);
      sample = sampleModel(model as ModelDoc, n, seed);
    } catch (e) {
      if (e instanceof UncertaintyInputError) {
        const file = e.code === 'duplicate_scenario' ? scenarioFiles[scenarios.findIndex((s, i) => scenarios.findIndex((t) => t.id === s.id) !== i)] : modelFile;
        throw new UsageError([`error: ${file}: ${e.message} [${e.code}]`]);
      }
      throw e;
    }
    const md = model as ModelDoc;
    const targets = options.has('meet') ? parseTargets(options.get('meet')!, summarisedSeriesIds(md)) : [];
    let step = 0;
    const run = runEnsembleThreads(model as ModelDoc, scenarios, sample, threads, (done, total) => {
      const tenth = Math.floor((10 * done) / total);
      if (tenth > step) {
        step = tenth;
        io.err(`ensemble: ${done} of ${total} members`);
      }
    }, io.clock, targets);
    const doc = run.doc;
    const runs = doc.completed * scenarios.length;
    const timing = { wallMs: Math.round(run.wallMs), threads: run.threads, runsPerSecond: run.wallMs > 0 ? Number((runs / (run.wallMs / 1000)).toPrecision(4)) : null };
    const text = JSON.stringify({ ...doc, timing }, null, 1) + '\n';
    if (out) io.writeFile(out, text);
    else io.out(text);
    let bad = doc.partial;
    for (const s of doc.scenarios) {
      for (const p of s.problems.slice(0, 20)) io.err(`error: ${s.id}: member ${p.member} ${p.status === 'failed' ? 'failed' : 'did not close'}: ${p.message.split('\n')[0]} [${p.code}]`);
      if (s.problems.length > 20) io.err(`error: ${s.id}: ${s.problems.length - 20} more members failed or did not close (all listed in the file)`);
      if (s.failed) bad = true;
      io.err(`${s.failed ? 'error' : 'ok'}: ${s.id}: ${s.closed} of ${doc.completed} members ran and closed${s.failed ? `, ${s.failed} failed or did not close` : ''}`);
      if (s.warnings?.length) {
        for (const w of s.warnings.slice(0, 10)) io.err(`warning: ${s.id}: member ${w.member}: ${w.message} [${w.code}]`);
        if (s.warnings.length > 10) io.err(`warning: ${s.id}: ${s.warnings.length - 10} more member warnings (all listed in the file)`);
      }
      for (const [id, m] of Object.entries(s.meeting ?? {})) {
        io.err(`${s.id}: ${id} ${m.direction === 'at_most' ? '≤' : '≥'} ${m.limit} in ${m.met} of ${m.members} parameter sets${m.share !== null ? ` (${(100 * m.share).toFixed(0)} %, 95 % interval ${(100 * m.low!).toFixed(0)}–${(100 * m.high!).toFixed(0)} %; a probability only under the assumed ranges)` : ''}`);
      }
    }
    io.err(`${bad ? 'error' : 'ok'}: ${doc.completed} members × ${scenarios.length} scenarios in ${(run.wallMs / 1000).toFixed(1)} s on ${run.threads} thread${run.threads === 1 ? '' : 's'}${out ? `; wrote ${out}` : ''}`);
    return bad ? 1 : 0;
  } catch (e) {
    if (e instanceof UsageError) {
      for (const l of e.lines) io.err(l);
      return 2;
    }
    throw e;
  }
}
