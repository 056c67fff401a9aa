import type { StateSpace } from './state-space.js';

/**
 * Sufficient statistics of one filter pass over the data and every design
 * column: the whitened (standardised-innovation) data w = L^-1 y and design
 * W = L^-1 X enter only through their cross-products, and ln det V is the sum
 * of the log innovation variances (L is the Cholesky factor of V = C + E).
 */
export interface WhitenedSums {
  readonly size: number;
  readonly width: number;
  /** sum_i ln F_i = ln det V. */
  sumLogVariance: number;
  /** W'W, row-major width × width. */
  readonly designCross: Float64Array;
  /** W'w. */
  readonly designData: Float64Array;
  /** w'w. */
  dataCross: number;
  /** True when some innovation variance was 0 (V singular): the density does not exist. */
  singular: boolean;
}

/** Allocate reusable sums for a given width. */
export function allocateSums(size: number, width: number): WhitenedSums {
  return {
    size,
    width,
    sumLogVariance: 0,
    designCross: new Float64Array(width * width),
    designData: new Float64Array(width),
    dataCross: 0,
    singular: false,
  };
}

/**
 * Mean-free Kalman filter over the data and every column of the design at
 * once (the augmented filter of de Jong 1991): all columns share the
 * innovation variances and gains, so one O(N p^2) pass yields ln det V and
 * the cross-products of the whitened data and design, from which the exact
 * GLS estimate and profile likelihood follow. No allocation in the loop:
 * `work` must hold at least {@link workSize}(width) numbers.
 *
 * de Jong, P. (1991). The diffuse Kalman filter. Annals of Statistics 19:1073-1083.
 *
 * @param space the model's state space at given process parameters
 * @param data the observations x (length N)
 * @param sums output, overwritten
 * @param work scratch of length >= workSize(width)
 */
export function whiten(space: StateSpace, data: Float64Array, sums: WhitenedSums, work: Float64Array): WhitenedSums {
  const { size, width, transition, processVariance, observationVariance, design } = space;
  const designCross = sums.designCross;
  const designData = sums.designData;
  designCross.fill(0);
  designData.fill(0);
  let sumLogVariance = 0;
  let dataCross = 0;
  let singular = false;
  // work[0] is the filtered latent deviation of the data; work[1 + j] that of column j.
  work.fill(0, 0, width + 1);
  let filteredVariance = 0;
  for (let i = 0; i < size; i++) {
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
    sumLogVariance += Math.log(innovationVariance);
    const predictedData = phi * work[0];
    const dataInnovation = data[i] - predictedData;
    work[0] = predictedData + gain * dataInnovation;
    const whitenedData = dataInnovation * scale;
    dataCross += whitenedData * whitenedData;
    const row = i * width;
    for (let j = 0; j < width; j++) {
      const predicted = phi * work[1 + j];
      const innovation = design[row + j] - predicted;
      work[1 + j] = predicted + gain * innovation;
      const whitened = innovation * scale;
      designData[j] += whitened * whitenedData;
      // Keep this row's whitened column values for the cross-products below.
      work[width + 1 + j] = whitened;
    }
    for (let j = 0; j < width; j++) {
      const wj = work[width + 1 + j];
      for (let k = 0; k <= j; k++) designCross[j * width + k] += wj * work[width + 1 + k];
    }
    filteredVariance = predictedVariance * observationVariance[i] / innovationVariance;
  }
  for (let j = 0; j < width; j++) for (let k = j + 1; k < width; k++) designCross[j * width + k] = designCross[k * width + j];
  sums.sumLogVariance = sumLogVariance;
  sums.dataCross = dataCross;
  sums.singular = singular;
  return sums;
}

/** Scratch size {@link whiten} needs for a given design width. */
export function workSize(width: number): number {
  return 2 * width + 1;
}
