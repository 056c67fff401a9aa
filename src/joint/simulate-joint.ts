import type { RandomSource } from '../random/random.js';
import { jointDesign, jointDynamics, type JointModel } from './joint-models.js';
import { choleskyInPlace, type JointData } from './vector-filter.js';

/** True values of a joint model, in the user's units; locations trait by trait in the design's order. */
export interface JointTruth {
  /** a_j (and drift_j, or optimum_j), trait by trait: [a_1, drift_1, a_2, drift_2, ...]. */
  readonly locations: readonly number[];
  /** R (walks, ou) or Sigma (stasis), k × k row-major. */
  readonly covariance: Float64Array;
  /** alpha_j for ou, else null. */
  readonly alpha: readonly number[] | null;
}

/**
 * Draw trait means at the horizons of `design` (its time and sampling
 * covariances; the pattern of missing values is kept) from a joint model:
 * the latent process through its exact Markov form (Q_i from
 * `jointDynamics`), then sampling error N(0, E_i). Seeded through `random`.
 *
 * @example
 * const time = [0, 1, 2, 3, 4, 5];
 * const x = [0, 0.5, 0.2, 1.1, 1.6, 1.2];
 * const y = [1, 1.4, 1.1, 1.9, 2.6, 2.0];
 * const data = { traits: 2, time: Float64Array.from(time), values: Float64Array.from(time.flatMap((_, i) => [x[i], y[i]])), sampling: Float64Array.from(time.flatMap(() => [0.01, 0, 0, 0.01])) };
 * const truth = { locations: [0, 1], covariance: Float64Array.of(1, 0.5, 0.5, 1), alpha: null };
 * const drawn = simulateJoint(jointModel('correlated-random-walk'), data, truth, createRandom(1));
 * drawn.values.length; // 12 (N k)
 * Array.from(drawn.values.subarray(0, 2)); // [-0.07400966231842124, 1.0979706764730728] (seed 1)
 */
export function simulateJoint(model: JointModel, design: JointData, truth: JointTruth, random: RandomSource): JointData {
  const k = design.traits;
  const horizons = design.time.length;
  const dynamics = jointDynamics(model, design, truth.covariance, truth.alpha);
  const columns = jointDesign(model, design, truth.alpha);
  const values = new Float64Array(horizons * k);
  let state = new Float64Array(k);
  const factor = new Float64Array(k * k);
  const draw = (covariance: Float64Array, offset: number): Float64Array => {
    for (let index = 0; index < k * k; index++) factor[index] = covariance[offset + index];
    const noise = new Float64Array(k);
    // A singular covariance (a variance of 0) is drawn through its positive part, entry by entry, after a tiny ridge.
    if (!choleskyInPlace(factor, k)) {
      for (let index = 0; index < k * k; index++) factor[index] = covariance[offset + index] + (Math.floor(index / k) === index % k ? 1e-300 : 0);
      if (!choleskyInPlace(factor, k)) {
        for (let j = 0; j < k; j++) noise[j] = Math.sqrt(Math.max(covariance[offset + j * k + j], 0)) * random.normal();
        return noise;
      }
    }
    const standard = Array.from({ length: k }, () => random.normal());
    for (let j = 0; j < k; j++) {
      let sum = 0;
      for (let l = 0; l <= j; l++) sum += factor[j * k + l] * standard[l];
      noise[j] = sum;
    }
    return noise;
  };
  for (let i = 0; i < horizons; i++) {
    const step = draw(dynamics.process, i * k * k);
    const next = new Float64Array(k);
    for (let j = 0; j < k; j++) next[j] = (i === 0 ? 0 : dynamics.transition[i * k + j] * state[j]) + step[j];
    state = next;
    const error = draw(design.sampling, i * k * k);
    for (let j = 0; j < k; j++) {
      let mean = 0;
      columns.forEach((column, c) => {
        mean += column[i * k + j] * truth.locations[c];
      });
      values[i * k + j] = Number.isNaN(design.values[i * k + j]) ? Number.NaN : mean + state[j] + error[j];
    }
  }
  return { traits: k, time: design.time, values, sampling: design.sampling };
}
