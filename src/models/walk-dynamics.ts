import type { SpaceDerivative } from '../engine/kalman-score.js';
import type { StateSpace } from '../engine/state-space.js';
import type { Lineage } from '../lineage.js';
import { timeSpan, varianceScale } from './model.js';

/**
 * Latent dynamics of a Brownian walk started exactly at the ancestral mean:
 * transition 1, process variance stepVariance * tau_i, no variance at t_0.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * const space = allocateStateSpace(3, 1, lineage.samplingVariance);
 * fillWalkDynamics(lineage, 2, space);
 * Array.from(space.transition); // [0, 1, 1]
 * Array.from(space.processVariance); // [0, 2, 4] (step variance × interval: 2 × 1, 2 × 2)
 */
export function fillWalkDynamics(lineage: Lineage, stepVariance: number, space: StateSpace): void {
  const time = lineage.time;
  space.transition[0] = 0;
  space.processVariance[0] = 0;
  for (let i = 1; i < space.size; i++) {
    space.transition[i] = 1;
    space.processVariance[i] = stepVariance * (time[i] - time[i - 1]);
  }
}

/**
 * d/d stepVariance of what {@link fillWalkDynamics} fills (for the score
 * recursions): process variance tau_i, nothing else depends on it; the
 * design's derivative is 0.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * const [derivative] = allocateSpaceDerivatives(3, 1, 1);
 * fillWalkDerivatives(lineage, derivative);
 * Array.from(derivative.processVariance); // [0, 1, 2] (the intervals: d(step variance × interval) / d step variance)
 */
export function fillWalkDerivatives(lineage: Lineage, derivative: SpaceDerivative): void {
  const time = lineage.time;
  derivative.transition.fill(0);
  derivative.design.fill(0);
  derivative.processVariance[0] = 0;
  for (let i = 1; i < time.length; i++) derivative.processVariance[i] = time[i] - time[i - 1];
}

/**
 * Search range for a step variance (trait^2 per time unit): from far below
 * anything the data could resolve to far above the spread of the means per
 * shortest interval.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * stepVarianceRange(lineage); // [7.777777777777777e-10, 2333.333333333333] (1e-9 × scale / span 3, 1e3 × scale / shortest interval 1)
 */
export function stepVarianceRange(lineage: Lineage): readonly [number, number] {
  const scale = varianceScale(lineage);
  const { span, shortest } = timeSpan(lineage);
  return [(1e-9 * scale) / span, (1e3 * scale) / shortest];
}
