import { runsAsCommand } from './command-line.js';
/**
 * The fitter's cost in evaluation-equivalents (issue 14): each piece of work
 * on one 30-horizon lineage, timed in CPU time and divided by the time of
 * one bare scalar Kalman-filter log-likelihood of an unbiased random walk
 * over the same 30 horizons, timed in the same run. The ratio is what stays
 * comparable on a noisy machine; absolute times are reported beside it.
 *
 * `node dist/bench/evaluation-cost.js [--smoke | --full]` prints the table
 * alone (by default a quick mode, for iterating on the fitter); bench/run.ts
 * includes it (full, or smoke with `--smoke`). With `--per-model` it prints
 * instead the cost of each model of the extended set.
 */
import { median } from 'simple-statistics';
import { fitLineage } from '../src/fit/fit-lineage.js';
import { intervalOptions } from '../src/fit/intervals.js';
import type { Lineage } from '../src/lineage.js';
import { classicModels, extendedModels } from '../src/models/registry.js';
import { bootstrapTests } from '../src/simulate/bootstrap-test.js';
import { powerAnalysis, type PowerPlan } from '../src/simulate/power.js';
import { poolRunner } from '../src/simulate/run-replicates.js';
import { designOf } from '../src/simulate/design.js';
import { benchLineage } from './workload.js';

/** One row of the table: a piece of work, its cost in units of the bare filter, and the target. */
export interface EvaluationCostRow {
  readonly work: string;
  /** CPU milliseconds of one run (the fastest run; for the fits, the median of that over the lineages). */
  readonly cpuMilliseconds: number;
  /** The same divided by one bare filter evaluation. */
  readonly evaluationEquivalents: number;
  /** Issue 14's target, in evaluation-equivalents (or null when the target is in seconds). */
  readonly targetEquivalents: number | null;
  /** Issue 14's target in CPU seconds, when it is given in seconds. */
  readonly targetSeconds: number | null;
  readonly met: boolean;
}

/** What {@link measureEvaluationCost} returns. */
export interface EvaluationCost {
  readonly horizons: number;
  /** CPU nanoseconds of one bare filter evaluation (the unit). */
  readonly unitNanoseconds: number;
  readonly rows: readonly EvaluationCostRow[];
  /** Filter passes per classic model (median over the lineages) with the default intervals, profile intervals and none: where the interval work goes (issue 14b). */
  readonly filterPasses?: ReadonlyArray<{ readonly model: string; readonly defaultIntervals: number; readonly profileIntervals: number; readonly noIntervals: number }>;
}

/**
 * Log-likelihood of an unbiased random walk observed with sampling error,
 * x_i = mu + u_i + eps_i, u_i = u_{i-1} + N(0, sigma2 dt_i), u_0 = 0,
 * eps_i ~ N(0, e_i), by the scalar Kalman filter with every parameter known:
 * the least work any likelihood of the project can be (Harvey, A. C. (1989),
 * Forecasting, Structural Time Series Models and the Kalman Filter,
 * section 3.4, the prediction-error decomposition; from memory).
 */
export function bareRandomWalkLogLik(time: Float64Array, mean: Float64Array, samplingVariance: Float64Array, ancestralMean: number, stepVariance: number): number {
  let state = ancestralMean;
  let stateVariance = 0;
  let sum = 0;
  for (let i = 0; i < mean.length; i++) {
    const predictedVariance = stateVariance + (i === 0 ? 0 : stepVariance * (time[i] - time[i - 1]));
    const innovationVariance = predictedVariance + samplingVariance[i];
    const innovation = mean[i] - state;
    sum += Math.log(innovationVariance) + (innovation * innovation) / innovationVariance;
    const gain = predictedVariance / innovationVariance;
    state += gain * innovation;
    stateVariance = predictedVariance * (1 - gain);
  }
  return -0.5 * (sum + mean.length * Math.log(2 * Math.PI));
}

/**
 * CPU nanoseconds per call of each of `rounds` rounds: after one warm-up call
 * (unless `warm` is false), `run` is repeated until `budgetMs` of wall time has
 * passed in each round. The benchmark takes the median round (bench/run.ts) or
 * the fastest ({@link cpuNanoseconds}).
 */
export function cpuNanosecondsPerRound(run: () => void, budgetMs: number, rounds: number, warm = true): number[] {
  const perRound: number[] = [];
  if (warm) run();
  for (let round = 0; round < rounds; round++) {
    let calls = 0;
    const started = performance.now();
    const cpu = process.cpuUsage();
    do {
      run();
      calls += 1;
    } while (performance.now() - started < budgetMs / rounds);
    const used = process.cpuUsage(cpu);
    perRound.push(((used.user + used.system) * 1e3) / calls);
  }
  return perRound;
}

/**
 * CPU nanoseconds per call: the fastest round of {@link cpuNanosecondsPerRound}.
 * On a shared machine other jobs only ever slow a round down (cache and core
 * sharing inflate even CPU time), so the fastest round is the least disturbed,
 * for the unit and the work alike.
 */
function cpuNanoseconds(run: () => void, budgetMs: number, rounds: number, warm = true): number {
  return Math.min(...cpuNanosecondsPerRound(run, budgetMs, rounds, warm));
}

/** CPU milliseconds of one async run, the fastest of `repeats` runs. */
async function cpuMillisecondsAsync(run: () => Promise<unknown>, repeats: number): Promise<number> {
  const times: number[] = [];
  for (let k = 0; k < repeats; k++) {
    const cpu = process.cpuUsage();
    await run();
    const used = process.cpuUsage(cpu);
    times.push((used.user + used.system) / 1e3);
  }
  return Math.min(...times);
}

/** How long to measure: `smoke` (seconds, for CI: one lineage, 19 replicates), `quick` (for iterating), `full` (bench/run.ts). */
export type CostMode = 'smoke' | 'quick' | 'full';

/**
 * Measure every row of issue 14's table on invented 30-horizon lineages
 * (`benchLineage`, the five generating models in turn; the fits' cost is the
 * median over them).
 */
export async function measureEvaluationCost(mode: CostMode): Promise<EvaluationCost> {
  const horizons = 30;
  const settings = { smoke: { lineages: 1, budget: 20, rounds: 1, replicates: 19, repeats: 1 }, quick: { lineages: 3, budget: 150, rounds: 3, replicates: 199, repeats: 2 }, full: { lineages: 5, budget: 600, rounds: 3, replicates: 199, repeats: 3 } }[mode];
  const lineages: Lineage[] = Array.from({ length: settings.lineages }, (_, k) => benchLineage(horizons, 1400 + k, k));
  const unit = lineages[0];
  let sink = 0;
  const unitNanoseconds = cpuNanoseconds(() => void (sink += bareRandomWalkLogLik(unit.time, unit.mean, unit.samplingVariance, 5, 0.05)), mode === 'full' ? 2000 : 500, 20);
  const perLineage = (work: (lineage: Lineage) => unknown): number =>
    median(lineages.map((lineage) => cpuNanoseconds(() => void work(lineage), settings.budget, settings.rounds, mode !== 'smoke') / 1e6));
  const rows: EvaluationCostRow[] = [];
  const add = (work: string, cpuMilliseconds: number, targetEquivalents: number | null, targetSeconds: number | null): void => {
    const evaluationEquivalents = (cpuMilliseconds * 1e6) / unitNanoseconds;
    const met = targetEquivalents !== null ? evaluationEquivalents <= targetEquivalents : targetSeconds === null || cpuMilliseconds <= targetSeconds * 1000;
    rows.push({ work, cpuMilliseconds, evaluationEquivalents, targetEquivalents, targetSeconds, met });
  };
  // The `fit` command's default (intervalOptions(undefined): the integrated method, ou falling back to the adjusted profile), and the plain profile.
  add('five classic models, default intervals (as `fit`)', perLineage((lineage) => fitLineage(lineage, classicModels, intervalOptions(undefined))), 5000, null);
  add('five classic models, profile intervals', perLineage((lineage) => fitLineage(lineage, classicModels, { intervals: true, intervalMethod: 'profile' })), 5000, null);
  add('five classic models, no intervals', perLineage((lineage) => fitLineage(lineage, classicModels, { intervals: false })), 1000, null);
  // ou's share of the row above (issue 14a: its search is most of the fitter's cost), and the other four together.
  const ou = classicModels.filter((model) => model.id === 'ou');
  const others = classicModels.filter((model) => model.id !== 'ou');
  add('  of which ou alone, no intervals', perLineage((lineage) => fitLineage(lineage, ou, { intervals: false })), null, null);
  add('  of which the other four, no intervals', perLineage((lineage) => fitLineage(lineage, others, { intervals: false })), null, null);
  add('extended set, no intervals', perLineage((lineage) => fitLineage(lineage, extendedModels, { intervals: false })), 50_000, null);
  // The replicate loops on one thread (inline: no worker start-up in the time). The fastest of at least two runs
  // outside smoke mode: the first run also pays for compiling the replicate code (about twice the time of the next).
  const runner = poolRunner({ threads: 1 });
  const replicates = settings.replicates;
  const observed = fitLineage(lineages[0], classicModels, { intervals: false });
  const bootstrapMs = await cpuMillisecondsAsync(() => bootstrapTests(observed, replicates, 1, runner, undefined, { nested: true, nonNested: false }), settings.repeats);
  // The 0.1 s is for 199 replicates; a smoke run with fewer is held to the same time per replicate.
  const replicateTarget = (0.1 * replicates) / 199;
  add(`bootstrap, ${replicates} replicates (nested test: two models per replicate)`, bootstrapMs, null, replicateTarget);
  const plan: PowerPlan = { design: designOf(lineages[0]), stepVariance: 0.05, ancestralMean: 5, drifts: [0], replicates, seed: 1, coverage: false };
  const powerMs = await cpuMillisecondsAsync(() => powerAnalysis(plan, runner), settings.repeats);
  add(`power, ${replicates} replicates: null set (two models) + drift 0 (five models), no coverage`, powerMs, null, replicateTarget);
  if (sink === 42) process.stdout.write('');
  const passes = (options: Parameters<typeof fitLineage>[2]): number[][] => lineages.map((lineage) => fitLineage(lineage, classicModels, options).models.map((model) => model.evaluations));
  const medianPasses = (table: number[][], k: number): number => median(table.map((row) => row[k]));
  const [byDefault, byProfile, byNone] = [passes(intervalOptions(undefined)), passes({ intervals: true, intervalMethod: 'profile' }), passes({ intervals: false })];
  const filterPasses = classicModels.map((model, k) => ({ model: model.id, defaultIntervals: medianPasses(byDefault, k), profileIntervals: medianPasses(byProfile, k), noIntervals: medianPasses(byNone, k) }));
  return { horizons, unitNanoseconds, rows, filterPasses };
}

/** The table as text lines. */
export function evaluationCostLines(cost: EvaluationCost): string[] {
  const lines = [
    `Fitter cost in evaluation-equivalents (issue 14): one unit = one bare scalar Kalman-filter random-walk logL over ${cost.horizons} horizons = ${cost.unitNanoseconds.toFixed(0)} ns CPU in this run`,
  ];
  const header = ['work (one 30-horizon lineage, one thread)', 'CPU ms', 'evaluation-equivalents', 'target', 'met'];
  const body = cost.rows.map((row) => [
    row.work,
    row.cpuMilliseconds.toFixed(2),
    Math.round(row.evaluationEquivalents).toLocaleString('en-US'),
    row.targetEquivalents !== null ? `<= ${row.targetEquivalents.toLocaleString('en-US')}` : row.targetSeconds !== null ? `<= ${Number(row.targetSeconds.toPrecision(3))} s` : '',
    row.targetEquivalents === null && row.targetSeconds === null ? '' : row.met ? 'yes' : 'NO',
  ]);
  const widths = header.map((_, j) => Math.max(...[header, ...body].map((row) => row[j].length)));
  for (const row of [header, ...body]) lines.push('  ' + row.map((cell, j) => (j === 0 ? cell.padEnd(widths[j]) : cell.padStart(widths[j]))).join('  '));
  if (cost.filterPasses) {
    lines.push('  filter passes per model (median over the lineages), default intervals / profile intervals / none:');
    lines.push('    ' + cost.filterPasses.map((entry) => `${entry.model} ${[entry.defaultIntervals, entry.profileIntervals, entry.noIntervals].map((count) => count.toLocaleString('en-US')).join(' / ')}`).join('; '));
  }
  return lines;
}

/**
 * Where the extended set's cost goes (issue 14): CPU milliseconds and
 * evaluation-equivalents of each model of the extended set without
 * intervals, the median over the lineages of {@link measureEvaluationCost}'s
 * mode (`--per-model`).
 */
export function extendedCostLines(mode: CostMode): string[] {
  const horizons = 30;
  const settings = { smoke: { lineages: 1, budget: 20, rounds: 1 }, quick: { lineages: 3, budget: 150, rounds: 3 }, full: { lineages: 5, budget: 600, rounds: 3 } }[mode];
  const lineages: Lineage[] = Array.from({ length: settings.lineages }, (_, k) => benchLineage(horizons, 1400 + k, k));
  const unit = lineages[0];
  let sink = 0;
  const unitNanoseconds = cpuNanoseconds(() => void (sink += bareRandomWalkLogLik(unit.time, unit.mean, unit.samplingVariance, 5, 0.05)), mode === 'full' ? 2000 : 500, 20);
  const lines = [`Extended set without intervals, per model (${horizons} horizons; unit ${unitNanoseconds.toFixed(0)} ns)`];
  let total = 0;
  for (const model of extendedModels) {
    if (lineages.some((lineage) => model.unavailable?.(lineage))) continue;
    const milliseconds = median(lineages.map((lineage) => cpuNanoseconds(() => void fitLineage(lineage, [model], { intervals: false }), settings.budget, settings.rounds, mode !== 'smoke') / 1e6));
    total += milliseconds;
    lines.push(`  ${model.id.padEnd(36)} ${milliseconds.toFixed(2).padStart(8)} ms ${Math.round((milliseconds * 1e6) / unitNanoseconds).toLocaleString('en-US').padStart(10)}`);
  }
  lines.push(`  ${'sum'.padEnd(36)} ${total.toFixed(2).padStart(8)} ms ${Math.round((total * 1e6) / unitNanoseconds).toLocaleString('en-US').padStart(10)}`);
  if (sink === 42) process.stdout.write('');
  return lines;
}

if (runsAsCommand(import.meta.url) && process.argv.includes('--per-model')) {
  process.stdout.write(extendedCostLines(process.argv.includes('--full') ? 'full' : process.argv.includes('--smoke') ? 'smoke' : 'quick').join('\n') + '\n');
} else if (runsAsCommand(import.meta.url)) {
  measureEvaluationCost(process.argv.includes('--full') ? 'full' : process.argv.includes('--smoke') ? 'smoke' : 'quick')
    .then((cost) => process.stdout.write(evaluationCostLines(cost).join('\n') + '\n'))
    .catch((error) => {
      process.stderr.write(`${(error as Error).stack ?? String(error)}\n`);
      process.exit(1);
    });
}
