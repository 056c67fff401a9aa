import { performance } from 'node:perf_hooks';
import { fitJointModel } from '../src/joint/fit-joint.js';
import { jointModels } from '../src/joint/joint-models.js';
import { simulateJoint } from '../src/joint/simulate-joint.js';
import type { JointData } from '../src/joint/vector-filter.js';
import { createRandom } from '../src/random/random.js';

/** One joint model's fit on the benchmark group. */
export interface JointBenchRow {
  readonly model: string;
  readonly seconds: number;
  readonly intervalSeconds: number | null;
  readonly logLik: number | null;
}

/**
 * `stratotrend joint` speed (issue 17): a seeded invented 3-trait group of
 * `horizons` horizons (uneven spacing, a few missing values, correlated
 * steps), every joint model fitted, with and (full run) without intervals.
 */
export function measureJoint(horizons: number, intervals: boolean): { traits: number; horizons: number; rows: JointBenchRow[] } {
  const k = 3;
  const random = createRandom(2026);
  const time = [0];
  for (let i = 1; i < horizons; i++) time.push(time[i - 1] + 0.05 + 0.1 * random.uniform());
  const values = new Float64Array(horizons * k);
  for (let i = 3; i < horizons; i += 17) values[i * k + (i % k)] = Number.NaN;
  const sampling = new Float64Array(horizons * k * k);
  for (let i = 0; i < horizons; i++) for (let j = 0; j < k; j++) sampling[i * k * k + j * k + j] = 0.02 + 0.03 * random.uniform();
  const design: JointData = { traits: k, time: Float64Array.from(time), values, sampling };
  const truth = { locations: [1, 2, 3], covariance: Float64Array.of(1, 0.5, 0.2, 0.5, 1, 0.3, 0.2, 0.3, 1), alpha: null };
  const walk = jointModels.find((model) => model.id === 'correlated-random-walk')!;
  const data = simulateJoint(walk, design, truth, createRandom(7));
  const rows = jointModels.map((model) => {
    const start = performance.now();
    const fit = fitJointModel(model, data);
    const seconds = (performance.now() - start) / 1000;
    let intervalSeconds: number | null = null;
    if (intervals) {
      const withIntervals = performance.now();
      fitJointModel(model, data, { intervals: true });
      intervalSeconds = (performance.now() - withIntervals) / 1000;
    }
    return { model: model.id, seconds, intervalSeconds, logLik: fit.logLik };
  });
  return { traits: k, horizons, rows };
}
