import { fitModel, processInterval } from '../fit/fit-model.js';
import { LikelihoodEvaluator } from '../fit/evaluator.js';
import { covers, intervalsByProfile, type IntervalEnds, type IntervalMethod } from '../fit/intervals.js';
import { chiSquare1At95 } from '../fit/model-choice.js';
import { findModel } from '../models/registry.js';
import { designLineage, type Design } from './design.js';
import { createRandom } from '../random/random.js';
import { replicateSeed } from '../random/seeds.js';
import { simulateMeans, withMeans } from '../random/simulate-lineage.js';

/** One coverage replicate as plain data (runs on a worker thread). */
export interface CoverageTask {
  readonly design: Design;
  /** Generating and fitted model id. */
  readonly model: string;
  /** True parameters (natural, names as in MODELS.md). */
  readonly parameters: Readonly<Record<string, number>>;
  /** Parameters whose intervals are checked. */
  readonly names: readonly string[];
  readonly methods: readonly IntervalMethod[];
  readonly seed: number;
  readonly index: number;
  /**
   * For `bootstrap`: either a fixed likelihood-ratio cut-off per parameter
   * (calibrated once at the true parameters: the ideal bootstrap), or
   * omitted to calibrate on every replicate at its own estimates with
   * `bootstrapReplicates` replicates (the real method, much slower).
   */
  readonly bootstrapCutoff?: Readonly<Record<string, number>>;
  readonly bootstrapReplicates?: number;
}

/** Result of one coverage replicate: per method and parameter, the interval and whether it covers the truth. */
export interface CoverageResult {
  readonly index: number;
  readonly converged: boolean;
  readonly intervals: Record<string, Record<string, { lower: number | null; upper: number | null; covered: boolean }>>;
  /** Per method: whether the fit fell back to the plain profile (see `fitModel`). */
  readonly fallbacks?: Record<string, boolean>;
}

/**
 * Simulate one lineage from the model at the true parameters on the design
 * (seed from (seed, index) only), fit it, and build each method's 95%
 * interval for each named parameter. A pure function of the task.
 *
 * @example
 * const design = { time: [0, 1, 2, 3, 4, 5], count: [5, 5, 5, 5, 5, 5], withinVariance: [0.1, 0.1, 0.1, 0.1, 0.1, 0.1], timeUnit: 'Myr' };
 * const result = coverageReplicate({ design, model: 'random-walk', parameters: { ancestral_mean: 0, step_variance: 1 }, names: ['step_variance'], methods: ['profile'], seed: 1, index: 0 });
 * const interval = result.intervals.profile.step_variance;
 * interval.covered === (interval.lower <= 1 && 1 <= interval.upper); // true
 * result.converged; // true
 */
export function coverageReplicate(task: CoverageTask): CoverageResult {
  const model = findModel(task.model);
  if (!model) throw new Error(`unknown model "${task.model}"`);
  const design = designLineage(task.design);
  const means = simulateMeans(model, design, { ...task.parameters }, createRandom(replicateSeed(task.seed, 11, task.index)));
  const lineage = withMeans(design, means);
  const fit = fitModel(model, lineage, { intervals: false });
  const intervals: CoverageResult['intervals'] = {};
  const fallbacks: Record<string, boolean> = {};
  if (!fit.converged) return { index: task.index, converged: false, intervals, fallbacks };
  const evaluator = new LikelihoodEvaluator(model, lineage);
  const ends = (evaluate: (process: number[]) => number, best: readonly number[], axisIndex: number, cutoff: number, gradient?: (process: number[]) => ArrayLike<number>): IntervalEnds =>
    processInterval(evaluate, model, lineage, best, axisIndex, cutoff, gradient);
  for (const method of task.methods) {
    const fixed = method === 'bootstrap' ? task.bootstrapCutoff : undefined;
    if (fixed) {
      // The ideal bootstrap: one cut-off per parameter, calibrated at the truth.
      const found = intervalsByProfile(evaluator, task.names, { adjusted: false, ratioCutoff: (name) => fixed[name] ?? chiSquare1At95 }, ends);
      intervals[method] = Object.fromEntries(
        task.names.map((name) => [name, { lower: found[name].lower, upper: found[name].upper, covered: covers(found[name], task.parameters[name]) }]),
      );
      continue;
    }
    // The intervals `fit --intervals METHOD` reports, fallbacks included (bootstrap drawn from the restricted fit, seeded per replicate).
    const methodFit = fitModel(model, lineage, {
      intervalMethod: method,
      intervalParameters: task.names,
      bootstrapReplicates: task.bootstrapReplicates ?? 99,
      bootstrapSeed: replicateSeed(task.seed, 13, task.index),
    });
    intervals[method] = Object.fromEntries(
      task.names.map((name) => {
        const found = methodFit.parameters[name];
        // A parameter without a finite estimate (ou's optimum at the alpha -> 0 limit) has no interval: open both ways.
        const interval: IntervalEnds = found && found.estimate !== null ? found : { lower: null, upper: null, lowerAtBound: true, upperAtBound: true };
        return [name, { lower: interval.lower, upper: interval.upper, covered: covers(interval, task.parameters[name]) }];
      }),
    );
    fallbacks[method] = methodFit.intervalMethod !== method && !(method === 'integrated' && methodFit.intervalMethod === 'adjusted');
  }
  return { index: task.index, converged: true, intervals, fallbacks };
}

/** Coverage of each method and parameter over replicates. */
export interface CoverageSummary {
  readonly replicates: number;
  readonly converged: number;
  /** coverage[method][name]: fraction of converged replicates whose interval covered the truth. */
  readonly coverage: Record<string, Record<string, number>>;
  /** fallback[method]: fraction of converged replicates whose fit fell back to the plain profile. */
  readonly fallback: Record<string, number>;
}

/**
 * Fractions of covering intervals over replicate results.
 *
 * @example
 * const result = { index: 0, converged: true, intervals: { profile: { step_variance: { lower: 0.3, upper: 4.8, covered: true } } }, fallbacks: { profile: false } };
 * summariseCoverage([result, { ...result, converged: false }], ['profile'], ['step_variance']); // { replicates: 2, converged: 1, coverage: { profile: { step_variance: 1 } }, fallback: { profile: 0 } } (over converged replicates)
 */
export function summariseCoverage(results: readonly CoverageResult[], methods: readonly string[], names: readonly string[]): CoverageSummary {
  const converged = results.filter((result) => result.converged);
  const coverage: Record<string, Record<string, number>> = {};
  const fallback: Record<string, number> = {};
  for (const method of methods) {
    fallback[method] = converged.length > 0 ? converged.filter((result) => result.fallbacks?.[method]).length / converged.length : Number.NaN;
    coverage[method] = {};
    for (const name of names) {
      const hits = converged.filter((result) => result.intervals[method]?.[name]?.covered).length;
      coverage[method][name] = converged.length > 0 ? hits / converged.length : Number.NaN;
    }
  }
  return { replicates: results.length, converged: converged.length, coverage, fallback };
}
