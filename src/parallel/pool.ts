import { availableParallelism } from 'node:os';
import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { WorkerReply, WorkerRequest } from './worker.js';

/** Options of {@link runTasks}. */
export interface PoolOptions {
  /**
   * Number of threads, the calling thread included: 1 runs every task inline
   * (no worker is started), n > 1 starts n − 1 workers and runs tasks in the
   * calling thread too; the default is the machine's available parallelism.
   * Never more workers are started than there are chunks of tasks left after
   * the calling thread's first task.
   */
  threads?: number;
  /**
   * Tasks sent to a worker per message. Default: guided, each chunk a
   * quarter of the remaining tasks' share per thread (at least one), so the
   * chunks shrink toward the end and no thread is left with a long chunk
   * while the others are idle (issue 14).
   */
  chunkSize?: number;
  /** Called after each finished chunk with the number of tasks done so far. */
  onProgress?: (done: number, total: number) => void;
}

/**
 * A task that threw: carries the task's index and the original error's name, message and stack.
 *
 * @example
 * const error = new TaskError(3, 'RangeError', 'bad value', undefined);
 * [error.name, error.taskIndex, error.originalName, error.message]; // ['TaskError', 3, 'RangeError', 'bad value']
 */
export class TaskError extends Error {
  readonly taskIndex: number;
  readonly originalName: string;
  constructor(taskIndex: number, name: string, message: string, stack: string | undefined) {
    super(message);
    this.name = 'TaskError';
    this.taskIndex = taskIndex;
    this.originalName = name;
    if (stack) this.stack = stack;
  }
}

/**
 * Where a module can be loaded from by a worker thread. A `.ts` file under
 * the project (as when running under vitest) maps to its compiled twin in
 * `dist/` (`npm run build`); anything else is used as given.
 *
 * @example
 * compiledModule('/somewhere/task.js'); // 'file:///somewhere/task.js' (not a .ts file: used as given)
 */
export function compiledModule(module: string | URL): string {
  const url = module instanceof URL ? module : module.startsWith('file:') ? new URL(module) : pathToFileURL(module);
  const path = fileURLToPath(url);
  if (!path.endsWith('.ts')) return url.href;
  const root = fileURLToPath(new URL('../../', import.meta.url));
  const relative = path.startsWith(root) ? path.slice(root.length) : null;
  if (relative === null || relative.startsWith('dist/')) return url.href;
  const twin = new URL(`dist/${relative.slice(0, -3)}.js`, pathToFileURL(root)).href;
  if (!existsSync(fileURLToPath(twin))) throw new Error(`${path} has no compiled twin ${fileURLToPath(twin)}; run "npm run build" first`);
  return twin;
}

/** The worker script, compiled (this file may itself be running from source under vitest). */
function workerScript(): URL {
  return new URL(compiledModule(new URL(import.meta.url.endsWith('.ts') ? './worker.ts' : './worker.js', import.meta.url)));
}

type Task = unknown;

/**
 * Run `exportName` of `module` once per task and return the results in task
 * order. Tasks and results must be plain data (structured-clone-able:
 * numbers, strings, arrays, typed arrays, plain objects); the function may be
 * synchronous or return a promise. With `threads: 1` everything runs inline
 * in the calling thread, which gives exactly the same results (useful for
 * small inputs, where starting workers costs more than it saves). With more
 * threads the calling thread is one of them (issue 14): `threads: 2` starts
 * one worker and fits tasks in this thread too, one at a time, answering the
 * worker between tasks.
 *
 * A task that throws (in a worker or in this thread) rejects the whole run
 * with a {@link TaskError} naming the task index; the workers are stopped.
 *
 * @example
 * // One thread runs inline (no worker started); a worker needs the compiled module in dist/.
 * const designs = [{ time: [0, 1], count: [5, 3], withinVariance: [0.5, 1], timeUnit: 'Myr' }, { time: [0, 1], count: [1, 1], withinVariance: [4, 4], timeUnit: 'Myr' }];
 * await runTasks('dist/src/simulate/design.js', 'pooledWithinSd', designs, { threads: 1 }); // [0.816496580927726, 2] (sqrt((4 × 0.5 + 2 × 1) / 6); no degrees of freedom: sqrt of the mean variance)
 * await runTasks('dist/src/simulate/design.js', 'noSuchTask', [1], { threads: 1 });
 * // throws: does not export a function named "noSuchTask"
 */
export async function runTasks<T = Task, R = unknown>(
  module: string | URL,
  exportName: string,
  tasks: readonly T[],
  options: PoolOptions = {},
): Promise<R[]> {
  const total = tasks.length;
  const threads = Math.max(1, Math.floor(options.threads ?? availableParallelism()));
  const results: R[] = new Array(total);
  if (total === 0) return results;
  const run = await loadTask(module, exportName);
  if (threads === 1) return runInline(run, tasks, options, results);
  const fixedChunk = options.chunkSize === undefined ? null : Math.max(1, Math.floor(options.chunkSize));
  // This thread takes tasks one at a time, so a worker is only worth starting when some chunk is left for it.
  const workerCount = Math.min(threads - 1, fixedChunk === null ? total - 1 : Math.ceil(total / fixedChunk) - 1);
  const moduleHref = workerCount > 0 ? compiledModule(module) : '';
  const script = workerCount > 0 ? workerScript() : null;
  let sent = 0;
  let done = 0;
  let reported = 0;
  const step = Math.max(1, Math.ceil(total / 100));
  const workers: Worker[] = [];
  const inFlight: number[] = [];
  let failed = false;
  let settle: { resolve: () => void; reject: (error: Error) => void } = { resolve: () => undefined, reject: () => undefined };
  const finished = new Promise<void>((resolve, reject) => {
    settle = { resolve, reject };
  });
  // A worker may fail while this thread is between tasks: the rejection is awaited below, not unhandled meanwhile.
  finished.catch(() => undefined);
  const fail = (error: Error): void => {
    if (failed) return;
    failed = true;
    settle.reject(error);
  };
  const progress = (force: boolean): void => {
    if (!force && done - reported < step && done < total) return;
    reported = done;
    options.onProgress?.(done, total);
  };
  const sendNext = (w: number): void => {
    if (sent >= total || failed) return;
    const start = sent;
    const size = fixedChunk ?? guidedChunk(total - sent, threads);
    sent = Math.min(total, start + size);
    const request: WorkerRequest = { start, tasks: tasks.slice(start, sent) };
    inFlight[w]++;
    workers[w].postMessage(request);
  };
  // Two chunks in flight per worker: the next one is already queued when a worker posts its results, so it never
  // waits for this thread to finish its own task, read the results and answer.
  const topUp = (): void => {
    for (let w = 0; w < workers.length; w++) while (inFlight[w] < 2 && sent < total && !failed) sendNext(w);
  };
  try {
    for (let w = 0; w < workerCount && script !== null; w++) {
      const worker = startWorker(script, { module: moduleHref, exportName });
      workers.push(worker);
      inFlight.push(0);
      worker.on('message', (reply: WorkerReply) => {
        if (failed) return;
        if (reply.kind === 'error') {
          fail(new TaskError(reply.index, reply.name, reply.message, reply.stack));
          return;
        }
        inFlight[w]--;
        for (let j = 0; j < reply.results.length; j++) results[reply.start + j] = reply.results[j] as R;
        done += reply.results.length;
        progress(true);
        if (done === total) settle.resolve();
        else topUp();
      });
      worker.on('error', (error) => fail(error));
      worker.on('exit', (code) => {
        if (code !== 0 && !failed && done < total) fail(new Error(`worker thread stopped with exit code ${code}`));
      });
      // One chunk each to begin with, so a short run leaves tasks for this thread too; the second follows below.
      sendNext(w);
    }
    // This thread's share: one task at a time from the same queue, yielding between tasks so the workers' results
    // are read and answered (their second chunk is topped up here) while this thread is busy.
    while (sent < total && !failed) {
      const index = sent++;
      topUp();
      try {
        results[index] = (await run(tasks[index])) as R;
      } catch (error) {
        fail(taskError(index, error));
        break;
      }
      done++;
      progress(false);
      if (done === total) settle.resolve();
      await new Promise<void>((resolve) => setImmediate(resolve));
    }
    await finished;
  } finally {
    await Promise.all(workers.map((worker) => worker.terminate()));
  }
  return results;
}

/**
 * Size of the next chunk when `remaining` tasks are left for `workers`
 * workers: a quarter of each worker's share of what is left (guided
 * self-scheduling, Polychronopoulos & Kuck 1987, IEEE Trans. Computers
 * C-36:1425-1439, with a smaller fraction because each worker holds two
 * chunks). Large chunks while much is left (few messages), single tasks at
 * the end, so the last chunk of one worker is short.
 *
 * @example
 * guidedChunk(1000, 2); // 125
 * guidedChunk(3, 2); // 1
 */
export function guidedChunk(remaining: number, workers: number): number {
  return Math.max(1, Math.ceil(remaining / (4 * workers)));
}

/** The task function, loaded in this thread (the module as given: under vitest, its source). */
async function loadTask(module: string | URL, exportName: string): Promise<(task: unknown) => unknown> {
  const href = module instanceof URL ? module.href : module.startsWith('file:') ? module : pathToFileURL(module).href;
  const loaded = (await import(href)) as Record<string, unknown>;
  const run = loaded[exportName];
  if (typeof run !== 'function') throw new Error(`${href} does not export a function named "${exportName}"`);
  return run as (task: unknown) => unknown;
}

/** A {@link TaskError} for task `index` from whatever it threw. */
function taskError(index: number, error: unknown): TaskError {
  const cause = error as Error;
  return new TaskError(index, cause?.name ?? 'Error', cause?.message ?? String(error), cause?.stack);
}

async function runInline<T, R>(run: (task: unknown) => unknown, tasks: readonly T[], options: PoolOptions, results: R[]): Promise<R[]> {
  const step = Math.max(1, Math.ceil(tasks.length / 100));
  for (let index = 0; index < tasks.length; index++) {
    try {
      results[index] = (await run(tasks[index])) as R;
    } catch (error) {
      throw taskError(index, error);
    }
    if ((index + 1) % step === 0 || index + 1 === tasks.length) options.onProgress?.(index + 1, tasks.length);
  }
  return results;
}

/**
 * Start one worker with the parent's Node options ({@link workerExecArgv}).
 * Node refuses V8 and process-wide options in a worker's `execArgv` (e.g.
 * `node --max-old-space-size=4096 bin/stratotrend ... --threads 2` failed
 * with an internal error): the options it names are left out and the worker
 * started again; a heap size asked for with `--max-old-space-size` becomes
 * the worker's own `resourceLimits.maxOldGenerationSizeMb`.
 */
function startWorker(script: URL, workerData: { module: string; exportName: string }): Worker {
  const execArgv = workerExecArgv();
  const heap = execArgv.map((arg) => /^--max[-_]old[-_]space[-_]size=(\d+)$/.exec(arg)?.[1]).find((size) => size !== undefined);
  const resourceLimits = heap === undefined ? undefined : { maxOldGenerationSizeMb: Number(heap) };
  try {
    return new Worker(script, { workerData, execArgv, resourceLimits });
  } catch (error) {
    if ((error as { code?: string }).code !== 'ERR_WORKER_INVALID_EXEC_ARGV') throw error;
    // "Initiated Worker with invalid execArgv flags: --a, --b"
    const message = (error as Error).message;
    const rejected = new Set(message.slice(message.indexOf(':') + 1).split(',').map((flag) => flag.trim()));
    return new Worker(script, { workerData, execArgv: execArgv.filter((arg) => !rejected.has(arg)), resourceLimits });
  }
}

/**
 * The Node options a worker inherits: the parent's, without those that only
 * make sense for the main script (`--input-type`, `--eval`/`-e`, `--print`/`-p`
 * and the evaluated text). A parent started as `node --input-type=module -e
 * ...` (the benchmark's child processes) otherwise fails to start any worker.
 */
function workerExecArgv(): string[] {
  const kept: string[] = [];
  for (let i = 0; i < process.execArgv.length; i++) {
    const arg = process.execArgv[i];
    if (arg === '-e' || arg === '-p' || arg === '--eval' || arg === '--print') {
      i++;
      continue;
    }
    if (arg.startsWith('--input-type') || arg.startsWith('--eval=') || arg.startsWith('--print=')) continue;
    kept.push(arg);
  }
  return kept;
}

