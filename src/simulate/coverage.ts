import { fitModel, processInterval } from '../fit/fit-model.js';
import { LikelihoodEvaluator } from '../fit/evaluator.js';
import { bootstrapCutoffs } from '../fit/intervals-bootstrap.js';
import { integratedIntervals } from '../fit/intervals-integrated.js';
import { covers, intervalsByProfile, restrictedEstimates, type IntervalEnds, type IntervalMethod } from '../fit/intervals.js';
import { chiSquare1At95 } from '../fit/model-choice.js';
import { findModel } from '../models/registry.js';
import { designLineage, type Design } from './design.js';
import { createRandom } from './random.js';
import { replicateSeed } from './seeds.js';
import { simulateMeans, withMeans } from './simulate-lineage.js';

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
}

/**
 * Simulate one lineage from the model at the true parameters on the design
 * (seed from (seed, index) only), fit it, and build each method's 95%
 * interval for each named parameter. A pure function of the task.
 */
export function coverageReplicate(task: CoverageTask): CoverageResult {
  const model = findModel(task.model);
  if (!model) throw new Error(`unknown model "${task.model}"`);
  const design = designLineage(task.design);
  const means = simulateMeans(model, design, { ...task.parameters }, createRandom(replicateSeed(task.seed, 11, task.index)));
  const lineage = withMeans(design, means);
  const fit = fitModel(model, lineage, { intervals: false });
  const intervals: CoverageResult['intervals'] = {};
  if (!fit.converged) return { index: task.index, converged: false, intervals };
  const evaluator = new LikelihoodEvaluator(model, lineage);
  const ends = (evaluate: (process: number[]) => number, best: readonly number[], axisIndex: number, cutoff: number): IntervalEnds =>
    processInterval(evaluate, model, lineage, best, axisIndex, cutoff);
  for (const method of task.methods) {
    let ratioCutoff = (_name: string): number => chiSquare1At95;
    if (method === 'bootstrap') {
      const fixed = task.bootstrapCutoff;
      if (fixed) ratioCutoff = (name) => fixed[name] ?? chiSquare1At95;
      else {
        // Drawn from the restricted (REML) fit, as `fit --intervals bootstrap` does.
        const generator = { ...fit.estimates, ...restrictedEstimates(evaluator) };
        const cutoffs = bootstrapCutoffs(model, lineage, generator, task.names, {
          replicates: task.bootstrapReplicates ?? 99,
          seed: replicateSeed(task.seed, 13, task.index),
        });
        ratioCutoff = (name) => cutoffs.cutoff[name];
      }
    }
    const integrated = method === 'integrated' ? integratedIntervals(evaluator, task.names) : null;
    if (integrated) {
      // As in fitModel: a variance whose estimate is 0 keeps 0 in its integrated interval.
      for (const name of task.names) if (fit.parameters[name]?.atBound === 'zero') integrated[name] = { ...integrated[name], lower: 0, lowerAtBound: true };
    }
    const found = integrated ?? intervalsByProfile(evaluator, task.names, { adjusted: method === 'adjusted' || method === 'integrated', ratioCutoff }, ends);
    intervals[method] = Object.fromEntries(
      task.names.map((name) => [name, { lower: found[name].lower, upper: found[name].upper, covered: covers(found[name], task.parameters[name]) }]),
    );
  }
  return { index: task.index, converged: true, intervals };
}

/** Coverage of each method and parameter over replicates. */
export interface CoverageSummary {
  readonly replicates: number;
  readonly converged: number;
  /** coverage[method][name]: fraction of converged replicates whose interval covered the truth. */
  readonly coverage: Record<string, Record<string, number>>;
}

/** Fractions of covering intervals over replicate results. */
export function summariseCoverage(results: readonly CoverageResult[], methods: readonly string[], names: readonly string[]): CoverageSummary {
  const converged = results.filter((result) => result.converged);
  const coverage: Record<string, Record<string, number>> = {};
  for (const method of methods) {
    coverage[method] = {};
    for (const name of names) {
      const hits = converged.filter((result) => result.intervals[method]?.[name]?.covered).length;
      coverage[method][name] = converged.length > 0 ? hits / converged.length : Number.NaN;
    }
  }
  return { replicates: results.length, converged: converged.length, coverage };
}
