import { availableParallelism } from 'node:os';
import type { LineageFit } from '../fit/fit-lineage.js';
import { runTasks } from '../parallel/pool.js';
import { trendTest, type TrendTest, type TrendTestOptions } from './trend-test.js';

/** One lineage's trend test as plain data for a worker. */
export interface TrendTestTask {
  readonly fit: LineageFit;
  readonly options: TrendTestOptions;
}

/**
 * Worker entry: the trend test of one fitted lineage. Exported for the pool.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 1.1, 1.9, 3.2, 3.9, 5.1, 6, 7.2], samplingVariance: Array(8).fill(0.01) });
 * const fit = fitLineage(lineage, classicModels, { intervals: false });
 * trendTestTask({ fit, options: { seed: 1, maxReplicates: 19, rateReplicates: 9 } }).p_value; // 0.05 (no replicate reached the observed statistic: (0 + 1) / (19 + 1))
 */
export function trendTestTask(task: TrendTestTask): TrendTest {
  return trendTest(task.fit, task.options);
}

/**
 * The trend test of every fitted lineage, in input order: on worker threads
 * when there are two or more lineages (each test simulates for about a
 * second), else in this thread. Each lineage's test is seeded by
 * `options.seed` alone, so its p-value does not depend on the thread count
 * or on the other lineages of the file.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 1.1, 1.9, 3.2, 3.9, 5.1, 6, 7.2], samplingVariance: Array(8).fill(0.01) });
 * const fit = fitLineage(lineage, classicModels, { intervals: false });
 * const [test] = await trendTests([fit], { seed: 1, maxReplicates: 19, rateReplicates: 9 }, { threads: 1 });
 * test.p_value; // 0.05 (no replicate reached the observed statistic: (0 + 1) / (19 + 1))
 */
export async function trendTests(fits: readonly LineageFit[], options: TrendTestOptions, batch: { threads?: number; onProgress?: (done: number, total: number) => void } = {}): Promise<TrendTest[]> {
  const threads = batch.threads ?? Math.min(fits.length, availableParallelism());
  if (threads <= 1 || fits.length < 2) return fits.map((fit) => trendTest(fit, options));
  // The smoothed lineage is not needed by the test; leaving it out makes the copies to the workers smaller.
  const tasks = fits.map((fit): TrendTestTask => ({ fit: { ...fit, smoothed: null }, options }));
  const here = import.meta.url;
  const module = new URL(`./run-trend-tests${here.endsWith('.ts') ? '.ts' : '.js'}`, here);
  return runTasks<TrendTestTask, TrendTest>(module, 'trendTestTask', tasks, { threads, chunkSize: 1, onProgress: batch.onProgress });
}
