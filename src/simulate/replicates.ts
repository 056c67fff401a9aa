import { fitLineage } from '../fit/fit-lineage.js';
import { findModel } from '../models/registry.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { designLineage, type Design } from './design.js';
import { createRandom, type RandomSource } from '../random/random.js';
import { replicateSeed } from '../random/seeds.js';
import { meansSimulator, withMeans } from '../random/simulate-lineage.js';

/**
 * One simulate-and-refit replicate as plain data, so it can run on any
 * worker thread: draw a lineage from `generator` at `parameters` on the
 * design, fit every model in `fit`, and report what model choice needs.
 */
export interface FitReplicateTask {
  readonly design: Design;
  readonly generator: string;
  readonly parameters: Readonly<Record<string, number>>;
  /** Model ids fitted to each replicate (AICc and weights are over these). */
  readonly fit: readonly string[];
  readonly seed: number;
  /** Which family of replicates (grid point, null set, design size...): part of the replicate's seed. */
  readonly stream: number;
  readonly index: number;
  /** Fewest horizons per segment of a shift model in `fit` (absent: the model's default, as `fit` without `--min-segment`). */
  readonly minimumSegment?: number;
}

/** What one replicate returns: per fitted model, logL, AICc and Akaike weight (null when not compared). */
export interface FitReplicateResult {
  readonly stream: number;
  readonly index: number;
  readonly logLik: Record<string, number | null>;
  readonly aicc: Record<string, number | null>;
  readonly weight: Record<string, number | null>;
  readonly best: string | null;
  /** Fitted estimates per model (natural parameters). */
  readonly estimates: Record<string, Record<string, number>>;
}

function modelById(id: string): EvolutionModel {
  const model = findModel(id);
  if (!model) throw new Error(`unknown model "${id}"`);
  return model;
}

/**
 * The design lineage of a replicate task, built once per design object (the
 * tasks of one run share it, and so do the tasks of one chunk sent to a
 * worker, which structured cloning keeps shared): the same lineage, without
 * rebuilding and checking it for every replicate (issue 14). Nothing writes
 * to a lineage once built; each replicate gets its own means by `withMeans`.
 */
function replicateDesign(design: Design): Lineage {
  let lineage = designLineages.get(design);
  if (lineage === undefined) {
    lineage = designLineage(design);
    designLineages.set(design, lineage);
  }
  return lineage;
}

const designLineages = new WeakMap<Design, Lineage>();

/**
 * The means simulator of a task's generator at its parameters on its
 * design, kept per design lineage and per generator and parameter values
 * (the replicates of one stream share them): `simulateMeans` without
 * filling the state space again for every replicate. The key spells every
 * value exactly (String of a double round-trips; -0 apart).
 */
function replicateSimulator(task: FitReplicateTask, generator: EvolutionModel, design: Lineage): (random: RandomSource) => Float64Array {
  let kept = simulators.get(design);
  if (kept === undefined) {
    kept = new Map();
    simulators.set(design, kept);
  }
  const key = [task.generator, ...Object.entries(task.parameters).map(([name, value]) => `${name}=${Object.is(value, -0) ? '-0' : String(value)}`)].join(';');
  let draw = kept.get(key);
  if (draw === undefined) {
    if (kept.size >= simulatorsKept) kept.clear();
    draw = meansSimulator(generator, design, { ...task.parameters });
    kept.set(key, draw);
  }
  return draw;
}

/** Simulators kept per design lineage (a power run has one per drift value and assumed step variance). */
const simulatorsKept = 64;
const simulators = new WeakMap<Lineage, Map<string, (random: RandomSource) => Float64Array>>();

/**
 * Run one replicate. Its random stream depends on (seed, stream, index)
 * only, so the result is the same on any thread and in any order.
 *
 * @example
 * const design = { time: [0, 1, 2, 3, 4, 5], count: [5, 5, 5, 5, 5, 5], withinVariance: [0.1, 0.1, 0.1, 0.1, 0.1, 0.1], timeUnit: 'Myr' };
 * const task = { design, generator: 'random-walk', parameters: { ancestral_mean: 0, step_variance: 1 }, fit: ['random-walk', 'directional-walk'], seed: 1, stream: 0, index: 0 };
 * const result = fitReplicate(task);
 * Object.keys(result.logLik); // ['random-walk', 'directional-walk']
 * JSON.stringify(fitReplicate(task)) === JSON.stringify(result); // true (the stream depends on seed, stream and index only)
 */
export function fitReplicate(task: FitReplicateTask): FitReplicateResult {
  const generator = modelById(task.generator);
  const design = replicateDesign(task.design);
  const random = createRandom(replicateSeed(task.seed, task.stream, task.index));
  const lineage = withMeans(design, replicateSimulator(task, generator, design)(random));
  // Only the table is read: no smoothed lineage (issue 14).
  const fitted = fitLineage(lineage, task.fit.map(modelById), { intervals: false, minimumSegment: task.minimumSegment }, false);
  const logLik: Record<string, number | null> = {};
  const aicc: Record<string, number | null> = {};
  const weight: Record<string, number | null> = {};
  const estimates: Record<string, Record<string, number>> = {};
  for (const model of fitted.models) {
    logLik[model.id] = model.converged && Number.isFinite(model.logLik) ? model.logLik : null;
    aicc[model.id] = model.aicc;
    weight[model.id] = model.weight;
    estimates[model.id] = { ...model.estimates };
  }
  return { stream: task.stream, index: task.index, logLik, aicc, weight, best: fitted.best, estimates };
}

/**
 * Likelihood-ratio statistic 2 (logL_full - logL_reduced) of a replicate,
 * floored at 0 (the nested maximum can only be lower up to search
 * tolerance); null when either model was not fitted.
 *
 * @example
 * const result = { stream: 0, index: 0, logLik: { 'random-walk': -5, 'directional-walk': -2 }, aicc: {}, weight: {}, best: 'directional-walk', estimates: {} };
 * ratioStatistic(result, 'directional-walk', 'random-walk'); // 6 (2 × (-2 - (-5)))
 * ratioStatistic(result, 'directional-walk', 'ou'); // null (not fitted)
 */
export function ratioStatistic(result: FitReplicateResult, full: string, reduced: string): number | null {
  const upper = result.logLik[full];
  const lower = result.logLik[reduced];
  if (upper === null || lower === null || upper === undefined || lower === undefined) return null;
  return Math.max(0, 2 * (upper - lower));
}
