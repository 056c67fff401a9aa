import type { WhitenedSums } from './kalman-filter.js';

const logTwoPi = Math.log(2 * Math.PI);

/** Result of profiling the location parameters out by GLS. */
export interface ProfileResult {
  /** Profile log-likelihood (natural log, all constants). */
  readonly logLik: number;
  /** GLS estimate of the design coefficients beta. */
  readonly coefficients: Float64Array;
  /** (X' V^-1 X)^-1, row-major: the sampling covariance of beta at these process parameters. */
  readonly coefficientCovariance: Float64Array;
  /** ln det(X' V^-1 X), used by restricted (REML-type) likelihoods. */
  readonly logDetInformation: number;
}

/**
 * Cholesky factorisation of a small symmetric positive-definite matrix in
 * place (row-major lower triangle). Returns false when not positive definite.
 */
function choleskyInPlace(matrix: Float64Array, order: number): boolean {
  for (let j = 0; j < order; j++) {
    let diagonal = matrix[j * order + j];
    for (let k = 0; k < j; k++) diagonal -= matrix[j * order + k] ** 2;
    if (!(diagonal > 0)) return false;
    const root = Math.sqrt(diagonal);
    matrix[j * order + j] = root;
    for (let i = j + 1; i < order; i++) {
      let value = matrix[i * order + j];
      for (let k = 0; k < j; k++) value -= matrix[i * order + k] * matrix[j * order + k];
      matrix[i * order + j] = value / root;
    }
  }
  return true;
}

/**
 * Exact GLS in the whitened space: beta = (W'W)^-1 W'w and the profile
 * log-likelihood -0.5 (N ln 2 pi + ln det V + w'w - beta' W'w).
 * Returns logLik = -Infinity when V is singular or X'V^-1X is not invertible.
 *
 * Aitken, A. C. (1935). On least squares and linear combination of
 * observations. Proc. Royal Society of Edinburgh 55:42-48.
 */
export function profileOut(sums: WhitenedSums): ProfileResult {
  const width = sums.width;
  const coefficients = new Float64Array(width);
  const covariance = new Float64Array(width * width);
  if (sums.singular) return { logLik: Number.NEGATIVE_INFINITY, coefficients, coefficientCovariance: covariance, logDetInformation: Number.NaN };
  if (width === 0) {
    return { logLik: -0.5 * (sums.size * logTwoPi + sums.sumLogVariance + sums.dataCross), coefficients, coefficientCovariance: covariance, logDetInformation: 0 };
  }
  const factor = Float64Array.from(sums.designCross);
  if (!choleskyInPlace(factor, width)) {
    return { logLik: Number.NEGATIVE_INFINITY, coefficients, coefficientCovariance: covariance, logDetInformation: Number.NaN };
  }
  let logDetInformation = 0;
  for (let j = 0; j < width; j++) logDetInformation += 2 * Math.log(factor[j * width + j]);
  // Forward then back substitution for beta.
  const forward = new Float64Array(width);
  for (let i = 0; i < width; i++) {
    let value = sums.designData[i];
    for (let k = 0; k < i; k++) value -= factor[i * width + k] * forward[k];
    forward[i] = value / factor[i * width + i];
  }
  let explained = 0;
  for (let i = 0; i < width; i++) explained += forward[i] * forward[i];
  for (let i = width - 1; i >= 0; i--) {
    let value = forward[i];
    for (let k = i + 1; k < width; k++) value -= factor[k * width + i] * coefficients[k];
    coefficients[i] = value / factor[i * width + i];
  }
  // Inverse of W'W from its factor, column by column.
  const unit = new Float64Array(width);
  for (let column = 0; column < width; column++) {
    unit.fill(0);
    unit[column] = 1;
    for (let i = 0; i < width; i++) {
      let value = unit[i];
      for (let k = 0; k < i; k++) value -= factor[i * width + k] * unit[k];
      unit[i] = value / factor[i * width + i];
    }
    for (let i = width - 1; i >= 0; i--) {
      let value = unit[i];
      for (let k = i + 1; k < width; k++) value -= factor[k * width + i] * unit[k];
      unit[i] = value / factor[i * width + i];
    }
    for (let i = 0; i < width; i++) covariance[i * width + column] = unit[i];
  }
  const residual = Math.max(0, sums.dataCross - explained);
  return {
    logLik: -0.5 * (sums.size * logTwoPi + sums.sumLogVariance + residual),
    coefficients,
    coefficientCovariance: covariance,
    logDetInformation,
  };
}

/**
 * Log-likelihood at given design coefficients (no profiling):
 * -0.5 (N ln 2 pi + ln det V + (w - W beta)'(w - W beta)).
 */
export function logLikAt(sums: WhitenedSums, coefficients: ArrayLike<number>): number {
  if (sums.singular) return Number.NEGATIVE_INFINITY;
  const width = sums.width;
  let quadratic = sums.dataCross;
  for (let j = 0; j < width; j++) {
    quadratic -= 2 * coefficients[j] * sums.designData[j];
    for (let k = 0; k < width; k++) quadratic += coefficients[j] * sums.designCross[j * width + k] * coefficients[k];
  }
  return -0.5 * (sums.size * logTwoPi + sums.sumLogVariance + Math.max(0, quadratic));
}

/**
 * Profile log-likelihood with design coefficient `index` held at `value` and
 * the others profiled out by GLS. Works on the cross-products only: replaces
 * w by w - value W_index and drops column `index`.
 */
export function profileWithFixedCoefficient(sums: WhitenedSums, index: number, value: number): number {
  const width = sums.width;
  const reducedWidth = width - 1;
  const reduced = {
    size: sums.size,
    width: reducedWidth,
    sumLogVariance: sums.sumLogVariance,
    designCross: new Float64Array(reducedWidth * reducedWidth),
    designData: new Float64Array(reducedWidth),
    dataCross: sums.dataCross - 2 * value * sums.designData[index] + value * value * sums.designCross[index * width + index],
    singular: sums.singular,
  };
  let row = 0;
  for (let j = 0; j < width; j++) {
    if (j === index) continue;
    reduced.designData[row] = sums.designData[j] - value * sums.designCross[j * width + index];
    let column = 0;
    for (let k = 0; k < width; k++) {
      if (k === index) continue;
      reduced.designCross[row * reducedWidth + column] = sums.designCross[j * width + k];
      column += 1;
    }
    row += 1;
  }
  return profileOut(reduced).logLik;
}
