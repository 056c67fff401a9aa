import { runsAsCommand, takeOption } from './command-line.js';
import { fitJointModel } from '../src/joint/fit-joint.js';
import type { JointInterval } from '../src/joint/joint-intervals.js';
import { jointModel, type JointModel, type JointModelId } from '../src/joint/joint-models.js';
import { simulateJoint, type JointTruth } from '../src/joint/simulate-joint.js';
import type { JointData } from '../src/joint/vector-filter.js';
import { runTasks } from '../src/parallel/pool.js';
import { createRandom } from '../src/random/random.js';
import { replicateSeed } from '../src/random/seeds.js';

/** The joint models whose intervals are measured: the cheaper ones (the ou models cost several seconds per fit with intervals). */
export const coverageModels = ['correlated-random-walk', 'correlated-directional-walk', 'correlated-stasis'] as const satisfies readonly JointModelId[];
export type CoverageModelId = (typeof coverageModels)[number];

/** One simulated 2-trait group, as plain data for a worker. */
export interface JointCoverageTask {
  readonly model: CoverageModelId;
  readonly horizons: number;
  readonly seed: number;
  readonly index: number;
}

/** Per parameter (e.g. "ancestral_mean[1]", "step_correlation"): did the 95% interval cover the truth. */
export interface JointCoverageResult {
  /** Null when the model could not be fitted. */
  readonly covered: Record<string, boolean> | null;
  /** Parameters whose interval has an open end (null: the profile never fell to the cut-off). */
  readonly open: string[];
  /** Parameters whose interval does not contain its own estimate (a defect: it should never happen). */
  readonly misplaced: string[];
  readonly milliseconds: number;
}

/** Sampling variance of a horizon mean of trait 1 (within-horizon variance 0.3, 21 specimens: as the sample data); trait 2 is on a scale twice as wide. */
const samplingVariance = 0.3 / 21;
/** The true evolutionary (step or stasis) correlation of the two traits. */
export const trueCorrelation = 0.6;

/**
 * The invented design of one group: two traits at `horizons` horizons,
 * uneven spacing (0.5–1.5 time units) drawn from the group's seed, sampling
 * variances 0.3 / 21 (trait 1) and 4 times that (trait 2, twice the
 * scale), sampling errors uncorrelated.
 */
export function coverageDesign(horizons: number, seed: number): JointData {
  const shape = createRandom(seed);
  const time = [0];
  for (let i = 1; i < horizons; i++) time.push(time[i - 1] + 0.5 + shape.uniform());
  const sampling = new Float64Array(horizons * 4);
  for (let i = 0; i < horizons; i++) {
    sampling[i * 4] = samplingVariance;
    sampling[i * 4 + 3] = 4 * samplingVariance;
  }
  return { traits: 2, time: Float64Array.from(time), values: new Float64Array(horizons * 2), sampling };
}

/**
 * True parameters on a design. Walks: step variance per average interval
 * equal to the sampling variance of a mean (trait 2: 4 times, its scale
 * being twice as wide), step correlation 0.6, ancestral means 4.4 and 10;
 * the directional walk drifts +0.5 and -0.5 step sd per time unit. Stasis:
 * variances equal to the sampling variances, correlation 0.6, means 4.4 and
 * 10.
 */
export function coverageTruth(model: JointModel, design: JointData): JointTruth {
  const horizons = design.time.length;
  const meanInterval = design.time[horizons - 1] / (horizons - 1);
  const variance = model.process === 'stasis' ? samplingVariance : samplingVariance / meanInterval;
  const covariance = Float64Array.of(variance, trueCorrelation * 2 * variance, trueCorrelation * 2 * variance, 4 * variance);
  const locations = model.mean === 'drift' ? [4.4, 0.5 * Math.sqrt(variance), 10, -0.5 * 2 * Math.sqrt(variance)] : [4.4, 10];
  return { locations, covariance, alpha: null };
}

/** True value, estimate and interval of every parameter of a fit, under one name each. */
function parameterTable(model: JointModel, truth: JointTruth, fit: ReturnType<typeof fitJointModel>): { name: string; truth: number; estimate: number | null; interval: JointInterval | null }[] {
  const parameters = fit.parameters!;
  const intervals = fit.intervals!;
  const rows: { name: string; truth: number; estimate: number | null; interval: JointInterval | null }[] = [];
  const per = model.mean === 'drift' ? 2 : 1;
  const level = model.process === 'stasis' ? 'stasis_mean' : 'ancestral_mean';
  const covariance = model.process === 'stasis' ? 'stasis_covariance' : 'step_covariance';
  for (let j = 0; j < 2; j++) {
    rows.push({ name: `${level}[${j + 1}]`, truth: truth.locations[j * per], estimate: parameters[level]![j], interval: intervals[level]![j] });
    if (model.mean === 'drift') rows.push({ name: `drift[${j + 1}]`, truth: truth.locations[j * per + 1], estimate: parameters.drift![j], interval: intervals.drift![j] });
    rows.push({ name: `${covariance}[${j + 1}][${j + 1}]`, truth: truth.covariance[j * 3], estimate: parameters[covariance]![j][j], interval: intervals[covariance]![j][j] });
  }
  // The stasis models give their correlation's estimate through the covariance and its interval as stasis_correlation.
  if (model.process !== 'stasis') rows.push({ name: 'step_correlation', truth: trueCorrelation, estimate: parameters.step_correlation![0][1], interval: intervals.step_correlation![0][1] });
  else {
    const stasis = parameters.stasis_covariance!;
    rows.push({ name: 'stasis_correlation', truth: trueCorrelation, estimate: stasis[0][1] / Math.sqrt(stasis[0][0] * stasis[1][1]), interval: intervals.stasis_correlation![0][1] });
  }
  return rows;
}

/** Simulate one group, fit the model with intervals, and check each interval against the truth (run on a worker). */
export function jointCoverageGroup(task: JointCoverageTask): JointCoverageResult {
  const seed = replicateSeed(task.seed, task.horizons, coverageModels.indexOf(task.model), task.index);
  const model = jointModel(task.model)!;
  const design = coverageDesign(task.horizons, seed);
  const truth = coverageTruth(model, design);
  const data = simulateJoint(model, design, truth, createRandom(seed ^ 0x2545f491));
  const started = performance.now();
  const fit = fitJointModel(model, data, { intervals: true });
  const milliseconds = performance.now() - started;
  if (fit.parameters === null || fit.intervals === null) return { covered: null, open: [], misplaced: [], milliseconds };
  const covered: Record<string, boolean> = {};
  const open: string[] = [];
  const misplaced: string[] = [];
  for (const row of parameterTable(model, truth, fit)) {
    const lower = row.interval?.lower ?? Number.NEGATIVE_INFINITY;
    const upper = row.interval?.upper ?? Number.POSITIVE_INFINITY;
    if (row.interval === null || row.interval.lower === null || row.interval.upper === null) open.push(row.name);
    covered[row.name] = lower <= row.truth && row.truth <= upper;
    // Relative slack for the root finder's tolerance at an end that sits on the estimate (a variance at 0).
    const slack = 1e-6 * (Math.abs(row.estimate ?? 0) + 1e-12);
    if (row.estimate !== null && !(lower - slack <= row.estimate && row.estimate <= upper + slack)) misplaced.push(row.name);
  }
  return { covered, open, misplaced, milliseconds };
}

/** One row of the table: coverage of each parameter's 95% interval. */
export interface JointCoverageRow {
  readonly model: CoverageModelId;
  readonly horizons: number;
  /** Groups fitted (those that could not be fitted are in `not_fitted`). */
  readonly groups: number;
  readonly not_fitted: number;
  /** Per parameter: share of intervals covering the truth, its binomial standard error, share with an open end. */
  readonly coverage: Record<string, { readonly rate: number; readonly se: number; readonly open: number }>;
  /** Intervals, over all parameters, that excluded their own estimate. */
  readonly misplaced: number;
  readonly seconds_per_group: number;
}

/** Options of {@link runJointCoverage}. */
export interface JointCoverageOptions {
  readonly models?: readonly CoverageModelId[];
  readonly sizes?: readonly number[];
  /** Groups per (model, size) (default 200). */
  readonly groups?: number;
  readonly seed?: number;
  readonly threads?: number;
  readonly print?: (line: string) => void;
}

/**
 * Coverage of the `joint` command's 95% profile-likelihood intervals
 * (src/joint/joint-intervals.ts) on seeded invented 2-trait groups with
 * known truth: for each model and size, the share of intervals that
 * contain the true value, parameter by parameter (the evolutionary
 * correlation separately), with binomial Monte Carlo standard errors, the
 * share with an open end, and the count of intervals that exclude their
 * own estimate (should be 0). `node dist/bench/joint-coverage.js [groups]
 * [sizes...] [--models a,b] [--threads n]`.
 */
export async function runJointCoverage(options: JointCoverageOptions = {}): Promise<JointCoverageRow[]> {
  const models = options.models ?? coverageModels;
  const sizes = options.sizes ?? [20, 30];
  const groups = options.groups ?? 200;
  const seed = options.seed ?? 2026;
  const print = options.print ?? ((line: string) => console.log(line));
  const module = new URL(import.meta.url);
  const rows: JointCoverageRow[] = [];
  print(`Joint interval coverage: share of nominal 95% profile intervals covering the truth (${groups} groups per row, seed ${seed}); ± binomial standard error; [open ends]`);
  for (const model of models) {
    for (const horizons of sizes) {
      const tasks = Array.from({ length: groups }, (_, index): JointCoverageTask => ({ model, horizons, seed, index }));
      const results = await runTasks<JointCoverageTask, JointCoverageResult>(module, 'jointCoverageGroup', tasks, { threads: options.threads, chunkSize: 1 });
      const fitted = results.filter((result) => result.covered !== null);
      const names = fitted.length > 0 ? Object.keys(fitted[0].covered!) : [];
      const coverage: Record<string, { rate: number; se: number; open: number }> = {};
      for (const name of names) {
        const rate = fitted.filter((result) => result.covered![name]).length / fitted.length;
        coverage[name] = { rate, se: Math.sqrt((rate * (1 - rate)) / fitted.length), open: fitted.filter((result) => result.open.includes(name)).length / fitted.length };
      }
      const row: JointCoverageRow = {
        model,
        horizons,
        groups: fitted.length,
        not_fitted: results.length - fitted.length,
        coverage,
        misplaced: fitted.reduce((sum, result) => sum + result.misplaced.length, 0),
        seconds_per_group: results.reduce((sum, result) => sum + result.milliseconds, 0) / results.length / 1000,
      };
      rows.push(row);
      print(`${model}, ${horizons} horizons, ${row.groups} groups${row.not_fitted > 0 ? ` (${row.not_fitted} not fitted)` : ''}, ${row.seconds_per_group.toFixed(2)} s per group; intervals excluding their estimate: ${row.misplaced}`);
      for (const name of names) {
        const cell = coverage[name];
        print(`  ${name.padEnd(26)} ${cell.rate.toFixed(3)} ± ${cell.se.toFixed(3)}${cell.open > 0 ? `  [open ${cell.open.toFixed(3)}]` : ''}`);
      }
    }
  }
  return rows;
}

// Run alone: node dist/bench/joint-coverage.js [groups] [sizes...] [--models a,b] [--threads n]
if (runsAsCommand(import.meta.url)) {
  const args = process.argv.slice(2);
  const take = (name: string): string | undefined => takeOption(args, name);
  const models = take('--models')?.split(',') as CoverageModelId[] | undefined;
  const threads = take('--threads');
  const [count, ...sizes] = args.filter((arg) => !arg.startsWith('--')).map(Number);
  // Not awaited at the top level: with --threads 1 the pool imports this very module, which must have finished evaluating.
  void runJointCoverage({ groups: count || undefined, sizes: sizes.length > 0 ? sizes : undefined, models, threads: threads === undefined ? undefined : Number(threads) });
}
