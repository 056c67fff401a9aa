import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { createRandom } from '../random/random.js';
import { replicateSeed } from '../random/seeds.js';
import { simulateMeans, withMeans } from '../random/simulate-lineage.js';
import { LikelihoodEvaluator } from './evaluator.js';
import type { ModelFit } from './fit-results.js';
import { profileFunction } from './intervals.js';
import { chiSquare1At95 } from './model-choice.js';
import { orderQuantile } from '../statistics/quantiles.js';

/** Options of {@link bootstrapCutoffs}. */
export interface BootstrapCutoffOptions {
  /** Number of bootstrap replicates (default 199). */
  readonly replicates?: number;
  /** Seed of the replicates (default 1). */
  readonly seed?: number;
  /** Coverage level (default 0.95). */
  readonly level?: number;
  /** The fitter, without intervals, for each replicate (`fitModel(model, lineage, { intervals: false })`); passed in so this file does not import fit-model.ts, which imports it. */
  readonly refit: Refit;
}

/** Fit one model to one lineage without intervals (the bootstrap's refit of each replicate). */
export type Refit = (model: EvolutionModel, lineage: Lineage) => ModelFit;

/** Likelihood-ratio cut-offs per parameter, with how many replicates made them. */
export interface BootstrapCutoffs {
  /** Cut-off on 2 (logL_max - profile) for each parameter; chi2(1; 0.95) where none could be made. */
  readonly cutoff: Readonly<Record<string, number>>;
  /** Replicates that gave a finite statistic, per parameter. */
  readonly used: Readonly<Record<string, number>>;
}

/**
 * Parametric-bootstrap calibration of the profile-likelihood cut-off: draw
 * `replicates` lineages from the model at the given estimates on the
 * lineage's design, refit each, and take the `level` quantile (order
 * statistic ceil(level (B + 1))) of the likelihood-ratio statistic
 * 2 (logL_max - profile(true value)) for each parameter. Replacing
 * chi2(1; 0.95) by that quantile gives intervals whose coverage at the
 * fitted model is right by construction, whatever the sample size.
 *
 * Hall, P. (1986). On the bootstrap and confidence intervals. Ann. Stat.
 * 14:1431-1452; Davison, A. C. & Hinkley, D. V. (1997). Bootstrap Methods
 * and their Application, ch. 5. Cambridge University Press.
 *
 * Seeds come from (seed, replicate index) only. Parameters whose estimate is
 * not finite (ou at a limit) keep the asymptotic cut-off.
 *
 * @example
 * // A small seeded run (19 replicates; the method's default is 199). For a normal mean with known variance the
 * // statistic is exactly chi2(1), so the cut-off estimates its 95% quantile 3.84 (common practice), noisily at 19 draws.
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const refit = (model, data) => fitModel(model, data, { intervals: false });
 * const cutoffs = bootstrapCutoffs(strictStasis, lineage, { stasis_mean: 2 }, ['stasis_mean'], { replicates: 19, seed: 1, refit });
 * cutoffs.used; // { stasis_mean: 19 }
 * cutoffs.cutoff.stasis_mean; // 6.53494932102705 (to 1e-9; seeded)
 */
export function bootstrapCutoffs(
  model: EvolutionModel,
  design: Lineage,
  estimates: Readonly<Record<string, number>>,
  names: readonly string[],
  options: BootstrapCutoffOptions,
): BootstrapCutoffs {
  const replicates = options.replicates ?? 199;
  const seed = options.seed ?? 1;
  const level = options.level ?? 0.95;
  const statistics: Record<string, number[]> = Object.fromEntries(names.map((name) => [name, []]));
  const finite = names.every((name) => Number.isFinite(estimates[name])) && model.parameters.every((spec) => Number.isFinite(estimates[spec.name]));
  if (finite) {
    for (let r = 0; r < replicates; r++) {
      const means = simulateMeans(model, design, { ...estimates }, createRandom(replicateSeed(seed, 7, r)));
      const lineage = withMeans(design, means);
      const refit = options.refit(model, lineage);
      if (!refit.converged) continue;
      const evaluator = new LikelihoodEvaluator(model, lineage);
      for (const name of names) {
        const profile = profileFunction(evaluator, name, false)(estimates[name]);
        const statistic = 2 * (refit.logLik - profile);
        if (Number.isFinite(statistic)) statistics[name].push(Math.max(0, statistic));
      }
    }
  }
  const cutoff: Record<string, number> = {};
  const used: Record<string, number> = {};
  for (const name of names) {
    const values = statistics[name].sort((a, b) => a - b);
    used[name] = values.length;
    cutoff[name] = values.length >= 19 ? orderQuantile(values, level) : chiSquare1At95;
  }
  return { cutoff, used };
}

