import { runTasks } from '../parallel/pool.js';
import { diagonalToFactor, fitJointModel, rankJointFits, type JointModelFit, type RankedJointFit } from './fit-joint.js';
import { jointModel, type JointModel } from './joint-models.js';
import type { JointData } from './vector-filter.js';

/** One model × one group, as plain data for a worker thread. */
export interface JointFitTask {
  readonly model: string;
  readonly data: JointData;
  readonly intervals: boolean;
  readonly start?: number[];
}

/**
 * Worker entry: fit one joint model (see {@link fitJointModel}).
 *
 * @example
 * const time = [0, 1, 2, 3, 4, 5];
 * const x = [0, 0.5, 0.2, 1.1, 1.6, 1.2];
 * const y = [1, 1.4, 1.1, 1.9, 2.6, 2.0];
 * const data = { traits: 2, time: Float64Array.from(time), values: Float64Array.from(time.flatMap((_, i) => [x[i], y[i]])), sampling: Float64Array.from(time.flatMap(() => [0.01, 0, 0, 0.01])) };
 * fitJointTask({ model: 'independent-random-walks', data, intervals: false }).logLik; // -5.807239873520929 (to 1e-9; the sum of the two traits' random-walk fits, see fitJointModel)
 */
export function fitJointTask(task: JointFitTask): JointModelFit {
  return fitJointModel(jointModel(task.model) as JointModel, task.data, { intervals: task.intervals, start: task.start });
}

/**
 * {@link fitJointModels} on worker threads (`threads`; 1 = in this thread):
 * the independent models first, then each correlated model from its
 * independent counterpart's maximum, one task per model. Same numbers as
 * the sequential run (each task is the same deterministic computation).
 *
 * @example
 * const time = [0, 1, 2, 3, 4, 5];
 * const x = [0, 0.5, 0.2, 1.1, 1.6, 1.2];
 * const y = [1, 1.4, 1.1, 1.9, 2.6, 2.0];
 * const data = { traits: 2, time: Float64Array.from(time), values: Float64Array.from(time.flatMap((_, i) => [x[i], y[i]])), sampling: Float64Array.from(time.flatMap(() => [0.01, 0, 0, 0.01])) };
 * const models = [jointModel('independent-random-walks'), jointModel('correlated-random-walk')];
 * const { best } = await fitJointModelsOnPool(models, data, { intervals: false, threads: 1 });
 * best; // 'correlated-random-walk' (as fitJointModels finds in this thread)
 */
export async function fitJointModelsOnPool(models: readonly JointModel[], data: JointData, options: { intervals: boolean; threads?: number }): Promise<{ models: RankedJointFit[]; best: string | null }> {
  const key = (model: JointModel): string => `${model.process}/${model.mean}`;
  const first = models.filter((model) => !model.correlated || !models.some((other) => !other.correlated && key(other) === key(model)));
  const firstFits = await runTasks<JointFitTask, JointModelFit>(new URL(import.meta.url), 'fitJointTask', first.map((model) => ({ model: model.id, data, intervals: options.intervals })), { threads: options.threads, chunkSize: 1 });
  const done = new Map(first.map((model, index) => [model.id, firstFits[index]]));
  const second = models.filter((model) => !done.has(model.id));
  const starts = second.map((model) => {
    const partner = models.find((other) => !other.correlated && key(other) === key(model));
    const fit = partner ? done.get(partner.id) : undefined;
    return fit && fit.logLik !== null ? diagonalToFactor(fit.process, data.traits, model.process === 'ou') : undefined;
  });
  const secondFits = await runTasks<JointFitTask, JointModelFit>(new URL(import.meta.url), 'fitJointTask', second.map((model, index) => ({ model: model.id, data, intervals: options.intervals, ...(starts[index] ? { start: starts[index] } : {}) })), { threads: options.threads, chunkSize: 1 });
  second.forEach((model, index) => done.set(model.id, secondFits[index]));
  return rankJointFits(models.map((model) => done.get(model.id) as JointModelFit), data);
}
