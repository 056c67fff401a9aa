import { fitModel } from '../fit/fit-model.js';
import { bootstrapCutoffs } from '../fit/intervals-bootstrap.js';
import { intervalMethods, type IntervalMethod } from '../fit/intervals.js';
import { chiSquare1At95 } from '../fit/model-choice.js';
import { orderQuantile } from '../statistics/quantiles.js';
import { classicModels, findModel } from '../models/registry.js';
import { summariseCoverage, type CoverageSummary, type CoverageTask } from './coverage.js';
import { designLineage, extendDesign, pooledWithinSd, type Design } from './design.js';
import type { FitReplicateResult, FitReplicateTask } from './replicates.js';
import { ratioStatistic } from './replicates.js';
import type { BatchProgress, ReplicateRunner } from './run-replicates.js';

/** What `power` is asked to do, as plain data. */
export interface PowerPlan {
  readonly design: Design;
  /** Step variance of the generating directional walk (trait^2 per time unit). */
  readonly stepVariance: number;
  readonly ancestralMean: number;
  /** Drift values per time unit; 0 is added when missing (the false-trend rate). */
  readonly drifts: readonly number[];
  /** Replicates per grid point (and in the null set that calibrates the likelihood-ratio test). */
  readonly replicates: number;
  readonly seed: number;
  /** Akaike-weight threshold for p_weight (default 0.5). */
  readonly weightThreshold?: number;
  /** Test level (default 0.05) and target power (default 0.8). */
  readonly level?: number;
  readonly targetPower?: number;
  /** A drift (per time unit) for which to find the horizons needed to reach the target power. */
  readonly targetDrift?: number | null;
  /** Largest design searched for `targetDrift` (default 10 × the file's horizons, at most 2000). */
  readonly maximumHorizons?: number;
  /** Interval coverage check on the design (default true), with this many replicates (default `replicates`). */
  readonly coverage?: boolean;
  readonly coverageReplicates?: number;
  /** Drift of the fitted directional walk: the truth of the coverage check (default 0). */
  readonly fittedDrift?: number;
  /** Ids of the models fitted to every replicate (default the classic five); must include random-walk and directional-walk. */
  readonly models?: readonly string[];
}

/** One grid point: the rates of the three decision rules at one drift. */
export interface PowerPoint {
  readonly drift: number;
  /** Drift in pooled within-horizon standard deviations per time unit. */
  readonly drift_sd: number;
  /** P(directional walk has the lowest AICc among the five models). */
  readonly p_best: number;
  /** P(directional walk's Akaike weight > threshold). */
  readonly p_weight: number;
  /** P(bootstrap likelihood-ratio test of directional vs random walk rejects at the level). */
  readonly p_lrt: number;
  /** Replicates whose fits were usable. */
  readonly replicates: number;
}

/** Everything `power` reports. */
export interface PowerReport {
  readonly grid: PowerPoint[];
  /** The same rates at drift 0: how often the design "finds" a trend that is not there. */
  readonly false_trend: { readonly p_best: number; readonly p_weight: number; readonly p_lrt: number };
  /** Bootstrap critical value of 2 (logL_directional - logL_random-walk) at the level, with the chi-square(1) value beside it. */
  readonly lrt: { readonly critical_value: number; readonly chi_square_critical_value: number; readonly null_replicates: number; readonly level: number };
  /** Smallest drift on the grid (linearly interpolated) reaching the target power, per rule; null when the grid never reaches it. */
  readonly smallest_drift: { readonly power: number; readonly p_best: number | null; readonly p_weight: number | null; readonly p_lrt: number | null };
  readonly horizons_needed: HorizonsNeeded | null;
  readonly coverage: PowerCoverage | null;
  readonly settings: {
    readonly replicates: number;
    readonly seed: number;
    readonly weight_threshold: number;
    readonly step_variance: number;
    readonly ancestral_mean: number;
    readonly pooled_within_sd: number;
    readonly horizons: number;
    readonly span: number;
    readonly time_unit: string;
  };
}

/** The answer to "how many horizons for this drift". */
/**
 * The coverage check on the design. A parameter whose true value sits on its
 * bound (a step variance of 0) is covered by every interval that reaches the
 * bound, so its share is 1 by construction: it is reported as null in
 * `coverage` with the reason in `vacuous`, never as 1.000.
 */
export interface PowerCoverage extends Omit<CoverageSummary, 'coverage' | 'fallback'> {
  readonly coverage: Record<string, Record<string, number | null>>;
  /** Parameters whose coverage says nothing here, with the reason. */
  readonly vacuous: Record<string, string>;
  readonly model: string;
  readonly nominal: number;
  readonly parameters: Record<string, number>;
  readonly bootstrap_cutoff: Record<string, number>;
}

/** Why the coverage of a step variance whose true value is 0 is not a check (user-facing). */
export const vacuousBoundWords = 'the true step variance is 0, its lower bound: every interval that reaches the bound contains it, so coverage is 1 by construction and says nothing about calibration';

export interface HorizonsNeeded {
  readonly drift: number;
  readonly power: number;
  /** Horizons needed (at the file's spacing and sample sizes), or null when not reached by `searched_up_to`. */
  readonly horizons: number | null;
  /** Power of the likelihood-ratio test at the file's own horizons and at the answer. */
  readonly power_now: number;
  readonly power_at_answer: number | null;
  readonly searched_up_to: number;
}

/** Progress of a run: a stage starts with its number of tasks, then reports tasks done. */
export interface PowerProgress {
  stage(label: string, total: number): BatchProgress;
}

const allModels = (): string[] => classicModels.map((model) => model.id);

/**
 * The drift grid used when none is given: multiples 0, 0.5, ..., 5 of the
 * standard error of the drift estimate on this design (a Wald test at 5%
 * reaches 80% power near 2.8 standard errors, so the grid spans the whole
 * rise of the power curve).
 *
 * @example
 * defaultDrifts(2); // [0, 1, 2, 3, 4, 5, 6, 7, 8, 10] (0 to 5 standard errors)
 */
export function defaultDrifts(standardError: number): number[] {
  return [0, 0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4, 5].map((multiple) => multiple * standardError);
}

/**
 * Power of a design to detect a directional trend, by simulation: for each
 * drift, `replicates` lineages are drawn from the directional walk (the
 * design's times and sampling variances, the given step variance) and every
 * model is fitted. The likelihood-ratio test of directional vs random walk
 * uses a critical value from a separate null set of replicates (drift 0,
 * same step variance), i.e. a parametric bootstrap at the fitted null.
 * Pure apart from the injected runner; seeds come from (seed, grid point,
 * replicate) only.
 *
 * @example
 * // A small seeded run (9 replicates per drift); the real command uses hundreds.
 * const design = { time: [0, 1, 2, 3, 4, 5], count: [5, 5, 5, 5, 5, 5], withinVariance: [0.1, 0.1, 0.1, 0.1, 0.1, 0.1], timeUnit: 'Myr' };
 * const plan = { design, stepVariance: 0.1, ancestralMean: 0, drifts: [1], replicates: 9, seed: 1, coverage: false, models: ['random-walk', 'directional-walk'] };
 * const report = await powerAnalysis(plan, poolRunner({ threads: 1 }));
 * report.grid.map((point) => point.drift); // [0, 1] (0 added: the false-trend rate)
 * report.lrt.chi_square_critical_value; // 3.841458820694124 (to 1e-9; the chi-square(1) 95% quantile, common practice)
 * report.settings.pooled_within_sd; // 0.31622776601683794 (to 1e-15; sqrt(0.1))
 */
export async function powerAnalysis(plan: PowerPlan, runner: ReplicateRunner, progress?: PowerProgress): Promise<PowerReport> {
  const level = plan.level ?? 0.05;
  const targetPower = plan.targetPower ?? 0.8;
  const threshold = plan.weightThreshold ?? 0.5;
  const withinSd = pooledWithinSd(plan.design);
  const drifts = [...new Set([0, ...plan.drifts])].sort((a, b) => a - b);
  const parameters = (drift: number): Record<string, number> => ({ ancestral_mean: plan.ancestralMean, drift, step_variance: plan.stepVariance });
  const models = plan.models ?? allModels();
  // Null set (stream 1) for the critical value; grid points use streams 100 + index.
  const critical = await criticalValue(plan.design, plan, runner, 1, ['random-walk', 'directional-walk'], level, progress);
  const tasks: FitReplicateTask[] = [];
  drifts.forEach((drift, point) => {
    for (let index = 0; index < plan.replicates; index++) {
      tasks.push({ design: plan.design, generator: 'directional-walk', parameters: parameters(drift), fit: models, seed: plan.seed, stream: 100 + point, index });
    }
  });
  const results = await runner.fits(tasks, progress?.stage('power grid', tasks.length));
  const grid: PowerPoint[] = drifts.map((drift, point) => {
    const mine = results.filter((result) => result.stream === 100 + point);
    return { drift, drift_sd: drift / withinSd, ...rates(mine, threshold, critical.value), replicates: mine.length };
  });
  const zero = grid[drifts.indexOf(0)];
  const positive = grid.filter((point) => point.drift >= 0);
  const crossing = (key: 'p_best' | 'p_weight' | 'p_lrt'): number | null => firstCrossing(positive.map((point) => [point.drift, point[key]]), targetPower);
  let horizonsNeeded: HorizonsNeeded | null = null;
  if (plan.targetDrift !== undefined && plan.targetDrift !== null) {
    horizonsNeeded = await horizonsFor(plan, plan.targetDrift, targetPower, level, runner, progress);
  }
  let coverage: PowerReport['coverage'] = null;
  if (plan.coverage !== false) coverage = await coverageCheck(plan, parameters(plan.fittedDrift ?? 0), runner, progress);
  return {
    grid,
    false_trend: { p_best: zero.p_best, p_weight: zero.p_weight, p_lrt: zero.p_lrt },
    lrt: { critical_value: critical.value, chi_square_critical_value: chiSquare1At95, null_replicates: critical.used, level },
    smallest_drift: { power: targetPower, p_best: crossing('p_best'), p_weight: crossing('p_weight'), p_lrt: crossing('p_lrt') },
    horizons_needed: horizonsNeeded,
    coverage,
    settings: {
      replicates: plan.replicates,
      seed: plan.seed,
      weight_threshold: threshold,
      step_variance: plan.stepVariance,
      ancestral_mean: plan.ancestralMean,
      pooled_within_sd: withinSd,
      horizons: plan.design.time.length,
      span: plan.design.time[plan.design.time.length - 1],
      time_unit: plan.design.timeUnit,
    },
  };
}

/**
 * The three decision rules' rates over a set of replicates.
 *
 * @example
 * const r1 = { stream: 0, index: 0, logLik: { 'random-walk': -5, 'directional-walk': -2 }, aicc: {}, weight: { 'directional-walk': 0.7 }, best: 'directional-walk', estimates: {} };
 * const r2 = { stream: 0, index: 1, logLik: { 'random-walk': -5, 'directional-walk': -4.5 }, aicc: {}, weight: { 'directional-walk': 0.2 }, best: 'random-walk', estimates: {} };
 * rates([r1, r2], 0.5, 3.84); // { p_best: 0.5, p_weight: 0.5, p_lrt: 0.5 } (only r1: best, weight 0.7 > 0.5, statistic 6 > 3.84)
 */
export function rates(results: readonly FitReplicateResult[], threshold: number, critical: number): { p_best: number; p_weight: number; p_lrt: number } {
  let best = 0;
  let weight = 0;
  let rejected = 0;
  let usable = 0;
  for (const result of results) {
    const statistic = ratioStatistic(result, 'directional-walk', 'random-walk');
    if (statistic === null) continue;
    usable += 1;
    if (result.best === 'directional-walk') best += 1;
    if ((result.weight['directional-walk'] ?? 0) > threshold) weight += 1;
    if (statistic > critical) rejected += 1;
  }
  const share = (count: number): number => (usable > 0 ? count / usable : Number.NaN);
  return { p_best: share(best), p_weight: share(weight), p_lrt: share(rejected) };
}

/**
 * First point where a rising curve reaches `target`, linearly interpolated between grid points; null when never.
 *
 * @example
 * firstCrossing([[0, 0.05], [1, 0.5], [2, 0.9]], 0.8); // 1.75 (linear between (1, 0.5) and (2, 0.9))
 * firstCrossing([[0, 0.05], [1, 0.5]], 0.8); // null (never reached)
 */
export function firstCrossing(points: readonly (readonly [number, number])[], target: number): number | null {
  for (let i = 0; i < points.length; i++) {
    const [x, y] = points[i];
    if (y >= target) {
      if (i === 0) return x;
      const [x0, y0] = points[i - 1];
      return y === y0 ? x : x0 + ((target - y0) * (x - x0)) / (y - y0);
    }
  }
  return null;
}

/**
 * Bootstrap critical value of the directional-vs-random-walk likelihood
 * ratio on a design: the (1 - level) order-statistic quantile of the
 * statistic over replicates drawn from the random walk (drift 0).
 */
async function criticalValue(
  design: Design,
  plan: PowerPlan,
  runner: ReplicateRunner,
  stream: number,
  fit: readonly string[],
  level: number,
  progress?: PowerProgress,
): Promise<{ value: number; used: number }> {
  const tasks: FitReplicateTask[] = Array.from({ length: plan.replicates }, (_, index) => ({
    design,
    generator: 'random-walk',
    parameters: { ancestral_mean: plan.ancestralMean, step_variance: plan.stepVariance },
    fit,
    seed: plan.seed,
    stream,
    index,
  }));
  const results = await runner.fits(tasks, progress?.stage(`null replicates (${design.time.length} horizons)`, tasks.length));
  const statistics = results.map((result) => ratioStatistic(result, 'directional-walk', 'random-walk')).filter((value): value is number => value !== null).sort((a, b) => a - b);
  return { value: statistics.length > 0 ? orderQuantile(statistics, 1 - level) : chiSquare1At95, used: statistics.length };
}

/** Power of the bootstrap likelihood-ratio test at one drift on one design (random walk and directional walk fitted only). */
async function lrtPower(design: Design, drift: number, plan: PowerPlan, level: number, stream: number, runner: ReplicateRunner, progress?: PowerProgress): Promise<number> {
  const fit = ['random-walk', 'directional-walk'];
  const critical = await criticalValue(design, plan, runner, stream, fit, level, progress);
  const tasks: FitReplicateTask[] = Array.from({ length: plan.replicates }, (_, index) => ({
    design,
    generator: 'directional-walk',
    parameters: { ancestral_mean: plan.ancestralMean, drift, step_variance: plan.stepVariance },
    fit,
    seed: plan.seed,
    stream: stream + 1,
    index,
  }));
  const results = await runner.fits(tasks, progress?.stage(`drift ${drift.toPrecision(3)} on ${design.time.length} horizons`, tasks.length));
  return rates(results, 1, critical.value).p_lrt;
}

/**
 * Horizons needed for the likelihood-ratio test to reach the target power at
 * `drift`: the design is continued at its own spacing and sample sizes
 * (`extendDesign`), grown by half again until the power is reached, then
 * bisected. Streams depend on the number of horizons, so each design's
 * answer is reproducible on its own.
 */
async function horizonsFor(plan: PowerPlan, drift: number, target: number, level: number, runner: ReplicateRunner, progress?: PowerProgress): Promise<HorizonsNeeded> {
  const start = plan.design.time.length;
  const ceiling = plan.maximumHorizons ?? Math.min(2000, Math.max(start * 10, 30));
  const powerAt = new Map<number, number>();
  const evaluate = async (horizons: number): Promise<number> => {
    const known = powerAt.get(horizons);
    if (known !== undefined) return known;
    const value = await lrtPower(extendDesign(plan.design, horizons), drift, plan, level, 10_000 + 2 * horizons, runner, progress);
    powerAt.set(horizons, value);
    return value;
  };
  const now = await evaluate(start);
  if (now >= target) return { drift, power: target, horizons: start, power_now: now, power_at_answer: now, searched_up_to: start };
  let failing = start;
  let reaching: number | null = null;
  let size = start;
  while (size < ceiling) {
    size = Math.min(ceiling, Math.ceil(size * 1.5));
    if ((await evaluate(size)) >= target) {
      reaching = size;
      break;
    }
    failing = size;
  }
  if (reaching === null) return { drift, power: target, horizons: null, power_now: now, power_at_answer: null, searched_up_to: ceiling };
  while (reaching - failing > Math.max(1, Math.round(reaching * 0.05))) {
    const middle = Math.floor((failing + reaching) / 2);
    if ((await evaluate(middle)) >= target) reaching = middle;
    else failing = middle;
  }
  return { drift, power: target, horizons: reaching, power_now: now, power_at_answer: powerAt.get(reaching) ?? null, searched_up_to: ceiling };
}

/**
 * Coverage check on the user's design: lineages drawn from the fitted
 * directional walk, every interval method's 95% intervals for drift and step
 * variance, and the share that cover the true (fitted) values. The
 * bootstrap method's cut-off is calibrated once at the truth (the ideal
 * bootstrap; its per-lineage version can only do worse).
 */
async function coverageCheck(plan: PowerPlan, truth: Record<string, number>, runner: ReplicateRunner, progress?: PowerProgress): Promise<NonNullable<PowerReport['coverage']>> {
  const names = ['drift', 'step_variance'];
  const methods: IntervalMethod[] = [...intervalMethods];
  const model = findModel('directional-walk');
  if (!model) throw new Error('directional-walk is not registered');
  const replicates = plan.coverageReplicates ?? plan.replicates;
  const cutoffs = bootstrapCutoffs(model, designLineage(plan.design), truth, names, {
    replicates: Math.max(199, replicates),
    seed: plan.seed,
    refit: (fitted, lineage) => fitModel(fitted, lineage, { intervals: false }),
  });
  const tasks: CoverageTask[] = Array.from({ length: replicates }, (_, index) => ({
    design: plan.design,
    model: 'directional-walk',
    parameters: truth,
    names,
    methods,
    seed: plan.seed,
    index,
    bootstrapCutoff: cutoffs.cutoff,
  }));
  const results = await runner.coverage(tasks, progress?.stage('interval coverage', tasks.length));
  // The fallback shares are the calibration benchmark's; power's document keeps its own keys.
  const { fallback: _fallback, ...summary } = summariseCoverage(results, methods, names);
  const vacuous: Record<string, string> = truth.step_variance === 0 ? { step_variance: vacuousBoundWords } : {};
  const coverage = Object.fromEntries(Object.entries(summary.coverage).map(([method, values]) => [
    method,
    Object.fromEntries(Object.entries(values).map(([name, value]) => [name, name in vacuous ? null : value])),
  ]));
  return { model: 'directional-walk', nominal: 0.95, parameters: truth, bootstrap_cutoff: { ...cutoffs.cutoff }, ...summary, coverage, vacuous };
}
