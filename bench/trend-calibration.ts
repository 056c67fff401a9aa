import { availableParallelism } from 'node:os';
import { runsAsCommand, takeOption } from './command-line.js';
import { fitLineage } from '../src/fit/fit-lineage.js';
import { classicModels, findModel } from '../src/models/registry.js';
import { runTasks } from '../src/parallel/pool.js';
import { designLineage, type Design } from '../src/simulate/design.js';
import { createRandom } from '../src/random/random.js';
import { replicateSeed } from '../src/random/seeds.js';
import { simulateMeans, withMeans } from '../src/random/simulate-lineage.js';
import { chiSquareSurvival } from '../src/statistics/chi-square.js';
import { bootstrapTests } from '../src/simulate/bootstrap-test.js';
import { poolRunner } from '../src/simulate/run-replicates.js';
import { trendTests } from '../src/trend/run-trend-tests.js';
import { trendTest } from '../src/trend/trend-test.js';

/** The simulated truths of the calibration (issue 15). */
export const trendScenarios = ['random-walk', 'stasis', 'strict-stasis', 'weak-trend', 'clear-trend'] as const;
export type TrendScenario = (typeof trendScenarios)[number];

/** One simulated lineage, as plain data for a worker. */
export interface TrendCalibrationTask {
  readonly scenario: TrendScenario;
  readonly horizons: number;
  readonly seed: number;
  readonly index: number;
  /** Also run the `bootstrap` command's nested likelihood-ratio test (199 replicates; slow). */
  readonly bootstrapLrt?: boolean;
}

/** What each rule decided on one lineage. */
export interface TrendCalibrationResult {
  /** The trend test's p-value < 0.05. */
  readonly verdict: boolean;
  /** AICc ranks the directional walk first among the classic five. */
  readonly aicc: boolean;
  /** Chi-square(1) likelihood-ratio test of drift = 0 (directional vs random walk) rejects at 5%. */
  readonly chiSquare: boolean;
  readonly replicates: number;
  readonly milliseconds: number;
  /** The `bootstrap` command's nested test (directional vs random walk, 199 replicates from the ML random walk) rejects at 5%; null when not run. */
  readonly bootstrapLrt: boolean | null;
}

/**
 * The invented design of one lineage: uneven spacing (0.5–1.5 time units),
 * 8–30 specimens per horizon, within-horizon variance 1, drawn from the
 * lineage's own seed.
 */
export function trendDesign(horizons: number, seed: number): Design {
  const shape = createRandom(seed);
  const time = [0];
  for (let i = 1; i < horizons; i++) time.push(time[i - 1] + 0.5 + shape.uniform());
  const count = time.map(() => 8 + Math.floor(23 * shape.uniform()));
  return { time, count, withinVariance: time.map(() => 1), timeUnit: 'Myr' };
}

/**
 * Parameters of each truth on a design: the step variance per average
 * interval equals the sampling variance of a mean of 19 specimens (1/19);
 * stasis fluctuates with that same variance; the trends drift 0.5 (weak) and
 * 1 (clear) step standard deviations per time unit.
 */
function truth(scenario: TrendScenario, design: Design): { model: string; parameters: Record<string, number> } {
  const meanInterval = design.time[design.time.length - 1] / (design.time.length - 1);
  const stepVariance = 1 / 19 / meanInterval;
  switch (scenario) {
    case 'random-walk': return { model: 'random-walk', parameters: { ancestral_mean: 10, step_variance: stepVariance } };
    case 'stasis': return { model: 'stasis', parameters: { stasis_mean: 10, stasis_variance: 1 / 19 } };
    case 'strict-stasis': return { model: 'strict-stasis', parameters: { stasis_mean: 10 } };
    case 'weak-trend': return { model: 'directional-walk', parameters: { ancestral_mean: 10, drift: 0.5 * Math.sqrt(stepVariance), step_variance: stepVariance } };
    case 'clear-trend': return { model: 'directional-walk', parameters: { ancestral_mean: 10, drift: Math.sqrt(stepVariance), step_variance: stepVariance } };
  }
}

/** Simulate one lineage, fit the classic five, and apply the three rules (run on a worker). */
export async function trendCalibrationLineage(task: TrendCalibrationTask): Promise<TrendCalibrationResult> {
  const lineageSeed = replicateSeed(task.seed, task.horizons, trendScenarios.indexOf(task.scenario), task.index);
  const design = trendDesign(task.horizons, lineageSeed);
  const { model, parameters } = truth(task.scenario, design);
  const shape = designLineage(design);
  const lineage = withMeans(shape, simulateMeans(findModel(model)!, shape, parameters, createRandom(lineageSeed ^ 0x2545f491)));
  const started = performance.now();
  const fit = fitLineage(lineage, classicModels, { intervals: false });
  // The AICc rates are not read here; leaving them out keeps the calibration to the test's own cost.
  const verdict = trendTest(fit, { seed: task.index + 1, rateReplicates: 0 });
  const byId = new Map(fit.models.map((entry) => [entry.id, entry]));
  const ratio = 2 * ((byId.get('directional-walk')?.logLik ?? Number.NaN) - (byId.get('random-walk')?.logLik ?? Number.NaN));
  return {
    verdict: verdict.supported,
    aicc: fit.best === 'directional-walk',
    chiSquare: Number.isFinite(ratio) && chiSquareSurvival(Math.max(0, ratio), 1) < 0.05,
    replicates: verdict.replicates,
    milliseconds: performance.now() - started,
    bootstrapLrt: task.bootstrapLrt ? await bootstrapRejects(fit, task.index + 1) : null,
  };
}

/** The `bootstrap` command's nested test on one fit (src/simulate/bootstrap-test.ts), in this thread. */
async function bootstrapRejects(fit: ReturnType<typeof fitLineage>, seed: number): Promise<boolean | null> {
  const report = await bootstrapTests(fit, 199, seed, poolRunner({ threads: 1 }), undefined, { nonNested: false });
  return report.nested === null ? null : report.nested.p_bootstrap < 0.05;
}

/** Options of {@link runTrendCalibration}. */
export interface TrendCalibrationOptions {
  /** Horizons (default 10, 14, 25, 50). */
  readonly sizes?: readonly number[];
  /** Lineages per (size, truth) (default 400). */
  readonly lineages?: number;
  readonly scenarios?: readonly TrendScenario[];
  readonly seed?: number;
  readonly threads?: number;
  readonly print?: (line: string) => void;
  /** Also run the `bootstrap` command's likelihood-ratio test on each lineage (slow: 199 replicates, two fits each). */
  readonly bootstrapLrt?: boolean;
}

/** One row of the calibration table: rejection rates with binomial standard errors. */
export interface TrendCalibrationRow {
  readonly horizons: number;
  readonly scenario: TrendScenario;
  readonly lineages: number;
  readonly verdict: number;
  readonly aicc: number;
  readonly chi_square: number;
  /** The `bootstrap` command's LRT (null when not run). */
  readonly bootstrap_lrt: number | null;
  /** Binomial standard error of the verdict's rate, sqrt(r (1 - r) / lineages). */
  readonly verdict_se: number;
  readonly mean_replicates: number;
  readonly seconds_per_lineage: number;
}

/**
 * Size and power of the trend verdict beside the AICc rule and the
 * chi-square likelihood-ratio test, on seeded invented lineages (uneven
 * spacing, unequal sample sizes): size under the unbiased walk, stasis and
 * strict stasis, power under a weak and a clear directional walk, at each
 * size. Part of the full `npm run bench`; `node dist/bench/trend-calibration.js
 * [lineages] [sizes...]` runs it alone.
 */
export async function runTrendCalibration(options: TrendCalibrationOptions = {}): Promise<TrendCalibrationRow[]> {
  const sizes = options.sizes ?? [10, 14, 25, 50];
  const lineages = options.lineages ?? 400;
  const scenarios = options.scenarios ?? trendScenarios;
  const seed = options.seed ?? 2026;
  const print = options.print ?? ((line: string) => console.log(line));
  const module = new URL(import.meta.url);
  const rows: TrendCalibrationRow[] = [];
  print(`Trend verdict calibration: share of ${lineages} lineages per row called a trend at 5% (seed ${seed}); ± binomial standard error`);
  print(`horizons  truth           verdict          AICc    chi-square  replicates  s/lineage${options.bootstrapLrt ? '  bootstrap LRT' : ''}`);
  for (const horizons of sizes) {
    for (const scenario of scenarios) {
      const tasks = Array.from({ length: lineages }, (_, index): TrendCalibrationTask => ({ scenario, horizons, seed, index, bootstrapLrt: options.bootstrapLrt }));
      const results = await runTasks<TrendCalibrationTask, TrendCalibrationResult>(module, 'trendCalibrationLineage', tasks, { threads: options.threads });
      const rate = (pick: (result: TrendCalibrationResult) => boolean): number => results.filter(pick).length / results.length;
      const verdict = rate((result) => result.verdict);
      const row: TrendCalibrationRow = {
        horizons,
        scenario,
        lineages: results.length,
        verdict,
        aicc: rate((result) => result.aicc),
        chi_square: rate((result) => result.chiSquare),
        bootstrap_lrt: options.bootstrapLrt ? rate((result) => result.bootstrapLrt === true) : null,
        verdict_se: Math.sqrt((verdict * (1 - verdict)) / results.length),
        mean_replicates: results.reduce((sum, result) => sum + result.replicates, 0) / results.length,
        seconds_per_lineage: results.reduce((sum, result) => sum + result.milliseconds, 0) / results.length / 1000,
      };
      rows.push(row);
      print(`${String(horizons).padStart(8)}  ${scenario.padEnd(14)}  ${row.verdict.toFixed(3)} ± ${row.verdict_se.toFixed(3)}  ${row.aicc.toFixed(3).padStart(6)}  ${row.chi_square.toFixed(3).padStart(10)}  ${row.mean_replicates.toFixed(0).padStart(10)}  ${row.seconds_per_lineage.toFixed(2).padStart(9)}${row.bootstrap_lrt === null ? '' : row.bootstrap_lrt.toFixed(3).padStart(15)}`);
    }
  }
  return rows;
}

/** One row of the verdict's cost: seconds for one lineage (defaults: with the AICc rates), or for a batch. */
export interface TrendCostRow {
  readonly case: string;
  readonly horizons: number;
  readonly lineages: number;
  readonly threads: number;
  readonly seconds: number;
  readonly replicates: number;
}

/**
 * What the verdict costs as `fit` runs it (default options, AICc rates
 * included): one unbiased walk and one clear trend at 14, 25 and 100
 * horizons in this thread, then a batch of 200 lineages of 20 horizons
 * (half walks, half trends) on every core.
 */
export async function measureTrendCost(print: (line: string) => void = (line) => console.log(line)): Promise<TrendCostRow[]> {
  const rows: TrendCostRow[] = [];
  const lineageOf = (scenario: TrendScenario, horizons: number, index: number) => {
    const lineageSeed = replicateSeed(77, horizons, trendScenarios.indexOf(scenario), index);
    const design = trendDesign(horizons, lineageSeed);
    const { model, parameters } = truth(scenario, design);
    const shape = designLineage(design);
    return fitLineage(withMeans(shape, simulateMeans(findModel(model)!, shape, parameters, createRandom(lineageSeed ^ 0x2545f491))), classicModels, { intervals: false });
  };
  print('Trend verdict cost (default options, AICc rates included)');
  for (const horizons of [14, 25, 100]) {
    for (const scenario of ['random-walk', 'clear-trend'] as const) {
      const fit = lineageOf(scenario, horizons, 0);
      const started = performance.now();
      const result = trendTest(fit, { seed: 1 });
      const row = { case: scenario, horizons, lineages: 1, threads: 1, seconds: (performance.now() - started) / 1000, replicates: result.replicates };
      rows.push(row);
      print(`  ${scenario.padEnd(12)} ${String(horizons).padStart(4)} horizons: ${row.seconds.toFixed(2)} s (${row.replicates} replicates)`);
    }
  }
  const batch = Array.from({ length: 200 }, (_, index) => lineageOf(index % 2 === 0 ? 'random-walk' : 'clear-trend', 20, index));
  const started = performance.now();
  const results = await trendTests(batch, { seed: 1 });
  const row = { case: 'batch (half walks, half trends)', horizons: 20, lineages: 200, threads: availableParallelism(), seconds: (performance.now() - started) / 1000, replicates: results.reduce((sum, result) => sum + result.replicates, 0) };
  rows.push(row);
  print(`  200 lineages of 20 horizons on ${row.threads} threads: ${row.seconds.toFixed(1)} s`);
  return rows;
}

// Run alone: node dist/bench/trend-calibration.js [lineages] [sizes...] [--scenarios a,b] [--bootstrap-lrt] [--threads k], or --cost
if (runsAsCommand(import.meta.url)) {
  const args = process.argv.slice(2);
  const scenarios = takeOption(args, '--scenarios')?.split(',') as TrendScenario[] | undefined;
  const threadOption = takeOption(args, '--threads');
  const threads = threadOption === undefined ? undefined : Number(threadOption);
  const [count, ...sizes] = args.filter((arg) => !arg.startsWith('--')).map(Number);
  // Not awaited at the top level: with --threads 1 the pool imports this very module in the main thread, and that
  // import would wait for this module's own evaluation to finish (Node then exits with code 13, nothing printed).
  const run = args.includes('--cost')
    ? measureTrendCost()
    : runTrendCalibration({ lineages: count || undefined, sizes: sizes.length > 0 ? sizes : undefined, scenarios, bootstrapLrt: args.includes('--bootstrap-lrt'), threads });
  run.catch((error: unknown) => {
    console.error(error);
    process.exitCode = 1;
  });
}
