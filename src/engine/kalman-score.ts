import type { StateSpace } from './state-space.js';

/**
 * Derivatives of a state space's entries with respect to one process
 * parameter (natural units): d transition_i, d processVariance_i and the
 * design's d X_ij (row-major, size × width). Filled by a model's
 * `fillSpaceDerivatives`.
 */
export interface SpaceDerivative {
  readonly transition: Float64Array;
  readonly processVariance: Float64Array;
  readonly design: Float64Array;
}

/**
 * Allocate one zero-filled {@link SpaceDerivative} per process parameter.
 *
 * @example
 * allocateSpaceDerivatives(3, 2, 2).length; // 2
 * allocateSpaceDerivatives(3, 2, 2)[0].design.length; // 6
 */
export function allocateSpaceDerivatives(size: number, width: number, count: number): SpaceDerivative[] {
  return Array.from({ length: count }, () => ({
    transition: new Float64Array(size),
    processVariance: new Float64Array(size),
    design: new Float64Array(size * width),
  }));
}

const logTwoPi = Math.log(2 * Math.PI);

/**
 * Scratch of {@link filterScore} for `count` parameters (no allocation in its loop).
 *
 * @example
 * scoreWorkSize(2); // 6
 */
export function scoreWorkSize(count: number): number {
  return 3 * count;
}

/**
 * Log-likelihood of x ~ N(X beta, V) at given coefficients beta and its
 * gradient with respect to the process parameters (beta held fixed), by the
 * scalar Kalman filter over the residual r = x - X beta and its derivative
 * recursions (the score recursions; Harvey 1989, section 3.4.6; Engle &
 * Watson 1981). Per horizon, for each parameter (a dot is d/dtheta):
 *
 *   P = phi^2 Pf + q,        P' = 2 phi phi' Pf + phi^2 Pf' + q'
 *   F = P + e,               F' = P'
 *   a = phi af,              a' = phi' af + phi af'
 *   v = r - a,               v' = -(X' beta) - a'
 *   K = P / F,               K' = P' e / F^2
 *   af <- a + K v,           af' <- a' + K' v + K v'
 *   Pf <- P e / F,           Pf' <- P' e^2 / F^2
 *   logL = -1/2 sum (ln 2 pi + ln F + v^2 / F),
 *   dlogL = -1/2 sum (F' / F + 2 v v' / F - v^2 F' / F^2).
 *
 * At the GLS estimate beta(theta) this gradient is also the gradient of the
 * profile log-likelihood max_beta logL: d/dtheta logL(beta(theta), theta) =
 * dlogL/dtheta + (dlogL/dbeta) (dbeta/dtheta), and dlogL/dbeta = 0 at the
 * GLS estimate (the envelope theorem; for the profile of a linear mixed
 * model, Harville 1977, J. Amer. Statist. Assoc. 72:320-340, section 3).
 *
 * Harvey, A. C. (1989). Forecasting, Structural Time Series Models and the
 * Kalman Filter. Cambridge University Press. Engle, R. F. & Watson, M. (1981).
 * A one-factor multivariate time series model of metropolitan wage rates.
 * J. Amer. Statist. Assoc. 76:774-781.
 *
 * @param space the state space at the process values
 * @param derivatives one {@link SpaceDerivative} per process parameter
 * @param data the observations x (length N)
 * @param coefficients beta (length `space.width`)
 * @param gradient output, overwritten: dlogL / dtheta_k (NaN when V is singular)
 * @param work scratch of length >= {@link scoreWorkSize}(derivatives.length)
 * @returns logL at (beta, theta); -Infinity when some innovation variance is 0
 * @example
 * // One horizon, x ~ N(0, q + e): dlogL/dq = -1/2 (1/F - x^2/F^2).
 * const space = allocateStateSpace(1, 1, Float64Array.of(1)); space.processVariance[0] = 1;
 * const [derivative] = allocateSpaceDerivatives(1, 1, 1); derivative.processVariance[0] = 1;
 * const gradient = new Float64Array(1);
 * filterScore(space, [derivative], Float64Array.of(2), [0], gradient, new Float64Array(scoreWorkSize(1)));
 * gradient[0]; // 0.25 (= -1/2 (1/2 - 4/4))
 */
export function filterScore(
  space: StateSpace,
  derivatives: readonly SpaceDerivative[],
  data: Float64Array,
  coefficients: ArrayLike<number>,
  gradient: Float64Array,
  work: Float64Array,
): number {
  const { size, width, transition, processVariance, observationVariance, design } = space;
  const count = derivatives.length;
  // work[3k] = af'_k, work[3k + 1] = Pf'_k, work[3k + 2] = sum of the score terms of parameter k.
  work.fill(0, 0, 3 * count);
  let filteredMean = 0;
  let filteredVariance = 0;
  let sum = 0;
  for (let i = 0; i < size; i++) {
    const phi = i === 0 ? 0 : transition[i];
    const predictedVariance = phi * phi * filteredVariance + processVariance[i];
    const e = observationVariance[i];
    const innovationVariance = predictedVariance + e;
    if (!(innovationVariance > 0)) {
      gradient.fill(Number.NaN, 0, count);
      return Number.NEGATIVE_INFINITY;
    }
    let mean = 0;
    const row = i * width;
    for (let j = 0; j < width; j++) mean += design[row + j] * coefficients[j];
    const predictedMean = phi * filteredMean;
    const innovation = data[i] - mean - predictedMean;
    const inverse = 1 / innovationVariance;
    const gain = predictedVariance * inverse;
    const eOverF = e * inverse;
    sum += Math.log(innovationVariance) + innovation * innovation * inverse;
    for (let k = 0; k < count; k++) {
      const derivative = derivatives[k];
      const phiDot = i === 0 ? 0 : derivative.transition[i];
      const filteredMeanDot = work[3 * k];
      const filteredVarianceDot = work[3 * k + 1];
      const predictedVarianceDot = 2 * phi * phiDot * filteredVariance + phi * phi * filteredVarianceDot + derivative.processVariance[i];
      let meanDot = 0;
      for (let j = 0; j < width; j++) meanDot += derivative.design[row + j] * coefficients[j];
      const predictedMeanDot = phiDot * filteredMean + phi * filteredMeanDot;
      const innovationDot = -meanDot - predictedMeanDot;
      const gainDot = predictedVarianceDot * eOverF * inverse;
      work[3 * k + 2] += predictedVarianceDot * inverse + 2 * innovation * innovationDot * inverse - innovation * innovation * predictedVarianceDot * inverse * inverse;
      work[3 * k] = predictedMeanDot + gainDot * innovation + gain * innovationDot;
      work[3 * k + 1] = predictedVarianceDot * eOverF * eOverF;
    }
    filteredMean = predictedMean + gain * innovation;
    filteredVariance = predictedVariance * eOverF;
  }
  for (let k = 0; k < count; k++) gradient[k] = -0.5 * work[3 * k + 2];
  return -0.5 * (size * logTwoPi + sum);
}
