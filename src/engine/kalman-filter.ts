import type { StateSpace } from './state-space.js';

/**
 * Sufficient statistics of one filter pass over the data and every design
 * column. The whitened (standardised-innovation) data w = L^-1 y and design
 * W = L^-1 X enter GLS only through the QR factor of [W w], accumulated row
 * by row with Givens rotations: W = Q R, z = Q'w, residual = ||w - W beta_gls||^2.
 * Unlike the cross-products W'W, this never squares the condition number,
 * so a horizon with a tiny sampling variance (a huge whitened row) costs no
 * precision. ln det V is the sum of the log innovation variances (L is the
 * Cholesky factor of V = C + E).
 *
 * Golub, G. H. & Van Loan, C. F. (2013). Matrix Computations, 4th ed.,
 * section 5.1.8 (Givens rotations) and 5.3 (least squares by QR).
 */
export interface WhitenedSums {
  readonly size: number;
  readonly width: number;
  /** sum_i ln F_i = ln det V. */
  sumLogVariance: number;
  /** R, upper triangular, row-major width × width (entries below the diagonal are 0). */
  readonly triangle: Float64Array;
  /** z = Q'w (first `width` components). */
  readonly projected: Float64Array;
  /** ||w||^2 - ||z||^2 accumulated without cancellation: the GLS residual sum of squares. */
  residual: number;
  /** True when some innovation variance was 0 (V singular): the density does not exist. */
  singular: boolean;
}

/**
 * Allocate reusable sums for a given width.
 *
 * @example
 * allocateSums(5, 2).triangle.length; // 4 (R is width × width)
 */
export function allocateSums(size: number, width: number): WhitenedSums {
  return {
    size,
    width,
    sumLogVariance: 0,
    triangle: new Float64Array(width * width),
    projected: new Float64Array(width),
    residual: 0,
    singular: false,
  };
}

/**
 * Fold one whitened row [row[0..width-1] | row[width]] into the QR factor by
 * Givens rotations; `row` is overwritten.
 * @example
 * const sums = allocateSums(2, 1);
 * foldRow(sums, Float64Array.of(3, 4), 0); foldRow(sums, Float64Array.of(4, 3), 0);
 * sums.triangle[0]; // 5 (to 1e-12; sqrt(3^2 + 4^2))
 * sums.residual; // 1.96 (to 1e-12; least squares of 4, 3 on 3, 4: 25 - 24^2 / 25)
 */
export function foldRow(sums: WhitenedSums, row: Float64Array, offset: number): void {
  const width = sums.width;
  const triangle = sums.triangle;
  const projected = sums.projected;
  for (let k = 0; k < width; k++) {
    const b = row[offset + k];
    if (b === 0) continue;
    const a = triangle[k * width + k];
    const radius = Math.sqrt(a * a + b * b);
    const cosine = a / radius;
    const sine = b / radius;
    triangle[k * width + k] = radius;
    for (let l = k + 1; l < width; l++) {
      const upper = triangle[k * width + l];
      const lower = row[offset + l];
      triangle[k * width + l] = cosine * upper + sine * lower;
      row[offset + l] = cosine * lower - sine * upper;
    }
    const upperData = projected[k];
    const lowerData = row[offset + width];
    projected[k] = cosine * upperData + sine * lowerData;
    row[offset + width] = cosine * lowerData - sine * upperData;
  }
  const left = row[offset + width];
  sums.residual += left * left;
}

/**
 * Mean-free Kalman filter over the data and every column of the design at
 * once (the augmented filter of de Jong 1991): all columns share the
 * innovation variances and gains, so one O(N p^2) pass yields ln det V and
 * the QR factor of the whitened design and data, from which the exact GLS
 * estimate and profile likelihood follow. No allocation in the loop:
 * `work` must hold at least {@link workSize}(width) numbers.
 *
 * de Jong, P. (1991). The diffuse Kalman filter. Annals of Statistics 19:1073-1083.
 *
 * @param space the model's state space at given process parameters
 * @param data the observations x (length N)
 * @param sums output, overwritten
 * @param work scratch of length >= workSize(width)
 * @example
 * const space = allocateStateSpace(2, 1, Float64Array.of(1, 1)); space.design.fill(1);
 * const sums = whiten(space, Float64Array.of(1, 3), allocateSums(2, 1), new Float64Array(workSize(1)));
 * sums.sumLogVariance; // 0 (no process variance, unit sampling variances: V = I)
 * sums.residual; // 2 (to 1e-12; squares about the mean 2)
 */
export function whiten(space: StateSpace, data: Float64Array, sums: WhitenedSums, work: Float64Array): WhitenedSums {
  return whitenRows(space, data, sums, work, 0, null, false);
}

/**
 * The loop of {@link whiten}, able to stop after row `split - 1` to keep its
 * state in `state` (when `resume` is false), or to start at row `split` from
 * a kept state (`resume`): for shift models whose rows before the shift
 * depend only on the first process values (`fit/prefix-filter.ts`). With
 * `state` null it is `whiten`. The kept state: the filtered latent
 * deviations of the data and of every design column, the filtered variance,
 * the running ln det (sum of logs and the pending product), the singular
 * flag and the QR factor so far (residual, R, z); its length is
 * 2 (width + 1) + 4 + width^2.
 *
 * @example
 * const space = allocateStateSpace(3, 1, Float64Array.of(1, 1, 1)); space.design.fill(1);
 * const data = Float64Array.of(1, 3, 2);
 * const state = new Float64Array(2 * 2 + 4 + 1);
 * const first = whitenRows(space, data, allocateSums(3, 1), new Float64Array(workSize(1)), 2, state, false).residual;
 * const resumed = whitenRows(space, data, allocateSums(3, 1), new Float64Array(workSize(1)), 2, state, true).residual;
 * first; // 2 (to 1e-12; squares about the mean 2)
 * resumed === first; // true (the second pass resumed after two rows, the same sums bit for bit)
 */
export function whitenRows(space: StateSpace, data: Float64Array, sums: WhitenedSums, work: Float64Array, split: number, state: Float64Array | null, resume: boolean): WhitenedSums {
  const { size, width, transition, processVariance, observationVariance, design } = space;
  const triangle = sums.triangle;
  const projected = sums.projected;
  const rowOffset = width + 1;
  // ln det V: innovation variances are multiplied together and the logarithm
  // taken only when the product leaves [1e-200, 1e200] (one log per many
  // horizons instead of one per horizon; a factor outside [1e-100, 1e100] is
  // logged on its own, so the product can never overflow or underflow).
  let sumLogVariance = 0;
  let product = 1;
  let singular = false;
  // work[0] is the filtered latent deviation of the data, work[1 + j] that of
  // column j; work[width + 1 ..] holds this row's whitened values for foldRow.
  let filteredVariance = 0;
  let start = 0;
  if (resume && state !== null) {
    let at = 0;
    for (let j = 0; j <= width; j++) work[j] = state[at++];
    filteredVariance = state[at++];
    sumLogVariance = state[at++];
    product = state[at++];
    singular = state[at++] === 1;
    sums.residual = state[at++];
    for (let j = 0; j < triangle.length; j++) triangle[j] = state[at++];
    for (let j = 0; j < projected.length; j++) projected[j] = state[at++];
    start = split;
  } else {
    triangle.fill(0);
    projected.fill(0);
    sums.residual = 0;
    work.fill(0, 0, width + 1);
  }
  for (let i = start; i < size; i++) {
    if (i === split && state !== null && !resume) {
      let at = 0;
      for (let j = 0; j <= width; j++) state[at++] = work[j];
      state[at++] = filteredVariance;
      state[at++] = sumLogVariance;
      state[at++] = product;
      state[at++] = singular ? 1 : 0;
      state[at++] = sums.residual;
      for (let j = 0; j < triangle.length; j++) state[at++] = triangle[j];
      for (let j = 0; j < projected.length; j++) state[at++] = projected[j];
    }
    const phi = i === 0 ? 0 : transition[i];
    const predictedVariance = phi * phi * filteredVariance + processVariance[i];
    const innovationVariance = predictedVariance + observationVariance[i];
    if (!(innovationVariance > 0)) {
      singular = true;
      filteredVariance = 0;
      for (let j = 0; j <= width; j++) work[j] = 0;
      continue;
    }
    const gain = predictedVariance / innovationVariance;
    const scale = 1 / Math.sqrt(innovationVariance);
    if (innovationVariance > 1e-100 && innovationVariance < 1e100) {
      product *= innovationVariance;
      if (product < 1e-200 || product > 1e200) {
        sumLogVariance += Math.log(product);
        product = 1;
      }
    } else sumLogVariance += Math.log(innovationVariance);
    const predictedData = phi * work[0];
    const dataInnovation = data[i] - predictedData;
    work[0] = predictedData + gain * dataInnovation;
    work[rowOffset + width] = dataInnovation * scale;
    const row = i * width;
    for (let j = 0; j < width; j++) {
      const predicted = phi * work[1 + j];
      const innovation = design[row + j] - predicted;
      work[1 + j] = predicted + gain * innovation;
      work[rowOffset + j] = innovation * scale;
    }
    foldRow(sums, work, rowOffset);
    filteredVariance = (predictedVariance * observationVariance[i]) / innovationVariance;
  }
  sums.sumLogVariance = sumLogVariance + Math.log(product);
  sums.singular = singular;
  return sums;
}

/**
 * Scratch size {@link whiten} needs for a given design width.
 *
 * @example
 * workSize(3); // 8
 */
export function workSize(width: number): number {
  return 2 * width + 2;
}
