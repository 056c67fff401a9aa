import type { WhitenedSums } from './kalman-filter.js';
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

/**
 * Scratch of {@link informationScore} for a design of `width` columns and
 * `count` parameters (no allocation in its loop).
 *
 * @example
 * informationScoreWorkSize(2, 2); // 32
 */
export function informationScoreWorkSize(width: number, count: number): number {
  return width + count * width + count + count + count * width * width + 3 * width + 2 * width * width;
}

/**
 * Gradient of ln det(X' V^-1 X) with respect to the process parameters (the
 * term that the restricted, REML-type, log-likelihood subtracts half of),
 * by the same filter run over every design column as if it were data with
 * zero coefficients, with the score recursions of {@link filterScore}
 * (the column's own derivative d X_ij from `SpaceDerivative.design` in place
 * of the data's, which does not move). The whitened design is
 * W = L^-1 X, row i of column j being v_ij / sqrt(F_i) (v the column's
 * innovation); its derivative is
 *
 *   dW_ij = dv_ij / sqrt(F_i) - v_ij dF_i / (2 F_i^(3/2)),
 *   dv_ij = dX_ij - (phi' af_j + phi af'_j),
 *
 * and with A = W'W = X' V^-1 X = R'R (R the QR factor the filter pass kept
 * in `sums`):
 *
 *   d ln det A = tr(A^-1 dA) = 2 tr(A^-1 W' dW),
 *
 * A^-1 = R^-1 R^-T taken from R rather than from the squared cross-products.
 * It equals the dense form tr(A^-1 (-X' V^-1 dV V^-1 X + dX' V^-1 X +
 * X' V^-1 dX)) (Harville 1977, J. Amer. Statist. Assoc. 72:320-340, the
 * derivatives of the REML log-likelihood; from memory), which
 * `test/fit/restricted-score.test.ts` checks it against.
 *
 * @param space the state space at the process values (as the filter pass that made `sums` saw it)
 * @param derivatives one {@link SpaceDerivative} per process parameter
 * @param sums that pass's sums (only R, `triangle`, is read)
 * @param gradient output, overwritten: d ln det(X' V^-1 X) / dtheta_k (NaN when V is singular or R rank-deficient)
 * @param work scratch of length >= {@link informationScoreWorkSize}(width, derivatives.length)
 * @param omit a design column to leave out (default none): then the gradient of ln det(X_r' V^-1 X_r), X_r
 *   the design without that column, from ln det A_r = ln det A + ln (A^-1)_oo and d (A^-1)_oo = -2 a' W' dW a
 *   (a the column of A^-1; the partitioned-inverse identity, e.g. Harville 1997, Matrix Algebra from a
 *   Statistician's Perspective, section 13.3; from memory)
 * @example
 * // Two independent horizons of variance q + e around one mean: X' V^-1 X = 2 / (q + e), so d/dq ln det = -1 / (q + e) (closed form).
 * const space = allocateStateSpace(2, 1, Float64Array.of(1, 1)); space.design.fill(1); space.processVariance.fill(1);
 * const [derivative] = allocateSpaceDerivatives(2, 1, 1); derivative.processVariance.fill(1);
 * const sums = whiten(space, Float64Array.of(0, 0), allocateSums(2, 1), new Float64Array(workSize(1)));
 * const gradient = new Float64Array(1);
 * informationScore(space, [derivative], sums, gradient, new Float64Array(informationScoreWorkSize(1, 1)));
 * gradient[0]; // -0.5 (to 1e-12)
 */
export function informationScore(space: StateSpace, derivatives: readonly SpaceDerivative[], sums: WhitenedSums, gradient: Float64Array, work: Float64Array, omit = -1): void {
  const { size, width, transition, processVariance, observationVariance, design } = space;
  const count = derivatives.length;
  // Layout of `work`: filtered column states af_j; their derivatives af'_kj; Pf'_k; this row's F'_k; the
  // cross-products W'dW_k (width x width each); this row's v_j, w_j and dW_kj (per k in turn); R^-1; A^-1.
  const filtered = 0;
  const filteredDot = filtered + width;
  const varianceDot = filteredDot + count * width;
  const innovationVarianceDot = varianceDot + count;
  const cross = innovationVarianceDot + count;
  const innovations = cross + count * width * width;
  const whitened = innovations + width;
  const whitenedDot = whitened + width;
  const inverseTriangle = whitenedDot + width;
  const inverseInformation = inverseTriangle + width * width;
  work.fill(0, 0, inverseTriangle);
  const failed = (): void => void gradient.fill(Number.NaN, 0, count);
  let filteredVariance = 0;
  for (let i = 0; i < size; i++) {
    const phi = i === 0 ? 0 : transition[i];
    const predictedVariance = phi * phi * filteredVariance + processVariance[i];
    const e = observationVariance[i];
    const innovationVariance = predictedVariance + e;
    if (!(innovationVariance > 0)) return failed();
    const inverse = 1 / innovationVariance;
    const scale = Math.sqrt(inverse);
    const gain = predictedVariance * inverse;
    const eOverF = e * inverse;
    const row = i * width;
    for (let k = 0; k < count; k++) {
      const phiDot = i === 0 ? 0 : derivatives[k].transition[i];
      work[innovationVarianceDot + k] = 2 * phi * phiDot * filteredVariance + phi * phi * work[varianceDot + k] + derivatives[k].processVariance[i];
    }
    for (let j = 0; j < width; j++) {
      const innovation = design[row + j] - phi * work[filtered + j];
      work[innovations + j] = innovation;
      work[whitened + j] = innovation * scale;
    }
    for (let k = 0; k < count; k++) {
      const derivative = derivatives[k];
      const phiDot = i === 0 ? 0 : derivative.transition[i];
      const predictedVarianceDot = work[innovationVarianceDot + k];
      const gainDot = predictedVarianceDot * eOverF * inverse;
      for (let j = 0; j < width; j++) {
        const at = filteredDot + k * width + j;
        const predictedDot = phiDot * work[filtered + j] + phi * work[at];
        const innovation = work[innovations + j];
        const innovationDot = derivative.design[row + j] - predictedDot;
        work[whitenedDot + j] = innovationDot * scale - 0.5 * innovation * predictedVarianceDot * inverse * scale;
        work[at] = predictedDot + gainDot * innovation + gain * innovationDot;
      }
      const base = cross + k * width * width;
      for (let l = 0; l < width; l++) {
        const left = work[whitened + l];
        for (let j = 0; j < width; j++) work[base + l * width + j] += left * work[whitenedDot + j];
      }
      work[varianceDot + k] = predictedVarianceDot * eOverF * eOverF;
    }
    for (let j = 0; j < width; j++) work[filtered + j] = phi * work[filtered + j] + gain * work[innovations + j];
    filteredVariance = predictedVariance * eOverF;
  }
  // A^-1 = R^-1 R^-T from the kept QR factor (as profileOut forms the coefficients' covariance).
  const triangle = sums.triangle;
  let largest = 0;
  for (let j = 0; j < width; j++) largest = Math.max(largest, Math.abs(triangle[j * width + j]));
  for (let j = 0; j < width; j++) if (!(Math.abs(triangle[j * width + j]) > largest * 1e-14)) return failed();
  for (let column = 0; column < width; column++) {
    for (let i = column; i >= 0; i--) {
      let value = i === column ? 1 : 0;
      for (let k = i + 1; k <= column; k++) value -= triangle[i * width + k] * work[inverseTriangle + k * width + column];
      work[inverseTriangle + i * width + column] = value / triangle[i * width + i];
    }
    for (let i = column + 1; i < width; i++) work[inverseTriangle + i * width + column] = 0;
  }
  for (let i = 0; i < width; i++) {
    for (let j = 0; j < width; j++) {
      let value = 0;
      for (let k = Math.max(i, j); k < width; k++) value += work[inverseTriangle + i * width + k] * work[inverseTriangle + j * width + k];
      work[inverseInformation + i * width + j] = value;
    }
  }
  for (let k = 0; k < count; k++) {
    const base = cross + k * width * width;
    let trace = 0;
    for (let l = 0; l < width; l++) for (let j = 0; j < width; j++) trace += work[inverseInformation + j * width + l] * work[base + l * width + j];
    gradient[k] = 2 * trace;
    if (omit < 0) continue;
    // Without column `omit`: ln det A_rr = ln det A + ln (A^-1)_oo (the Schur complement), and
    // d (A^-1)_oo = -a' dA a = -2 a' (W'dW) a with a the column `omit` of A^-1.
    let quadratic = 0;
    for (let l = 0; l < width; l++) {
      const left = work[inverseInformation + l * width + omit];
      for (let j = 0; j < width; j++) quadratic += left * work[base + l * width + j] * work[inverseInformation + j * width + omit];
    }
    gradient[k] -= (2 * quadratic) / work[inverseInformation + omit * width + omit];
  }
}
