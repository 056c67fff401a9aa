import type { LineageFit } from '../fit/fit-lineage.js';
import type { ModelFit } from '../fit/fit-results.js';
import { allModels, findModel } from '../models/registry.js';
import { orderQuantile } from '../statistics/quantiles.js';
import { chiSquareSurvival } from '../statistics/chi-square.js';
import { designOf } from './design.js';
import { ratioStatistic, type FitReplicateTask } from './replicates.js';
import type { BatchProgress, ReplicateRunner } from './run-replicates.js';

/** Quantiles of a bootstrap distribution. */
export interface DistributionSummary {
  readonly replicates: number;
  readonly quantiles: Record<string, number>;
}

/** Results of both bootstrap tests on one lineage. */
export interface BootstrapTestReport {
  /** Directional walk against random walk (nested: drift = 0). */
  readonly nested: {
    readonly full: string;
    readonly reduced: string;
    /** Observed 2 (logL_directional - logL_random-walk). */
    readonly statistic: number;
    /** (1 + #{T* >= T}) / (B + 1) over replicates from the fitted random walk. */
    readonly p_bootstrap: number;
    /** Asymptotic chi-square(1) upper-tail probability of the statistic (Wilks). */
    readonly p_chi_square: number;
    readonly critical_value: number;
    readonly null_distribution: DistributionSummary;
  } | null;
  /** Random walk against stasis (not nested): the bootstrap distribution of AICc(stasis) - AICc(random walk) under each fitted model. */
  readonly non_nested: {
    readonly models: readonly [string, string];
    /** Observed AICc(stasis) - AICc(random walk): positive favours the random walk. */
    readonly delta_aicc: number;
    /** Share of replicates from fitted stasis with a difference at least as large: a p-value against stasis. */
    readonly p_under_stasis: number;
    /** Share of replicates from the fitted random walk with a difference at most as large: a p-value against the random walk. */
    readonly p_under_random_walk: number;
    readonly under_stasis: DistributionSummary;
    readonly under_random_walk: DistributionSummary;
  } | null;
  /**
   * `bootstrap --models`: each listed newer model against the classic model
   * it nests (absent when none was asked for, so the default document is
   * unchanged).
   */
  readonly nested_models?: readonly NestingTest[];
  readonly replicates: number;
  readonly seed: number;
}

/** A newer model against the classic model it nests: a parametric-bootstrap likelihood-ratio test. */
export interface NestingTest {
  readonly full: string;
  readonly reduced: string;
  /** The restriction that turns `full` into `reduced`, in words (e.g. "rate_change = 0"). */
  readonly condition: string;
  /** Why not tested (a model not fitted, or the null fit has no finite parameters to draw from); null when tested. */
  readonly not_tested: string | null;
  /** Model the replicates are drawn from: `reduced`, or the model a fit at a limit equals there (ou at alpha → 0: directional-walk). */
  readonly generator: string | null;
  /** Observed 2 (logL_full - logL_reduced), floored at 0. */
  readonly statistic: number | null;
  /** (1 + #{T* >= T}) / (R + 1) over the usable replicates from the fitted reduced model. */
  readonly p_bootstrap: number | null;
  /** Chi-square(1) upper-tail probability of the statistic, for reference. */
  readonly p_chi_square: number | null;
  /** False when the chi-square(1) reference is not exact even asymptotically; `chi_square_note` says why. */
  readonly chi_square_exact: boolean;
  readonly chi_square_note: string | null;
  readonly critical_value: number | null;
  readonly null_distribution: DistributionSummary | null;
}

/**
 * Stream of the replicate seeds of the nesting test of `id`: 41 + the
 * model's place among the models that declare `nests`, in registry order
 * (models registered later get later streams, so a seed keeps its draws).
 *
 * @example
 * allModels().filter((model) => model.nests !== undefined).map((model) => model.id); // ['accelerating-walk', 'moving-optimum', 'optimum-shift']
 * nestingStream('accelerating-walk'); // 41
 * nestingStream('optimum-shift'); // 43
 */
export function nestingStream(id: string): number {
  return 41 + allModels().filter((model) => model.nests !== undefined).findIndex((model) => model.id === id);
}

/**
 * The model and parameters replicates are drawn from for a fitted null
 * model: its own estimates, or, when it was fitted at a limit where some of
 * its parameters are not finite, the model it equals there (as figures draw
 * it: `EvolutionModel.limitDrawing`). Null when neither gives finite values.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [1e-12, 1e-12, 1e-12, 1e-12] });
 * const generator = nullGenerator(fitModel(randomWalk, lineage, { intervals: false }));
 * generator.model; // 'random-walk'
 * generator.parameters.step_variance; // 2 (to 1e-6; the mean squared increment (1 + 4 + 1) / 3, closed form)
 */
export function nullGenerator(fitted: ModelFit): { model: string; parameters: Record<string, number> } | null {
  const definition = findModel(fitted.id);
  if (!definition) return null;
  // A parameter that is not finite at a limit (ou's optimum at alpha = 0, NaN in the fit) is absent, as in the JSON the figures read.
  const estimates: Record<string, number> = {};
  for (const [name, value] of Object.entries(fitted.estimates)) if (Number.isFinite(value)) estimates[name] = value;
  const derived: Record<string, number> = {};
  for (const [name, value] of Object.entries(fitted.derived)) if (value.estimate !== null && Number.isFinite(value.estimate)) derived[name] = value.estimate;
  const rule = definition.limitDrawing;
  const atLimit = rule !== undefined && rule.applies(estimates, derived);
  const model = atLimit ? findModel(rule.drawnAs) : definition;
  const parameters = atLimit ? rule.parameters(estimates, derived) : estimates;
  if (!model || !model.parameters.every((spec) => Number.isFinite(parameters[spec.name]))) return null;
  return { model: model.id, parameters };
}

const levels = [0.025, 0.05, 0.5, 0.95, 0.975];

function summary(values: number[]): DistributionSummary {
  const sorted = [...values].sort((a, b) => a - b);
  const quantiles: Record<string, number> = {};
  if (sorted.length > 0) for (const level of levels) quantiles[`q${String(level * 100).replace('.', '_')}`] = orderQuantile(sorted, level);
  return { replicates: sorted.length, quantiles };
}

/**
 * Parametric-bootstrap tests on a fitted lineage: replicates are drawn from
 * the fitted null model on the lineage's own design and refitted.
 * Nested (directional vs random walk): bootstrap p-value of the
 * likelihood-ratio statistic beside its chi-square(1) p-value. Non-nested
 * (random walk vs stasis): where the observed AICc difference falls in its
 * bootstrap distribution under each fitted model (Cox 1962, J. R. Stat.
 * Soc. B 24:406-424, for testing separate families by simulation).
 *
 * Davison, A. C. & Hinkley, D. V. (1997). Bootstrap Methods and their
 * Application, ch. 4. Cambridge University Press.
 *
 * @example
 * // A small seeded run (9 replicates); the command's default is larger.
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 1.1, 1.9, 3.2, 3.9, 5.1, 6, 7.2], samplingVariance: Array(8).fill(0.01) });
 * const fit = fitLineage(lineage, classicModels, { intervals: false });
 * const report = await bootstrapTests(fit, 9, 1, poolRunner({ threads: 1 }), undefined, { nested: true, nonNested: false });
 * [report.nested.full, report.nested.reduced, report.non_nested]; // ['directional-walk', 'random-walk', null]
 * report.nested.p_bootstrap; // 0.1 (no replicate reached the observed statistic: (0 + 1) / (9 + 1))
 */
export async function bootstrapTests(
  fit: LineageFit,
  replicates: number,
  seed: number,
  runner: ReplicateRunner,
  stage?: (label: string, total: number) => BatchProgress,
  which: { nested?: boolean; nonNested?: boolean; nesting?: readonly string[]; minimumSegment?: number } = {},
): Promise<BootstrapTestReport> {
  const design = designOf(fit.lineage);
  const byId = new Map(fit.models.map((model) => [model.id, model]));
  const usable = (id: string): boolean => {
    const model = byId.get(id);
    return model !== undefined && model.converged && model.aicc !== null && Object.values(model.estimates).every(Number.isFinite);
  };
  const tasks = (generator: string, fitted: readonly string[], stream: number): FitReplicateTask[] =>
    Array.from({ length: replicates }, (_, index) => ({ design, generator, parameters: { ...byId.get(generator)!.estimates }, fit: fitted, seed, stream, index }));
  let nested: BootstrapTestReport['nested'] = null;
  if (which.nested !== false && usable('random-walk') && usable('directional-walk')) {
    const statistic = Math.max(0, 2 * (byId.get('directional-walk')!.logLik - byId.get('random-walk')!.logLik));
    const results = await runner.fits(tasks('random-walk', ['random-walk', 'directional-walk'], 21), stage?.('replicates from the fitted random walk', replicates));
    const values = results.map((result) => ratioStatistic(result, 'directional-walk', 'random-walk')).filter((value): value is number => value !== null);
    const exceed = values.filter((value) => value >= statistic).length;
    nested = {
      full: 'directional-walk',
      reduced: 'random-walk',
      statistic,
      p_bootstrap: (1 + exceed) / (values.length + 1),
      p_chi_square: chiSquareSurvival(statistic, 1),
      critical_value: orderQuantile([...values].sort((a, b) => a - b), 0.95),
      null_distribution: summary(values),
    };
  }
  let nonNested: BootstrapTestReport['non_nested'] = null;
  if (which.nonNested !== false && usable('random-walk') && usable('stasis')) {
    const observed = byId.get('stasis')!.aicc! - byId.get('random-walk')!.aicc!;
    const difference = (result: { aicc: Record<string, number | null> }): number | null => {
      const stasisCriterion = result.aicc.stasis;
      const walkCriterion = result.aicc['random-walk'];
      return stasisCriterion === null || walkCriterion === null || stasisCriterion === undefined || walkCriterion === undefined ? null : stasisCriterion - walkCriterion;
    };
    const fromStasis = (await runner.fits(tasks('stasis', ['stasis', 'random-walk'], 22), stage?.('replicates from fitted stasis', replicates)))
      .map(difference).filter((value): value is number => value !== null);
    const fromWalk = (await runner.fits(tasks('random-walk', ['stasis', 'random-walk'], 23), stage?.('replicates from the fitted random walk (AICc)', replicates)))
      .map(difference).filter((value): value is number => value !== null);
    nonNested = {
      models: ['random-walk', 'stasis'],
      delta_aicc: observed,
      p_under_stasis: (1 + fromStasis.filter((value) => value >= observed).length) / (fromStasis.length + 1),
      p_under_random_walk: (1 + fromWalk.filter((value) => value <= observed).length) / (fromWalk.length + 1),
      under_stasis: summary(fromStasis),
      under_random_walk: summary(fromWalk),
    };
  }
  const nesting: NestingTest[] = [];
  for (const id of which.nesting ?? []) {
    nesting.push(await nestingTest(fit, id, replicates, seed, runner, stage, which.minimumSegment));
  }
  return which.nesting !== undefined && which.nesting.length > 0
    ? { nested, non_nested: nonNested, nested_models: nesting, replicates, seed }
    : { nested, non_nested: nonNested, replicates, seed };
}

/**
 * The parametric-bootstrap likelihood-ratio test of model `id` against the
 * classic model it nests (`EvolutionModel.nests`), on a lineage fit that
 * holds both: R replicates drawn from the fitted nested model on the
 * lineage's design, both models refitted to each (a shift position searched
 * in each replicate as in the observed fit), T* = 2 (logL*_full −
 * logL*_reduced), p = (1 + #{T* ≥ T}) / (R + 1) (Davison & Hinkley 1997,
 * ch. 4), with the chi-square(1) p-value beside it for reference.
 *
 * @param minimumSegment fewest horizons per segment of a shift model, as the observed fit used (absent: the model's default)
 * @throws Error when `id` is not a model that nests another (the CLI checks first)
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 1.1, 1.9, 3.2, 3.9, 5.1, 6, 7.2], samplingVariance: Array(8).fill(0.01) });
 * const fit = fitLineage(lineage, [randomWalk, acceleratingWalk], { intervals: false });
 * const test = await nestingTest(fit, 'accelerating-walk', 9, 1, poolRunner({ threads: 1 }));
 * [test.reduced, test.condition, test.null_distribution.replicates]; // ['random-walk', 'rate_change = 0', 9]
 * await nestingTest(fit, 'random-walk', 9, 1, poolRunner({ threads: 1 }));
 * // throws: model "random-walk" nests no other model
 */
export async function nestingTest(
  fit: LineageFit,
  id: string,
  replicates: number,
  seed: number,
  runner: ReplicateRunner,
  stage?: (label: string, total: number) => BatchProgress,
  minimumSegment?: number,
): Promise<NestingTest> {
  const nests = findModel(id)?.nests;
  if (!nests) throw new Error(`model "${id}" nests no other model`);
  const caveat = nests.chiSquareCaveat ?? null;
  const base = { full: id, reduced: nests.model, condition: nests.condition, chi_square_exact: caveat === null, chi_square_note: caveat };
  const missing = { generator: null, statistic: null, p_bootstrap: null, p_chi_square: null, critical_value: null, null_distribution: null };
  const full = fit.models.find((model) => model.id === id);
  const reduced = fit.models.find((model) => model.id === nests.model);
  const fitted = (model: ModelFit | undefined): model is ModelFit => model !== undefined && model.converged && Number.isFinite(model.logLik);
  if (!fitted(full) || !fitted(reduced)) {
    const [name, absent] = !fitted(full) ? [id, full] : [nests.model, reduced];
    // The fitter's message already starts "not fitted: …" when the model could not be fitted at all.
    return { ...base, ...missing, not_tested: absent?.message ? `${name}: ${absent.message}` : `${name} was not fitted` };
  }
  const generator = nullGenerator(reduced);
  if (!generator) return { ...base, ...missing, not_tested: `the fitted ${nests.model} has no finite parameters to draw replicates from` };
  const statistic = Math.max(0, 2 * (full.logLik - reduced.logLik));
  const design = designOf(fit.lineage);
  const stream = nestingStream(id);
  const tasks: FitReplicateTask[] = Array.from({ length: replicates }, (_, index) => ({
    design, generator: generator.model, parameters: generator.parameters, fit: [nests.model, id], seed, stream, index, minimumSegment,
  }));
  const results = await runner.fits(tasks, stage?.(`${id}: replicates from fitted ${nests.model}`, replicates));
  const values = results.map((result) => ratioStatistic(result, id, nests.model)).filter((value): value is number => value !== null);
  const sorted = [...values].sort((a, b) => a - b);
  return {
    ...base,
    not_tested: null,
    generator: generator.model,
    statistic,
    p_bootstrap: (1 + values.filter((value) => value >= statistic).length) / (values.length + 1),
    p_chi_square: chiSquareSurvival(statistic, 1),
    critical_value: sorted.length > 0 ? orderQuantile(sorted, 0.95) : null,
    null_distribution: summary(values),
  };
}
