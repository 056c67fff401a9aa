import { foldRow, type WhitenedSums } from './kalman-filter.js';

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
 * Exact GLS in the whitened space from the QR factor: R beta = z, and the
 * profile log-likelihood -0.5 (N ln 2 pi + ln det V + residual).
 * Returns logLik = -Infinity when V is singular or X'V^-1X is not invertible.
 *
 * Aitken, A. C. (1935). On least squares and linear combination of
 * observations. Proc. Royal Society of Edinburgh 55:42-48.
 * @example
 * const space = allocateStateSpace(2, 1, Float64Array.of(1, 1)); space.design.fill(1);
 * const sums = whiten(space, Float64Array.of(1, 3), allocateSums(2, 1), new Float64Array(workSize(1)));
 * profileOut(sums).coefficients[0]; // 2 (to 1e-12; V = I: the ordinary mean)
 * profileOut(sums).logLik; // -2.8378770664093453 (to 1e-12; = -ln 2 pi - 1)
 */
export function profileOut(sums: WhitenedSums): ProfileResult {
  const width = sums.width;
  const coefficients = new Float64Array(width);
  const covariance = new Float64Array(width * width);
  const failed = { logLik: Number.NEGATIVE_INFINITY, coefficients, coefficientCovariance: covariance, logDetInformation: Number.NaN };
  if (sums.singular) return failed;
  const triangle = sums.triangle;
  let logDetInformation = 0;
  let largest = 0;
  for (let j = 0; j < width; j++) largest = Math.max(largest, Math.abs(triangle[j * width + j]));
  for (let j = 0; j < width; j++) {
    const diagonal = Math.abs(triangle[j * width + j]);
    if (!(diagonal > largest * 1e-14)) return failed;
    logDetInformation += 2 * Math.log(diagonal);
  }
  for (let i = width - 1; i >= 0; i--) {
    let value = sums.projected[i];
    for (let k = i + 1; k < width; k++) value -= triangle[i * width + k] * coefficients[k];
    coefficients[i] = value / triangle[i * width + i];
  }
  // (R'R)^-1 = R^-1 R^-T: invert R (upper triangular), then multiply.
  const inverse = new Float64Array(width * width);
  for (let column = 0; column < width; column++) {
    for (let i = column; i >= 0; i--) {
      let value = i === column ? 1 : 0;
      for (let k = i + 1; k <= column; k++) value -= triangle[i * width + k] * inverse[k * width + column];
      inverse[i * width + column] = value / triangle[i * width + i];
    }
  }
  for (let i = 0; i < width; i++) {
    for (let j = 0; j < width; j++) {
      let value = 0;
      for (let k = Math.max(i, j); k < width; k++) value += inverse[i * width + k] * inverse[j * width + k];
      covariance[i * width + j] = value;
    }
  }
  return {
    logLik: -0.5 * (sums.size * logTwoPi + sums.sumLogVariance + sums.residual),
    coefficients,
    coefficientCovariance: covariance,
    logDetInformation,
  };
}

/**
 * Log-likelihood at given design coefficients (no profiling):
 * -0.5 (N ln 2 pi + ln det V + ||R beta - z||^2 + residual).
 * @example
 * const space = allocateStateSpace(2, 1, Float64Array.of(1, 1)); space.design.fill(1);
 * const sums = whiten(space, Float64Array.of(1, 3), allocateSums(2, 1), new Float64Array(workSize(1)));
 * logLikAt(sums, [0]); // -6.837877066409345 (to 1e-12; = -ln 2 pi - (1 + 9) / 2)
 */
export function logLikAt(sums: WhitenedSums, coefficients: ArrayLike<number>): number {
  if (sums.singular) return Number.NEGATIVE_INFINITY;
  const width = sums.width;
  let quadratic = sums.residual;
  for (let i = 0; i < width; i++) {
    let value = -sums.projected[i];
    for (let k = i; k < width; k++) value += sums.triangle[i * width + k] * coefficients[k];
    quadratic += value * value;
  }
  return -0.5 * (sums.size * logTwoPi + sums.sumLogVariance + quadratic);
}

/**
 * GLS with design coefficient `index` held at `value`: the QR factor of the
 * reduced problem is rebuilt from the full factor R (its rows, column
 * `index` moved into the data), so its `logDetInformation` is
 * ln det(X_r' V^-1 X_r) without forming cross-products.
 * @example
 * const space = allocateStateSpace(2, 2, Float64Array.of(1, 1)); space.design.set([1, 0, 1, 1]);
 * const sums = whiten(space, Float64Array.of(1, 3), allocateSums(2, 2), new Float64Array(workSize(2)));
 * reducedProfile(sums, 1, 0).coefficients[0]; // 2 (to 1e-12; slope held at 0: the mean)
 * reducedProfile(sums, 1, 2).coefficients[0]; // 1 (to 1e-12; slope 2: mean of 1 - 0, 3 - 2)
 */
export function reducedProfile(sums: WhitenedSums, index: number, value: number): ProfileResult {
  const width = sums.width;
  const reducedWidth = width - 1;
  const reduced: WhitenedSums = {
    size: sums.size,
    width: reducedWidth,
    sumLogVariance: sums.sumLogVariance,
    triangle: new Float64Array(reducedWidth * reducedWidth),
    projected: new Float64Array(reducedWidth),
    residual: sums.residual,
    singular: sums.singular,
  };
  if (sums.singular) return profileOut(reduced);
  const row = new Float64Array(reducedWidth + 1);
  for (let i = 0; i < width; i++) {
    let column = 0;
    for (let k = 0; k < width; k++) {
      if (k === index) continue;
      row[column] = k >= i ? sums.triangle[i * width + k] : 0;
      column += 1;
    }
    row[reducedWidth] = sums.projected[i] - value * (index >= i ? sums.triangle[i * width + index] : 0);
    foldRow(reduced, row, 0);
  }
  return profileOut(reduced);
}

/**
 * Profile log-likelihood with design coefficient `index` held at `value` and
 * the others profiled out by GLS ({@link reducedProfile}).
 * @example
 * const space = allocateStateSpace(2, 1, Float64Array.of(1, 1)); space.design.fill(1);
 * const sums = whiten(space, Float64Array.of(1, 3), allocateSums(2, 1), new Float64Array(workSize(1)));
 * profileWithFixedCoefficient(sums, 0, 0); // -6.837877066409345 (to 1e-12; the one coefficient held: logLikAt(sums, [0]))
 */
export function profileWithFixedCoefficient(sums: WhitenedSums, index: number, value: number): number {
  return reducedProfile(sums, index, value).logLik;
}
