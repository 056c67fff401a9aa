import { runsAsCommand, takeOption } from './command-line.js';
import { fitLineage } from '../src/fit/fit-lineage.js';
import { findModel } from '../src/models/registry.js';
import { runTasks } from '../src/parallel/pool.js';
import { designLineage, type Design } from '../src/simulate/design.js';
import { createRandom } from '../src/random/random.js';
import { replicateSeed } from '../src/random/seeds.js';
import { simulateMeans, withMeans } from '../src/random/simulate-lineage.js';
import { nestingTest } from '../src/simulate/bootstrap-test.js';
import { poolRunner } from '../src/simulate/run-replicates.js';

/** The models `bootstrap --models` tests against the model they nest (each file's `nests`). */
export const nestingModelIds = ['accelerating-walk', 'moving-optimum', 'optimum-shift'] as const;
export type NestingModelId = (typeof nestingModelIds)[number];

/** Truth of a row: the nested model (size) or one alternative of the full model (power). */
export type NestedTruth = 'null' | 'alternative';

/** One simulated lineage of the calibration, as plain data for a worker. */
export interface NestedCalibrationTask {
  readonly model: NestingModelId;
  readonly truth: NestedTruth;
  readonly horizons: number;
  readonly replicates: number;
  readonly seed: number;
  readonly index: number;
}

/** What the nested test said on one lineage. */
export interface NestedCalibrationResult {
  /** Bootstrap p-value (null when the test could not run). */
  readonly pBootstrap: number | null;
  /** Chi-square(1) p-value of the same statistic. */
  readonly pChiSquare: number | null;
  /** Usable bootstrap replicates. */
  readonly usable: number;
  readonly milliseconds: number;
}

/**
 * The invented design of one lineage, after the sample data
 * (sample-data/shell-length.csv: 12–30 specimens per horizon, within-horizon
 * sd about 0.55): uneven spacing (0.5–1.5 time units), 12–30 specimens per
 * horizon, within-horizon variance 0.3, drawn from the lineage's own seed.
 */
export function nestedDesign(horizons: number, seed: number): Design {
  const shape = createRandom(seed);
  const time = [0];
  for (let i = 1; i < horizons; i++) time.push(time[i - 1] + 0.5 + shape.uniform());
  const count = time.map(() => 12 + Math.floor(19 * shape.uniform()));
  return { time, count, withinVariance: time.map(() => 0.3), timeUnit: 'Myr' };
}

/**
 * The generating model and parameters of a row on a design. The step
 * variance per average interval equals the sampling variance of a mean of
 * 21 specimens (0.3 / 21), as in the trend calibration. The ou null: alpha
 * 0.2 per time unit (half-life 3.5), ancestral mean 4.4, optimum 4.8.
 * Alternatives: the step variance grows e^2.5-fold over the span
 * (accelerating walk); the optimum moves 0.8 over the span (moving optimum);
 * the optimum jumps by 0.8 at the middle horizon (optimum shift).
 */
export function nestedTruth(model: NestingModelId, truth: NestedTruth, design: Design): { model: string; parameters: Record<string, number> } {
  const span = design.time[design.time.length - 1];
  const meanInterval = span / (design.time.length - 1);
  const stepVariance = 0.3 / 21 / meanInterval;
  const ou = { ancestral_mean: 4.4, optimum: 4.8, alpha: 0.2, step_variance: stepVariance };
  if (model === 'accelerating-walk') {
    return truth === 'null'
      ? { model: 'random-walk', parameters: { ancestral_mean: 4.4, step_variance: stepVariance } }
      : { model, parameters: { ancestral_mean: 4.4, step_variance: stepVariance, rate_change: 2.5 / span } };
  }
  if (truth === 'null') return { model: 'ou', parameters: ou };
  if (model === 'moving-optimum') return { model, parameters: { ...ou, optimum_drift: 0.8 / span } };
  const middle = Math.floor(design.time.length / 2);
  return {
    model,
    parameters: {
      ancestral_mean: 4.4, optimum_before: 4.8, optimum_after: 5.6, alpha: 0.2, step_variance: stepVariance,
      shift_1_time: design.time[middle], shift_1_previous_time: design.time[middle - 1],
    },
  };
}

/** Simulate one lineage, fit the model and the one it nests, and run the `bootstrap --models` test (run on a worker). */
export async function nestedCalibrationLineage(task: NestedCalibrationTask): Promise<NestedCalibrationResult> {
  const lineageSeed = replicateSeed(task.seed, task.horizons, nestingModelIds.indexOf(task.model), task.truth === 'null' ? 0 : 1, task.index);
  const design = nestedDesign(task.horizons, lineageSeed);
  const { model, parameters } = nestedTruth(task.model, task.truth, design);
  const shape = designLineage(design);
  const lineage = withMeans(shape, simulateMeans(findModel(model)!, shape, parameters, createRandom(lineageSeed ^ 0x2545f491)));
  const full = findModel(task.model)!;
  const started = performance.now();
  const fit = fitLineage(lineage, [findModel(full.nests!.model)!, full], { intervals: false });
  // The test's replicates run in this worker: the pool spreads lineages, not replicates.
  const test = await nestingTest(fit, task.model, task.replicates, task.index + 1, poolRunner({ threads: 1 }));
  return {
    pBootstrap: test.p_bootstrap,
    pChiSquare: test.p_chi_square,
    usable: test.null_distribution?.replicates ?? 0,
    milliseconds: performance.now() - started,
  };
}

/** The statistic's distribution under the true null on one design, against chi-square(1). */
export interface TrueNullRow {
  readonly model: NestingModelId;
  readonly horizons: number;
  readonly draws: number;
  /** Median and 90%, 95% points of T = 2 (logL_full - logL_reduced) over lineages drawn from the true null. */
  readonly median: number;
  readonly q90: number;
  readonly q95: number;
  /** Share of T above the chi-square(1) 95% point 3.841. */
  readonly beyond_chi_square: number;
}

/**
 * Why a size is off: T's distribution under the TRUE null parameters on the
 * design of the row's first lineage (what the bootstrap would use if it knew
 * them), from `draws` lineages; compare its 95% point with the bootstrap
 * critical values, which are drawn from the FITTED null. One thread (a
 * diagnostic: hundreds of fits, not thousands).
 */
export function trueNullDistribution(model: NestingModelId, horizons: number, draws: number, seed = 2026): TrueNullRow {
  const designSeed = replicateSeed(seed, horizons, nestingModelIds.indexOf(model), 0, 0);
  const design = nestedDesign(horizons, designSeed);
  const truth = nestedTruth(model, 'null', design);
  const shape = designLineage(design);
  const full = findModel(model)!;
  const reduced = findModel(full.nests!.model)!;
  const values: number[] = [];
  for (let index = 0; index < draws; index++) {
    const lineage = withMeans(shape, simulateMeans(findModel(truth.model)!, shape, truth.parameters, createRandom(replicateSeed(seed, 99, horizons, nestingModelIds.indexOf(model), index))));
    const fit = fitLineage(lineage, [reduced, full], { intervals: false });
    const upper = fit.models.find((entry) => entry.id === model)!;
    const lower = fit.models.find((entry) => entry.id === reduced.id)!;
    if (upper.converged && lower.converged && Number.isFinite(upper.logLik) && Number.isFinite(lower.logLik)) values.push(Math.max(0, 2 * (upper.logLik - lower.logLik)));
  }
  const sorted = [...values].sort((left, right) => left - right);
  const at = (level: number): number => sorted[Math.min(sorted.length - 1, Math.floor(level * sorted.length))];
  return { model, horizons, draws: sorted.length, median: at(0.5), q90: at(0.9), q95: at(0.95), beyond_chi_square: values.filter((value) => value > 3.841).length / values.length };
}

/** One row of the table: rejection rates at 5% with binomial standard errors. */
export interface NestedCalibrationRow {
  readonly model: NestingModelId;
  readonly truth: NestedTruth;
  readonly horizons: number;
  /** Lineages whose test ran (the others are counted in `not_tested`). */
  readonly lineages: number;
  readonly not_tested: number;
  readonly replicates: number;
  /** Share with bootstrap p <= 0.05, and its binomial standard error sqrt(r (1 - r) / lineages). */
  readonly bootstrap: number;
  readonly bootstrap_se: number;
  /** Share with chi-square(1) p < 0.05, and its standard error. */
  readonly chi_square: number;
  readonly chi_square_se: number;
  readonly mean_usable: number;
  readonly seconds_per_lineage: number;
}

/** A row asked for: model, truth, horizons, lineages, replicates per test. */
export interface NestedCalibrationCase {
  readonly model: NestingModelId;
  readonly truth: NestedTruth;
  readonly horizons: number;
  readonly lineages: number;
  readonly replicates: number;
}

/**
 * The default rows, most telling first (each row is printed as it ends):
 * size of every test at 15 and 25 horizons and of the walk test at 50,
 * power at 25 horizons (15 for the optimum shift, whose exhaustive shift
 * search in every replicate makes it the costliest), then the costly size
 * rows (optimum shift at 25, moving optimum at 50) with half the lineages.
 * Every test uses 39 bootstrap replicates: p = (1 + #{T* >= T}) / 40 <= 0.05
 * exactly when at most one replicate reaches T, and a Monte Carlo test
 * keeps its level for any R with 0.05 (R + 1) whole when replicates come
 * from the true null (Davison & Hinkley 1997, Bootstrap Methods and their
 * Application, ch. 4), so R = 39 should show the size the command's default
 * R = 200 has, at a fifth of the cost; power at R = 39 is a little below
 * power at R = 200.
 */
export function defaultNestedCases(lineages: number): NestedCalibrationCase[] {
  const half = Math.ceil(lineages / 2);
  const replicates = 39;
  return [
    ...[15, 25, 50].map((horizons): NestedCalibrationCase => ({ model: 'accelerating-walk', truth: 'null', horizons, lineages, replicates })),
    ...[15, 25].map((horizons): NestedCalibrationCase => ({ model: 'moving-optimum', truth: 'null', horizons, lineages, replicates })),
    { model: 'optimum-shift', truth: 'null', horizons: 15, lineages, replicates },
    { model: 'accelerating-walk', truth: 'alternative', horizons: 25, lineages: half, replicates },
    { model: 'moving-optimum', truth: 'alternative', horizons: 25, lineages: half, replicates },
    { model: 'optimum-shift', truth: 'alternative', horizons: 15, lineages: half, replicates },
    { model: 'moving-optimum', truth: 'null', horizons: 50, lineages: half, replicates },
    { model: 'optimum-shift', truth: 'null', horizons: 25, lineages: half, replicates },
  ];
}

/** Options of {@link runNestedCalibration}. */
export interface NestedCalibrationOptions {
  readonly cases?: readonly NestedCalibrationCase[];
  readonly seed?: number;
  readonly threads?: number;
  readonly print?: (line: string) => void;
}

/**
 * Size and power of the `bootstrap --models` nested likelihood-ratio tests
 * (src/simulate/bootstrap-test.ts `nestingTest`) on seeded invented
 * lineages: each lineage is drawn from the nested model (size) or from one
 * alternative (power), both models are fitted, and the test is run in full
 * with its own parametric bootstrap; the rejection rate at 5% is reported
 * for the bootstrap p-value (p <= 0.05) and for the chi-square(1) p-value of
 * the same statistic (p < 0.05), each with its binomial Monte Carlo
 * standard error. `node dist/bench/nested-test-calibration.js [lineages]
 * [--models a,b] [--truth null|alternative] [--horizons 15,25] [--threads n]`.
 */
export async function runNestedCalibration(options: NestedCalibrationOptions = {}): Promise<NestedCalibrationRow[]> {
  const cases = options.cases ?? defaultNestedCases(200);
  const seed = options.seed ?? 2026;
  const print = options.print ?? ((line: string) => console.log(line));
  const module = new URL(import.meta.url);
  const rows: NestedCalibrationRow[] = [];
  print(`Nested-test calibration (bootstrap --models): share of lineages rejecting at 5% (seed ${seed}); ± binomial standard error`);
  print('model              truth        horizons  lineages    R  bootstrap p       chi-square(1) p   s/lineage');
  for (const entry of cases) {
    const tasks = Array.from({ length: entry.lineages }, (_, index): NestedCalibrationTask => ({
      model: entry.model, truth: entry.truth, horizons: entry.horizons, replicates: entry.replicates, seed, index,
    }));
    const results = await runTasks<NestedCalibrationTask, NestedCalibrationResult>(module, 'nestedCalibrationLineage', tasks, { threads: options.threads, chunkSize: 1 });
    const tested = results.filter((result) => result.pBootstrap !== null && result.pChiSquare !== null);
    const rate = (pick: (result: NestedCalibrationResult) => boolean): number => (tested.length === 0 ? Number.NaN : tested.filter(pick).length / tested.length);
    const error = (value: number): number => Math.sqrt((value * (1 - value)) / tested.length);
    const bootstrap = rate((result) => (result.pBootstrap as number) <= 0.05);
    const chiSquare = rate((result) => (result.pChiSquare as number) < 0.05);
    const row: NestedCalibrationRow = {
      model: entry.model,
      truth: entry.truth,
      horizons: entry.horizons,
      lineages: tested.length,
      not_tested: results.length - tested.length,
      replicates: entry.replicates,
      bootstrap,
      bootstrap_se: error(bootstrap),
      chi_square: chiSquare,
      chi_square_se: error(chiSquare),
      mean_usable: tested.reduce((sum, result) => sum + result.usable, 0) / Math.max(tested.length, 1),
      seconds_per_lineage: results.reduce((sum, result) => sum + result.milliseconds, 0) / results.length / 1000,
    };
    rows.push(row);
    print(`${row.model.padEnd(17)}  ${row.truth.padEnd(11)}  ${String(row.horizons).padStart(8)}  ${String(row.lineages).padStart(8)}  ${String(row.replicates).padStart(3)}  ${row.bootstrap.toFixed(3)} ± ${row.bootstrap_se.toFixed(3)}   ${row.chi_square.toFixed(3)} ± ${row.chi_square_se.toFixed(3)}   ${row.seconds_per_lineage.toFixed(2).padStart(9)}${row.not_tested > 0 ? `  (${row.not_tested} not tested)` : ''}`);
  }
  return rows;
}

// Run alone: node dist/bench/nested-test-calibration.js [lineages] [--models a,b] [--truth null|alternative] [--horizons 15,25] [--threads n] [--true-null draws]
if (runsAsCommand(import.meta.url)) {
  const args = process.argv.slice(2);
  const take = (name: string): string | undefined => takeOption(args, name);
  const models = take('--models')?.split(',');
  const truth = take('--truth');
  const horizons = take('--horizons')?.split(',').map(Number);
  const threads = take('--threads');
  const trueNull = take('--true-null');
  const [count] = args.filter((arg) => !arg.startsWith('--')).map(Number);
  if (trueNull !== undefined) {
    // node dist/bench/nested-test-calibration.js --true-null 400 --models moving-optimum --horizons 15
    for (const model of (models ?? nestingModelIds) as NestingModelId[]) {
      for (const size of horizons ?? [15, 25]) {
        const row = trueNullDistribution(model, size, Number(trueNull));
        console.log(`${model} at ${size} horizons, T under the true null (${row.draws} lineages on one design): median ${row.median.toFixed(2)}, 90% ${row.q90.toFixed(2)}, 95% ${row.q95.toFixed(2)}; share above chi-square(1) 3.841: ${row.beyond_chi_square.toFixed(3)}`);
      }
    }
    process.exit(0);
  }
  const cases = defaultNestedCases(count || 200).filter((entry) =>
    (models === undefined || models.includes(entry.model)) && (truth === undefined || entry.truth === truth) && (horizons === undefined || horizons.includes(entry.horizons)));
  // Not awaited at the top level: with --threads 1 the pool imports this very module, which must have finished evaluating.
  void runNestedCalibration({ cases, threads: threads === undefined ? undefined : Number(threads) });
}
