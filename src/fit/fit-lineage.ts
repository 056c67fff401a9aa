import { smoothLineage } from '../engine/smoother.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { LikelihoodEvaluator } from './evaluator.js';
import { fitModel, type FitOptions, type ModelFit } from './fit-model.js';
import { aicc, akaikeWeights, lowestCriterion } from './model-choice.js';

/** A model fit with its place in the model-choice table. */
export interface RankedFit extends ModelFit {
  /** AICc, or null when N - K - 1 <= 0 or the model was not fitted (not compared). */
  readonly aicc: number | null;
  readonly deltaAicc: number | null;
  readonly weight: number | null;
  /** Why the model is not compared, when it is not. */
  readonly notCompared: string | null;
}

/** The smoothed lineage mean under one model. */
export interface SmoothedLineage {
  readonly model: string;
  readonly mean: Float64Array;
  readonly standardError: Float64Array;
  readonly standardizedInnovations: Float64Array;
}

/** Every model fitted to one lineage, ranked by AICc. */
export interface LineageFit {
  readonly lineage: Lineage;
  readonly models: readonly RankedFit[];
  /** Id of the best-supported model (lowest AICc), or null when none was compared. */
  readonly best: string | null;
  readonly smoothed: SmoothedLineage | null;
}

/**
 * Fit every model to a lineage and rank them by AICc with Akaike weights
 * (N = number of horizons). Models with N - K - 1 <= 0 are listed as not
 * compared. The lineage mean is smoothed under the best model, unless
 * `smooth` is false (replicate loops, which read only the table: `smoothed`
 * is then null).
 *
 * @example
 * // Unit sampling variances, means 1, 3, 1, 3: strict stasis has mean 2 and logL = -2 ln 2 pi - 2 (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [1, 3, 1, 3], samplingVariance: [1, 1, 1, 1] });
 * const fit = fitLineage(lineage, [strictStasis, randomWalk], { intervals: false });
 * fit.models.map((model) => model.id); // ['strict-stasis', 'random-walk']
 * fit.models[0].logLik; // -5.675754132818691 (to 1e-12)
 * fit.smoothed.model; // 'strict-stasis'
 */
export function fitLineage(lineage: Lineage, models: readonly EvolutionModel[], options: FitOptions = {}, smooth = true): LineageFit {
  const fits = models.map((model) => fitModel(model, lineage, options));
  const horizons = lineage.mean.length;
  const criteria = fits.map((fit) => (fit.converged ? aicc(fit.logLik, fit.k, horizons) : null));
  const { delta, weight } = akaikeWeights(criteria);
  const ranked: RankedFit[] = fits.map((fit, j) => ({
    ...fit,
    aicc: criteria[j],
    deltaAicc: delta[j],
    weight: weight[j],
    notCompared:
      criteria[j] !== null
        ? null
        : !fit.converged
          ? (fit.message ?? 'not fitted')
          : `not compared: N - K - 1 = ${horizons - fit.k - 1} <= 0 (too few horizons for K = ${fit.k})`,
  }));
  const lowest = lowestCriterion(criteria);
  const best: string | null = lowest === -1 ? null : ranked[lowest].id;
  const bestModel = models.find((model) => model.id === best);
  const bestFit = fits.find((fit) => fit.id === best);
  const smoothed = smooth && bestModel && bestFit ? smoothUnder(bestModel, bestFit, lineage) : null;
  return { lineage, models: ranked, best, smoothed };
}

/**
 * Smoothed lineage mean and its standard error under a model at given
 * point estimates (as fit.json holds them), e.g. to redraw the smoother of a
 * model other than the best one. The location coefficients are the GLS ones
 * at the estimates' process values, as in `smoothUnder`.
 *
 * @throws Error when the estimates lack a process parameter of the model
 *
 * @example
 * // Strict stasis at mean 2 with unit sampling variances: the smoothed mean is 2, the errors -1 and 1 in sd units (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const smoothed = smoothUnderEstimates(strictStasis, { stasis_mean: 2 }, lineage);
 * [Array.from(smoothed.mean), Array.from(smoothed.standardError), Array.from(smoothed.standardizedInnovations)]; // [[2, 2], [0, 0], [-1, 1]]
 */
export function smoothUnderEstimates(model: EvolutionModel, estimates: Readonly<Record<string, number>>, lineage: Lineage): SmoothedLineage {
  const process = model.processFrom({ ...estimates }, lineage);
  if (process.some((value) => !Number.isFinite(value))) throw new Error(`${model.id}: the estimates lack a process parameter`);
  return smoothUnder(model, { process }, lineage);
}

/**
 * Smoothed lineage mean and its standard error under a fitted model.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * Array.from(smoothUnder(strictStasis, fitModel(strictStasis, lineage, { intervals: false }), lineage).mean); // [2, 2] (the ML mean, closed form)
 */
export function smoothUnder(model: EvolutionModel, fit: Pick<ModelFit, 'process'>, lineage: Lineage): SmoothedLineage {
  const evaluator = new LikelihoodEvaluator(model, lineage);
  const details = evaluator.details(fit.process);
  evaluator.release();
  model.fillSpace(lineage, fit.process, evaluator.space);
  const size = lineage.mean.length;
  const width = evaluator.space.width;
  const locationMean = new Float64Array(size);
  for (let i = 0; i < size; i++) {
    let value = 0;
    for (let j = 0; j < width; j++) value += evaluator.space.design[i * width + j] * details.coefficients[j];
    locationMean[i] = value;
  }
  const result = smoothLineage(evaluator.space, locationMean, lineage.mean);
  return {
    model: model.id,
    mean: result.smoothedMean,
    standardError: Float64Array.from(result.smoothedVariance, (variance) => Math.sqrt(variance)),
    standardizedInnovations: result.standardizedInnovations,
  };
}
