import { pathToFileURL } from 'node:url';
import { defaultIntervalMethod, intervalMethods, type IntervalMethod } from '../src/fit/intervals.js';
import { summariseCoverage, type CoverageTask } from '../src/simulate/coverage.js';
import type { Design } from '../src/simulate/design.js';
import { createRandom } from '../src/random/random.js';
import { poolRunner } from '../src/simulate/run-replicates.js';

/** Options of {@link runCalibration}; every field has a default. */
export interface CalibrationOptions {
  /** Numbers of horizons (default 15, 25, 50, 100). */
  readonly sizes?: readonly number[];
  /** Simulated lineages per size (default 300). */
  readonly lineages?: number;
  /** Interval methods (default all: profile, adjusted, bootstrap, integrated). */
  readonly methods?: readonly IntervalMethod[];
  /** Bootstrap replicates per lineage for the bootstrap method (default 99). */
  readonly bootstrapReplicates?: number;
  readonly seed?: number;
  /** Worker threads (default every core; results do not depend on it). */
  readonly threads?: number;
  /** Interval methods of the ou scenario (default the default method and profile; [] skips it). */
  readonly ouMethods?: readonly IntervalMethod[];
  /** Simulated ou lineages per size (default `lineages`). */
  readonly ouLineages?: number;
  /** Where lines of the printed table go (default console.log; pass () => {} for silence). */
  readonly print?: (line: string) => void;
}

/** One cell of the calibration table. */
export interface CalibrationRow {
  readonly horizons: number;
  readonly method: IntervalMethod;
  readonly lineages: number;
  /** Share of nominal 95% intervals that covered the true drift and the true step variance. */
  readonly drift: number;
  readonly step_variance: number;
  readonly seconds: number;
}

/** One cell of the ou calibration table. */
export interface OuCalibrationRow {
  readonly horizons: number;
  /** The method asked for (each fit says in `interval_method` what it used). */
  readonly method: IntervalMethod;
  readonly lineages: number;
  /** Share of nominal 95% intervals that covered the true alpha, optimum and step variance. */
  readonly alpha: number;
  readonly optimum: number;
  readonly step_variance: number;
  /** Share of fits whose intervals fell back to the plain profile (estimate outside the method's interval, issue 18). */
  readonly fallback: number;
  readonly seconds: number;
}

/**
 * The uneven design shared by both calibrations: `size` horizons 0.5–1.5 time
 * units apart (seeded by seed + size), 20 specimens each, within-horizon
 * variance 1.
 *
 * @example
 * calibrationDesign(2026, 15).time.length; // 15
 */
function calibrationDesign(seed: number, size: number): Design {
  const shape = createRandom(seed + size);
  const time = [0];
  for (let i = 1; i < size; i++) time.push(time[i - 1] + 0.5 + shape.uniform());
  return { time, count: time.map(() => 20), withinVariance: time.map(() => 1), timeUnit: 'Myr' };
}

/**
 * Coverage of every interval method's nominal 95% intervals for drift and
 * step variance, over seeded simulated directional walks at each size. The
 * scenario is the common fossil one of the issue: unequal spacing (intervals
 * 0.5 to 1.5 time units, drawn once per size), 20 specimens of within-horizon
 * variance 1 per horizon, step variance per average interval equal to the
 * sampling variance of a mean, drift 0.05 per time unit. The bootstrap
 * method is run in full (its own parametric bootstrap on every lineage).
 * Run by the benchmark (`npm run bench`), never by `npm test`.
 *
 * @example
 * const rows = await runCalibration({ sizes: [25], lineages: 300 });
 * // rows: one per (size, method), e.g. { horizons: 25, method: 'integrated', drift: 0.95, ... }
 */
export async function runCalibration(options: CalibrationOptions = {}): Promise<{ rows: CalibrationRow[]; ou: OuCalibrationRow[] }> {
  const sizes = options.sizes ?? [15, 25, 50, 100];
  const lineages = options.lineages ?? 300;
  const methods = options.methods ?? intervalMethods;
  const seed = options.seed ?? 2026;
  const print = options.print ?? ((line: string) => console.log(line));
  const runner = poolRunner({ threads: options.threads });
  const rows: CalibrationRow[] = [];
  print(`Coverage of nominal 95% intervals, ${lineages} simulated directional walks per size (seed ${seed})`);
  print('horizons  method       drift  step_variance  seconds');
  for (const size of sizes) {
    const design = calibrationDesign(seed, size);
    const meanInterval = design.time[size - 1] / (size - 1);
    const parameters = { ancestral_mean: 10, drift: 0.05, step_variance: 1 / 20 / meanInterval };
    for (const method of methods) {
      const started = Date.now();
      const tasks: CoverageTask[] = Array.from({ length: lineages }, (_, index) => ({
        design,
        model: 'directional-walk',
        parameters,
        names: ['drift', 'step_variance'],
        methods: [method],
        seed,
        index,
        bootstrapReplicates: options.bootstrapReplicates ?? 99,
      }));
      const summary = summariseCoverage(await runner.coverage(tasks), [method], ['drift', 'step_variance']);
      const row: CalibrationRow = {
        horizons: size,
        method,
        lineages: summary.converged,
        drift: summary.coverage[method].drift,
        step_variance: summary.coverage[method].step_variance,
        seconds: (Date.now() - started) / 1000,
      };
      rows.push(row);
      print(`${String(size).padStart(8)}  ${method.padEnd(11)} ${row.drift.toFixed(3).padStart(6)}  ${row.step_variance.toFixed(3).padStart(13)}  ${row.seconds.toFixed(1).padStart(7)}`);
    }
  }
  const ou = await runOuCalibration(options, runner, print);
  return { rows, ou };
}

/**
 * Coverage of ou's nominal 95% intervals for alpha, the optimum and the step
 * variance over seeded simulated ou lineages, on the designs of
 * {@link runCalibration}: the trait starts 1 unit (about 4.5 standard errors
 * of a mean) below its optimum, the half-life is a quarter of the span, and
 * the step variance is the directional scenario's. Each fit uses the method's
 * intervals with its fallbacks (the share of fits that fell back to the
 * plain profile is reported).
 */
async function runOuCalibration(options: CalibrationOptions, runner: ReturnType<typeof poolRunner>, print: (line: string) => void): Promise<OuCalibrationRow[]> {
  const sizes = options.sizes ?? [15, 25, 50, 100];
  const methods = options.ouMethods ?? [defaultIntervalMethod, 'profile'];
  const lineages = options.ouLineages ?? options.lineages ?? 300;
  const seed = options.seed ?? 2026;
  const rows: OuCalibrationRow[] = [];
  if (methods.length === 0) return rows;
  print(`Coverage of ou's nominal 95% intervals, ${lineages} simulated ou lineages per size (seed ${seed})`);
  print('horizons  method       alpha  optimum  step_variance  fallback  seconds');
  const names = ['alpha', 'optimum', 'step_variance'];
  for (const size of sizes) {
    const design = calibrationDesign(seed, size);
    const span = design.time[size - 1];
    const parameters = { ancestral_mean: 10, optimum: 11, alpha: Math.LN2 / (span / 4), step_variance: 1 / 20 / (span / (size - 1)) };
    for (const method of methods) {
      const started = Date.now();
      const tasks: CoverageTask[] = Array.from({ length: lineages }, (_, index) => ({
        design,
        model: 'ou',
        parameters,
        names,
        methods: [method],
        seed,
        index,
        bootstrapReplicates: options.bootstrapReplicates ?? 99,
      }));
      const summary = summariseCoverage(await runner.coverage(tasks), [method], names);
      const row: OuCalibrationRow = {
        horizons: size,
        method,
        lineages: summary.converged,
        alpha: summary.coverage[method].alpha,
        optimum: summary.coverage[method].optimum,
        step_variance: summary.coverage[method].step_variance,
        fallback: summary.fallback[method],
        seconds: (Date.now() - started) / 1000,
      };
      rows.push(row);
      print(`${String(size).padStart(8)}  ${method.padEnd(11)} ${row.alpha.toFixed(3).padStart(6)}  ${row.optimum.toFixed(3).padStart(7)}  ${row.step_variance.toFixed(3).padStart(13)}  ${row.fallback.toFixed(3).padStart(8)}  ${row.seconds.toFixed(1).padStart(7)}`);
    }
  }
  return rows;
}

// Runnable entry: `node dist/bench/calibration.js [lineages]` after `npm run build`.
if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  // node dist/bench/calibration.js [lineages] [sizes, e.g. 15,25] [methods, e.g. integrated,profile or none] [ou methods] [threads]
  const lineages = process.argv[2] ? Number(process.argv[2]) : undefined;
  const list = (text: string | undefined): string[] | undefined => (text === undefined ? undefined : text === 'none' ? [] : text.split(','));
  const sizes = list(process.argv[3])?.map(Number);
  const methods = list(process.argv[4]) as IntervalMethod[] | undefined;
  const ouMethods = list(process.argv[5]) as IntervalMethod[] | undefined;
  const threads = process.argv[6] ? Number(process.argv[6]) : undefined;
  runCalibration({ lineages, sizes, methods, ouMethods, threads }).catch((error: unknown) => {
    console.error(error);
    process.exitCode = 1;
  });
}
