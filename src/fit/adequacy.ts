import { probit } from 'simple-statistics';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { createRandom } from '../random/random.js';
import { simulateMeans, withMeans } from '../random/simulate-lineage.js';
import { fitAtConfiguration } from './fit-configurations.js';
import { smoothUnder } from './fit-lineage.js';
import { fitModel, type FitOptions, type ModelFit } from './fit-model.js';

/** The statistics computed on the standardised one-step prediction errors. */
export interface AdequacyStatistics {
  /** Lag-1 autocorrelation (0 expected). */
  readonly autocorrelation: number;
  /** Number of runs of errors on the same side of zero. */
  readonly runs: number;
  /** Correlation of |error| with time (0 expected: no trend in spread). */
  readonly spreadTrend: number;
  /** Shapiro–Francia W' (1 for normal errors; small values depart from normality). */
  readonly normality: number;
}

/** One adequacy check with its bootstrap p-value. */
export interface AdequacyCheck {
  readonly name: keyof AdequacyStatistics;
  readonly label: string;
  readonly statistic: number;
  /** Parametric-bootstrap p-value (two-sided, except normality: one-sided, small W'). */
  readonly pValue: number;
  readonly adequate: boolean;
}

/** Adequacy of one fitted model for one lineage. */
export interface AdequacyResult {
  readonly model: string;
  readonly draws: number;
  /** Simulated data sets whose refit failed (left out of the p-values). */
  readonly failedDraws: number;
  readonly seed: number;
  readonly level: number;
  readonly checks: readonly AdequacyCheck[];
  /** True when every check is adequate. */
  readonly adequate: boolean;
  readonly note: string;
}

/** Options of {@link checkAdequacy}. */
export interface AdequacyOptions {
  /** Simulated data sets (default 199). */
  draws?: number;
  /** Seed of the simulation (default 1). */
  seed?: number;
  /** A check is "not adequate" when its p-value is below this (default 0.05). */
  level?: number;
  /** Options of the refits (the minimum segment length of shift models, grid points). */
  fitOptions?: FitOptions;
}

const labels: Record<keyof AdequacyStatistics, string> = {
  autocorrelation: 'lag-1 autocorrelation',
  runs: 'runs above/below zero',
  spreadTrend: 'trend in spread over time',
  normality: 'normality (Shapiro–Francia W\')',
};

/**
 * The four statistics on standardised one-step prediction errors r_i
 * (independent N(0, 1) under a correct model with known parameters):
 * lag-1 autocorrelation sum (r_i - rbar)(r_{i-1} - rbar) / sum (r_i - rbar)^2;
 * the number of runs of signs (r_i >= 0 counts as above); the Pearson
 * correlation of |r_i| with t_i; and the Shapiro–Francia statistic
 * W' = (sum m_i r_(i))^2 / (sum m_i^2 sum (r_i - rbar)^2) with Blom scores
 * m_i = Phi^-1((i - 3/8) / (n + 1/4)) (the probit of simple-statistics; any
 * small error in the scores is the same in the data and in the bootstrap, so
 * the p-value is unaffected).
 *
 * Shapiro, S. S. & Francia, R. S. (1972). An approximate analysis of variance
 * test for normality. JASA 67:215-216. Wald, A. & Wolfowitz, J. (1940). On a
 * test whether two samples are from the same population. Ann. Math. Stat. 11:147-162.
 *
 * @example
 * adequacyStatistics([1, -1, 1, -1], [0, 1, 2, 3]).runs; // 4
 */
export function adequacyStatistics(errors: ArrayLike<number>, time: ArrayLike<number>): AdequacyStatistics {
  const n = errors.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += errors[i];
  mean /= n;
  let sumSquares = 0;
  let lagged = 0;
  let runs = n > 0 ? 1 : 0;
  for (let i = 0; i < n; i++) {
    sumSquares += (errors[i] - mean) ** 2;
    if (i > 0) {
      lagged += (errors[i] - mean) * (errors[i - 1] - mean);
      if (errors[i] >= 0 !== errors[i - 1] >= 0) runs += 1;
    }
  }
  const absolute = Array.from(errors, Math.abs);
  const spreadTrend = correlation(absolute, Array.from(time));
  const sorted = Array.from(errors).sort((a, b) => a - b);
  let cross = 0;
  let scoreSquares = 0;
  for (let i = 0; i < n; i++) {
    const score = probit((i + 1 - 0.375) / (n + 0.25));
    cross += score * sorted[i];
    scoreSquares += score * score;
  }
  return {
    autocorrelation: sumSquares > 0 ? lagged / sumSquares : 0,
    runs,
    spreadTrend,
    normality: sumSquares > 0 && scoreSquares > 0 ? (cross * cross) / (scoreSquares * sumSquares) : 1,
  };
}

/**
 * Pearson correlation by plain two-pass sums; 0 when either list is
 * constant. Kept rather than simple-statistics' `sampleCorrelation`, which
 * gives NaN for a constant list and, summing with compensation, differs in
 * the last bits (e.g. -0.23528055632521053 against ...058 on the sample
 * data's adequacy check), which would change `--adequacy` output.
 */
function correlation(x: readonly number[], y: readonly number[]): number {
  const n = x.length;
  const meanX = x.reduce((sum, value) => sum + value, 0) / n;
  const meanY = y.reduce((sum, value) => sum + value, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - meanX) * (y[i] - meanY);
    sxx += (x[i] - meanX) ** 2;
    syy += (y[i] - meanY) ** 2;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : 0;
}

/**
 * Parametric-bootstrap p-value of an observed statistic against simulated
 * ones, counting the observed value among the draws: (1 + #{sim <= obs}) /
 * (B + 1) for the lower tail, the same for the upper, two-sided as twice
 * the smaller (capped at 1). (Davison & Hinkley 1997, Bootstrap Methods and
 * their Application, ch. 4.)
 *
 * @example
 * bootstrapPValue(0.5, [0.1, 0.2, 0.7, 0.9], 'lower'); // 0.6 ((1 + 2) / (4 + 1))
 * bootstrapPValue(0.5, [0.1, 0.2, 0.7, 0.9], 'two-sided'); // 1 (twice 0.6, capped)
 * bootstrapPValue(0, [0.1, 0.2, 0.7, 0.9], 'two-sided'); // 0.4 (2 × (1 + 0) / 5)
 */
export function bootstrapPValue(observed: number, simulated: readonly number[], tail: 'two-sided' | 'lower'): number {
  let below = 0;
  let above = 0;
  for (const value of simulated) {
    if (value <= observed) below += 1;
    if (value >= observed) above += 1;
  }
  const lower = (1 + below) / (simulated.length + 1);
  if (tail === 'lower') return lower;
  const upper = (1 + above) / (simulated.length + 1);
  return Math.min(1, 2 * Math.min(lower, upper));
}

/**
 * Model adequacy of a fitted model (Voje, Starrfelt & Liow 2018): compute
 * the statistics on the standardised one-step prediction errors of the
 * filter at the fitted parameters, then simulate `draws` data sets from the
 * fitted model on the lineage's own times and sampling variances (seeded),
 * refit the model to each (shift models at their fitted shift positions), and
 * compare. A check is adequate when its p-value is at least `level`; with
 * four checks, one "not adequate" at 0.05 happens by chance in about 1 of 5
 * adequate fits.
 *
 * Voje, K. L., Starrfelt, J. & Liow, L. H. (2018). Model adequacy and
 * microevolutionary explanations for stasis in the fossil record. American
 * Naturalist 191:509-523.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 1.1, 1.9, 3.2, 3.9, 5.1, 6, 7.2], samplingVariance: Array(8).fill(0.01) });
 * const result = checkAdequacy(randomWalk, fitModel(randomWalk, lineage, { intervals: false }), lineage, { draws: 9, seed: 1 });
 * result.checks.map((check) => check.name); // ['autocorrelation', 'runs', 'spreadTrend', 'normality']
 * result.checks.map((check) => check.pValue); // [1, 0.2, 0.4, 0.1] (multiples of 1 / (9 + 1): nine draws)
 * result.adequate; // true
 */
export function checkAdequacy(model: EvolutionModel, fit: ModelFit, lineage: Lineage, options: AdequacyOptions = {}): AdequacyResult {
  const draws = options.draws ?? 199;
  const seed = options.seed ?? 1;
  const level = options.level ?? 0.05;
  const refitOptions: FitOptions = { ...(options.fitOptions ?? {}), intervals: false, onProgress: undefined };
  const shifts = (fit.extra?.shifts as { index: number }[] | undefined)?.map((shift) => shift.index);
  const refit = (data: Lineage): ModelFit =>
    model.configurations && shifts ? fitAtConfiguration(model, data, { shifts }, refitOptions, fitModel) : fitModel(model, data, refitOptions);
  const observed = adequacyStatistics(smoothUnder(model, fit, lineage).standardizedInnovations, lineage.time);
  const random = createRandom(seed);
  const simulated: AdequacyStatistics[] = [];
  let failedDraws = 0;
  for (let draw = 0; draw < draws; draw++) {
    const data = withMeans(lineage, simulateMeans(model, lineage, fit.estimates, random));
    const refitted = refit(data);
    if (!refitted.converged) {
      failedDraws += 1;
      continue;
    }
    simulated.push(adequacyStatistics(smoothUnder(model, refitted, data).standardizedInnovations, data.time));
  }
  if (simulated.length < Math.min(draws, 19)) {
    // Too few usable simulations (e.g. an estimate at a limit the simulator cannot draw from): say so, never pass by default.
    const checks = (Object.keys(labels) as (keyof AdequacyStatistics)[]).map((name): AdequacyCheck => ({ name, label: labels[name], statistic: observed[name], pValue: Number.NaN, adequate: false }));
    return {
      model: model.id, draws, failedDraws, seed, level, checks, adequate: false,
      note: `Not checked: only ${simulated.length} of ${draws} data sets simulated from the fitted model could be refitted, too few for bootstrap p-values.`,
    };
  }
  const checks = (Object.keys(labels) as (keyof AdequacyStatistics)[]).map((name): AdequacyCheck => {
    const pValue = bootstrapPValue(observed[name], simulated.map((statistics) => statistics[name]), name === 'normality' ? 'lower' : 'two-sided');
    return { name, label: labels[name], statistic: observed[name], pValue, adequate: pValue >= level };
  });
  return {
    model: model.id,
    draws,
    failedDraws,
    seed,
    level,
    checks,
    adequate: checks.every((check) => check.adequate),
    note:
      'Checks on the standardised one-step prediction errors, p-values by parametric bootstrap from the fitted model ' +
      `(${draws} simulated data sets, seed ${seed}, each refitted${shifts ? ' at the fitted shift positions' : ''}). ` +
      'Passing says the model is not contradicted by these features of the data, not that it is the process that produced them.',
  };
}
