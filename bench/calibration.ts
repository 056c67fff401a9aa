import { pathToFileURL } from 'node:url';
import { intervalMethods, type IntervalMethod } from '../src/fit/intervals.js';
import { summariseCoverage, type CoverageTask } from '../src/simulate/coverage.js';
import type { Design } from '../src/simulate/design.js';
import { createRandom } from '../src/simulate/random.js';
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
export async function runCalibration(options: CalibrationOptions = {}): Promise<CalibrationRow[]> {
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
    const shape = createRandom(seed + size);
    const time = [0];
    for (let i = 1; i < size; i++) time.push(time[i - 1] + 0.5 + shape.uniform());
    const design: Design = { time, count: time.map(() => 20), withinVariance: time.map(() => 1), timeUnit: 'Myr' };
    const meanInterval = time[size - 1] / (size - 1);
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
  return rows;
}

// Runnable entry: `node dist/bench/calibration.js [lineages]` after `npm run build`.
if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const lineages = process.argv[2] ? Number(process.argv[2]) : undefined;
  runCalibration({ lineages }).catch((error: unknown) => {
    console.error(error);
    process.exitCode = 1;
  });
}
