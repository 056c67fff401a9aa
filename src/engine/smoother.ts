import type { StateSpace } from './state-space.js';

/** Filter and smoother output for one lineage at fixed parameters. */
export interface SmootherResult {
  /** E[z_i | all data]: smoothed true lineage mean (mu_i + smoothed deviation). */
  readonly smoothedMean: Float64Array;
  /** Var[z_i | all data] at the given parameters. */
  readonly smoothedVariance: Float64Array;
  /** One-step prediction errors divided by their standard deviation (N(0,1) under a correct model). */
  readonly standardizedInnovations: Float64Array;
  /** One-step predicted mean of each horizon and its prediction variance (innovation variance). */
  readonly predictedMean: Float64Array;
  readonly predictionVariance: Float64Array;
}

/**
 * Kalman filter and Rauch–Tung–Striebel fixed-interval smoother for the latent
 * lineage mean, at given process parameters and location mean mu = X beta.
 *
 * Rauch, H. E., Tung, F. & Striebel, C. T. (1965). Maximum likelihood
 * estimates of linear dynamic systems. AIAA Journal 3:1445-1450.
 *
 * @param space state space at the fitted process parameters
 * @param locationMean mu_i for each horizon
 * @param data observed means x_i
 * @example
 * const space = allocateStateSpace(1, 1, Float64Array.of(1)); space.processVariance[0] = 1;
 * const smoothed = smoothLineage(space, Float64Array.of(0), Float64Array.of(2));
 * smoothed.smoothedMean[0]; // 1 (prior N(0, 1), one reading 2 with variance 1: halfway)
 * smoothed.smoothedVariance[0]; // 0.5 (= 1 × 1 / (1 + 1))
 * smoothed.standardizedInnovations[0]; // 1.4142135623730951 (to 1e-15; = 2 / sqrt 2)
 */
export function smoothLineage(space: StateSpace, locationMean: Float64Array, data: Float64Array): SmootherResult {
  const size = space.size;
  const predictedDeviation = new Float64Array(size);
  const predictedVariance = new Float64Array(size);
  const filteredDeviation = new Float64Array(size);
  const filteredVariance = new Float64Array(size);
  const standardizedInnovations = new Float64Array(size);
  const predictionVariance = new Float64Array(size);
  const predictedMean = new Float64Array(size);
  let deviation = 0;
  let variance = 0;
  for (let i = 0; i < size; i++) {
    const phi = i === 0 ? 0 : space.transition[i];
    predictedDeviation[i] = phi * deviation;
    predictedVariance[i] = phi * phi * variance + space.processVariance[i];
    const innovationVariance = predictedVariance[i] + space.observationVariance[i];
    const innovation = data[i] - locationMean[i] - predictedDeviation[i];
    predictedMean[i] = locationMean[i] + predictedDeviation[i];
    predictionVariance[i] = innovationVariance;
    if (innovationVariance > 0) {
      const gain = predictedVariance[i] / innovationVariance;
      deviation = predictedDeviation[i] + gain * innovation;
      variance = (predictedVariance[i] * space.observationVariance[i]) / innovationVariance;
      standardizedInnovations[i] = innovation / Math.sqrt(innovationVariance);
    } else {
      deviation = predictedDeviation[i];
      variance = 0;
      standardizedInnovations[i] = 0;
    }
    filteredDeviation[i] = deviation;
    filteredVariance[i] = variance;
  }
  const smoothedMean = new Float64Array(size);
  const smoothedVariance = new Float64Array(size);
  let nextDeviation = filteredDeviation[size - 1];
  let nextVariance = filteredVariance[size - 1];
  smoothedMean[size - 1] = locationMean[size - 1] + nextDeviation;
  smoothedVariance[size - 1] = nextVariance;
  for (let i = size - 2; i >= 0; i--) {
    const phi = space.transition[i + 1];
    const gain = predictedVariance[i + 1] > 0 ? (filteredVariance[i] * phi) / predictedVariance[i + 1] : 0;
    const smoothed = filteredDeviation[i] + gain * (nextDeviation - predictedDeviation[i + 1]);
    const smoothedVar = filteredVariance[i] + gain * gain * (nextVariance - predictedVariance[i + 1]);
    smoothedMean[i] = locationMean[i] + smoothed;
    smoothedVariance[i] = Math.max(0, smoothedVar);
    nextDeviation = smoothed;
    nextVariance = smoothedVar;
  }
  return { smoothedMean, smoothedVariance, standardizedInnovations, predictedMean, predictionVariance };
}
