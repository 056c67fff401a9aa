import { runTasks } from '../parallel/pool.js';
import type { CoverageResult, CoverageTask } from './coverage.js';
import type { FitReplicateResult, FitReplicateTask } from './replicates.js';

/** Progress callback of one batch: tasks done, tasks in the batch. */
export type BatchProgress = (done: number, total: number) => void;

/** How replicate batches are run. */
export interface ReplicateRunOptions {
  /** Worker threads (default: every core; 1 runs inline). Results do not depend on it. */
  readonly threads?: number;
}

/** Something that runs batches of replicates; injected so tests and the CLI can choose threads. */
export interface ReplicateRunner {
  fits(tasks: readonly FitReplicateTask[], onProgress?: BatchProgress): Promise<FitReplicateResult[]>;
  coverage(tasks: readonly CoverageTask[], onProgress?: BatchProgress): Promise<CoverageResult[]>;
}

/**
 * The replicate runner on the project's worker pool (`src/parallel/pool.ts`).
 * Each task carries its own seed coordinates, so any thread count gives the
 * same results in the same order.
 *
 * @example
 * const design = { time: [0, 1, 2, 3, 4, 5], count: [5, 5, 5, 5, 5, 5], withinVariance: [0.1, 0.1, 0.1, 0.1, 0.1, 0.1], timeUnit: 'Myr' };
 * const task = { design, generator: 'random-walk', parameters: { ancestral_mean: 0, step_variance: 1 }, fit: ['random-walk'], seed: 1, stream: 0, index: 0 };
 * const results = await poolRunner({ threads: 1 }).fits([task, { ...task, index: 1 }]);
 * results.map((result) => result.index); // [0, 1] (in task order)
 * JSON.stringify(results[0]) === JSON.stringify(fitReplicate(task)); // true (threads: 1 runs inline; any thread count gives the same)
 */
export function poolRunner(options: ReplicateRunOptions = {}): ReplicateRunner {
  const here = import.meta.url;
  const module = (name: string): URL => new URL(`./${name}${here.endsWith('.ts') ? '.ts' : '.js'}`, here);
  return {
    fits: (tasks, onProgress) => runTasks<FitReplicateTask, FitReplicateResult>(module('replicates'), 'fitReplicate', tasks, { threads: options.threads, onProgress }),
    coverage: (tasks, onProgress) => runTasks<CoverageTask, CoverageResult>(module('coverage'), 'coverageReplicate', tasks, { threads: options.threads, onProgress }),
  };
}
