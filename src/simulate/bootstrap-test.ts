import type { LineageFit } from '../fit/fit-lineage.js';
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
  readonly replicates: number;
  readonly seed: number;
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
 */
export async function bootstrapTests(
  fit: LineageFit,
  replicates: number,
  seed: number,
  runner: ReplicateRunner,
  stage?: (label: string, total: number) => BatchProgress,
  which: { nested?: boolean; nonNested?: boolean } = {},
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
  return { nested, non_nested: nonNested, replicates, seed };
}
