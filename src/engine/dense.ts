import { CholeskyDecomposition, Matrix } from 'ml-matrix';

/**
 * Dense multivariate-normal log-density, the O(N^3) reference the filter is
 * tested against: -0.5 (N ln 2 pi + ln det V + r' V^-1 r), V = covariance +
 * diag(samplingVariance), r = x - mean, via the Cholesky factor of V
 * (ml-matrix). Returns -Infinity when V is not positive definite.
 *
 * @example
 * denseLogLik([0], [[1]], [0], [0]); // -0.9189385332046727 (= -0.5 ln 2 pi)
 */
export function denseLogLik(
  mean: ArrayLike<number>,
  covariance: readonly (readonly number[])[],
  samplingVariance: ArrayLike<number>,
  data: ArrayLike<number>,
): number {
  const size = data.length;
  const matrix = new Matrix(size, size);
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < size; j++) matrix.set(i, j, covariance[i][j] + (i === j ? samplingVariance[i] : 0));
  }
  const cholesky = new CholeskyDecomposition(matrix);
  if (!cholesky.isPositiveDefinite()) return Number.NEGATIVE_INFINITY;
  const lower = cholesky.lowerTriangularMatrix;
  let logDet = 0;
  for (let i = 0; i < size; i++) logDet += 2 * Math.log(lower.get(i, i));
  const residual = Matrix.columnVector(Array.from({ length: size }, (_, i) => data[i] - mean[i]));
  const solved = cholesky.solve(residual);
  let quadratic = 0;
  for (let i = 0; i < size; i++) quadratic += residual.get(i, 0) * solved.get(i, 0);
  return -0.5 * (size * Math.log(2 * Math.PI) + logDet + quadratic);
}
