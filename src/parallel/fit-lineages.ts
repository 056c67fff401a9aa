import { availableParallelism } from 'node:os';
import { fitLineage, type LineageFit } from '../fit/fit-lineage.js';
import type { FitOptions } from '../fit/fit-model.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { findModel } from '../models/registry.js';
import { runTasks } from './pool.js';

/**
 * Fewest lineages for which worker threads pay off. Measured with
 * `npm run bench` on a 2-core machine: starting two workers and loading the
 * fitting code in each costs about 0.1 s (12 lineages without intervals took
 * 0.12 s in one thread and 0.2 s on two), while one 30-horizon lineage takes
 * about 45 ms for the five classic models with the default intervals and
 * about 15 ms without, so below a couple of dozen lineages the threads save
 * less than they cost.
 */
export const parallelThreshold = 24;

/** Options of {@link fitLineages}. */
export interface BatchOptions {
  /** Threads, the calling thread included (n > 1: it and n − 1 workers); 1 fits in the calling thread alone; default: the machine's parallelism when the batch is large enough. */
  threads?: number;
  /** Called as lineages finish (in chunks on workers). */
  onProgress?: (done: number, total: number) => void;
}

/** One lineage to fit on a worker: plain data only. */
export interface LineageTask {
  readonly lineage: Lineage;
  readonly models: readonly string[];
  readonly options: FitOptions;
}

/** A lineage's fit as a worker sends it back: without the lineage, which the calling thread already holds. */
export type LineageFitReply = Omit<LineageFit, 'lineage'>;

/**
 * Worker entry: fit one lineage with models named by id. Exported for the
 * pool; not meant to be called directly. The reply leaves out the lineage
 * (issue 14: a 30-horizon result with intervals crosses the thread boundary in
 * 4.0 kB instead of 5.9 kB, by `v8.serialize`); {@link fitLineages} puts the caller's lineage back.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * fitLineageTask({ lineage, models: ['strict-stasis'], options: { intervals: false } }).models[0].logLik; // -2.8378770664093453 (to 1e-12; -ln 2 pi - 1)
 * 'lineage' in fitLineageTask({ lineage, models: ['strict-stasis'], options: { intervals: false } }); // false
 * fitLineageTask({ lineage, models: ['nothing'], options: {} });
 * // throws: model "nothing" is not registered in the worker thread
 */
export function fitLineageTask(task: LineageTask): LineageFitReply {
  const models = task.models.map((id) => {
    const model = findModel(id);
    if (!model) throw new Error(`model "${id}" is not registered in the worker thread`);
    return model;
  });
  const { lineage: _lineage, ...reply } = fitLineage(task.lineage, models, task.options);
  return reply;
}

/**
 * How many threads a batch of this size gets when the caller did not say.
 *
 * @example
 * defaultThreads(1); // 1 (a small batch stays in this thread)
 * defaultThreads(parallelThreshold) >= 1; // true (every core, machine-dependent)
 */
export function defaultThreads(lineages: number): number {
  return lineages >= parallelThreshold ? Math.max(1, availableParallelism()) : 1;
}

/**
 * Fit every model to every lineage, on worker threads when the batch is
 * large enough to pay off (see {@link parallelThreshold}); results are in
 * input order and identical to sequential fitting (each lineage is fitted by
 * the same deterministic code; structured cloning copies doubles exactly).
 * Models that a worker could not find by id (registered at run time in this
 * thread only) make the batch run in this thread.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const fits = await fitLineages([lineage, lineage], [strictStasis], { intervals: false }, { threads: 1 });
 * fits.map((fit) => fit.models[0].logLik); // [-2.8378770664093453, -2.8378770664093453] (-ln 2 pi - 1 each, closed form)
 */
export async function fitLineages(
  lineages: readonly Lineage[],
  models: readonly EvolutionModel[],
  fitOptions: FitOptions = {},
  options: BatchOptions = {},
): Promise<LineageFit[]> {
  const threads = Math.max(1, Math.floor(options.threads ?? defaultThreads(lineages.length)));
  const shareable = models.every((model) => findModel(model.id) === model);
  if (threads === 1 || lineages.length < 2 || !shareable) {
    const fits: LineageFit[] = [];
    const step = Math.max(1, Math.ceil(lineages.length / 100));
    lineages.forEach((lineage, index) => {
      fits.push(fitLineage(lineage, models, fitOptions));
      if ((index + 1) % step === 0 || index + 1 === lineages.length) options.onProgress?.(index + 1, lineages.length);
    });
    return fits;
  }
  const ids = models.map((model) => model.id);
  const tasks: LineageTask[] = lineages.map((lineage) => ({ lineage, models: ids, options: fitOptions }));
  const replies = await runTasks<LineageTask, LineageFitReply>(new URL(import.meta.url), 'fitLineageTask', tasks, { threads, onProgress: options.onProgress });
  // The same keys in the same order as fitLineage's result, so every output of it is byte-identical.
  return replies.map((reply, index) => ({ lineage: lineages[index], models: reply.models, best: reply.best, smoothed: reply.smoothed }));
}
