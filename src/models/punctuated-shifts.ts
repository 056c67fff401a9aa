import type { Lineage } from '../lineage.js';
import { defaultMinimumSegment, varianceScale, type Configuration, type ConfigurationOptions, type MethodsNote } from './model.js';

/** The report's methods sentence of every model with shifts (once for all of them). */
export const shiftMethodsNote: MethodsNote = {
  key: 'shifts',
  sentence: (options) => {
    const segment = options.min_segment;
    return `For the models with shifts, every admissible shift position was tried (exhaustive search${typeof segment === 'number' ? `, at least ${segment} horizons per segment` : ''}), and each shift position counts as one parameter in K.`;
  },
};

/**
 * Every admissible placement of `count` shifts in a sequence of `size`
 * horizons: shift s_k is the 0-based index of the first horizon of segment
 * k + 1, and every segment has at least `minimumSegment` horizons, so
 * s_1 >= L, s_{k+1} - s_k >= L and size - s_last >= L. Listed in
 * lexicographic order. Exhaustive: nothing is skipped.
 *
 * @example
 * shiftPlacements(6, 1, 2).map((c) => c.shifts[0]); // [2, 3, 4]
 */
export function shiftPlacements(size: number, count: number, minimumSegment: number): Configuration[] {
  const placements: Configuration[] = [];
  const chosen: number[] = [];
  const place = (level: number, first: number): void => {
    if (level === count) {
      if (size - (chosen[count - 1] ?? 0) >= minimumSegment) placements.push({ shifts: [...chosen] });
      return;
    }
    const remaining = count - level;
    for (let shift = first; size - shift >= remaining * minimumSegment; shift++) {
      chosen[level] = shift;
      place(level + 1, shift + minimumSegment);
    }
  };
  if (count > 0 && size >= (count + 1) * minimumSegment) place(0, minimumSegment);
  return placements;
}

/**
 * The minimum segment length asked for, validated (an integer >= 1).
 *
 * @example
 * minimumSegmentOf({}); // 5 (the default)
 * minimumSegmentOf({ minimumSegment: 2 }, 3); // 3 (raised to the floor)
 * minimumSegmentOf({ minimumSegment: 0 });
 * // throws: minimum segment length must be a whole number >= 1, got 0
 */
export function minimumSegmentOf(options: ConfigurationOptions, floor = 1): number {
  const value = options.minimumSegment ?? defaultMinimumSegment;
  if (!Number.isInteger(value) || value < 1) throw new RangeError(`minimum segment length must be a whole number >= 1, got ${value}`);
  return Math.max(floor, value);
}

/**
 * Segment (0-based) of horizon `index` given increasing shift indices.
 *
 * @example
 * segmentOfIndex(2, [3, 6]); // 0
 * segmentOfIndex(3, [3, 6]); // 1 (a shift index is the first horizon of the new segment)
 * segmentOfIndex(7, [3, 6]); // 2
 */
export function segmentOfIndex(index: number, shifts: ArrayLike<number>): number {
  let segment = 0;
  while (segment < shifts.length && index >= shifts[segment]) segment += 1;
  return segment;
}

/**
 * Segment (0-based) of elapsed time `t` given the elapsed times at which new segments start.
 *
 * @example
 * segmentOfTime(1.5, [2, 4]); // 0
 * segmentOfTime(2, [2, 4]); // 1
 */
export function segmentOfTime(t: number, shiftTimes: readonly number[]): number {
  let segment = 0;
  while (segment < shiftTimes.length && t >= shiftTimes[segment]) segment += 1;
  return segment;
}

/**
 * The shift indices stored at the end of a process vector (after the
 * `searched` continuous values), rounded to whole horizons.
 *
 * @example
 * shiftsOf([0.3, 1.2, 4.0000001], 2, 1); // [4] (after the two searched values, rounded)
 */
export function shiftsOf(process: ArrayLike<number>, searched: number, count: number): number[] {
  const shifts: number[] = [];
  for (let k = 0; k < count; k++) shifts.push(Math.round(process[searched + k]));
  return shifts;
}

/**
 * Shift parameters kept with the estimates so that simulation and figures
 * can rebuild the model from parameters alone: `shift_K_time` (elapsed time
 * of the first horizon of segment K + 1) and `shift_K_previous_time` (elapsed
 * time of the last horizon before it), K = 1, 2, ...
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1.5, 3, 4.5], mean: [0, 0, 1, 1], samplingVariance: [0.1, 0.1, 0.1, 0.1] });
 * shiftEstimates(lineage, [2]); // { shift_1_time: 3, shift_1_previous_time: 1.5 }
 */
export function shiftEstimates(lineage: Lineage, shifts: readonly number[]): Record<string, number> {
  const record: Record<string, number> = {};
  shifts.forEach((shift, k) => {
    record[`shift_${k + 1}_time`] = lineage.time[shift];
    record[`shift_${k + 1}_previous_time`] = lineage.time[shift - 1];
  });
  return record;
}

/**
 * Shift times from parameters (see {@link shiftEstimates}).
 *
 * @example
 * shiftTimesOf({ shift_1_time: 3, shift_1_previous_time: 1.5, shift_2_time: 6 }, 2); // [3, 6]
 */
export function shiftTimesOf(parameters: Record<string, number>, count: number): number[] {
  return Array.from({ length: count }, (_, k) => parameters[`shift_${k + 1}_time`]);
}

/**
 * Previous-horizon times of the shifts from parameters (see {@link shiftEstimates}).
 *
 * @example
 * shiftPreviousTimesOf({ shift_1_time: 3, shift_1_previous_time: 1.5 }, 1); // [1.5]
 */
export function shiftPreviousTimesOf(parameters: Record<string, number>, count: number): number[] {
  return Array.from({ length: count }, (_, k) => parameters[`shift_${k + 1}_previous_time`]);
}

/**
 * Shift indices of a design lineage from shift times: the first horizon at or
 * after each shift time (so a fit's own lineage gets its own indices back).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4], mean: [0, 0, 0, 1, 1], samplingVariance: Array(5).fill(0.1) });
 * shiftIndicesFrom({ shift_1_time: 2.5 }, 1, lineage); // [3] (the first horizon at or after 2.5)
 * shiftIndicesFrom({ shift_1_time: 9 }, 1, lineage); // [5] (none: past the last horizon)
 */
export function shiftIndicesFrom(parameters: Record<string, number>, count: number, lineage: Lineage): number[] {
  return shiftTimesOf(parameters, count).map((shiftTime) => {
    const time = lineage.time;
    const tolerance = 1e-12 * Math.max(1, Math.abs(time[time.length - 1]));
    for (let i = 0; i < time.length; i++) if (time[i] >= shiftTime - tolerance) return i;
    return time.length;
  });
}

/** Log-spaced variances of the coarse grid of the closed-form bounds (besides 0). */
export const boundGridPoints = 360;
/** Each coarse cell is cut into this many cells where the bound needs it. */
export const boundSubdivision = 8;

/**
 * Grid of stasis variances for the closed-form bounds: 0, then log-spaced
 * from 1e-5 to 1e4 times the lineage's variance scale (beyond the top of
 * the stasis variance's search range, 1e3 times, so that the bound of the
 * cell above the grid is far below any maximum), fine enough that
 * every {@link boundSubdivision}-th point is a point of the coarse grid.
 */
function boundGrid(lineage: Lineage, points: number): Float64Array {
  const scale = varianceScale(lineage);
  const fine = (points - 1) * boundSubdivision + 1;
  const grid = new Float64Array(fine + 1);
  const low = Math.log(1e-5 * scale);
  const high = Math.log(1e4 * scale);
  for (let g = 0; g < fine; g++) grid[g + 1] = Math.exp(low + ((high - low) * g) / (fine - 1));
  return grid;
}

/**
 * Prefix sums, at each grid variance w, of 1/(w + e_i), x_i/(w + e_i),
 * x_i^2/(w + e_i) and ln(w + e_i) over the (centred) means: with them the
 * GLS residual and log-determinant of a stasis segment [a, b) are O(1):
 * RSS = S2 - S1^2 / S0, because a stasis segment's covariance is diagonal.
 * Rows are made when first asked for (most fine grid points never are).
 *
 * @example
 * // At the grid's first variance, 0, a segment's RSS is sum (x - mean)^2 / e over it: means 0, 2 with e = 1 give 2 (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 2, 5, 5], samplingVariance: [1, 1, 1, 1] });
 * const sums = new StasisPrefixSums(lineage);
 * sums.grid[0]; // 0
 * sums.residual(0, 0, 2); // 2 (to 1e-12)
 * sums.logDeterminant(0, 0, 4); // 0 (to 1e-12; ln of four unit variances)
 */
export class StasisPrefixSums {
  /** 0, then the fine log-spaced grid; `coarse` lists the indices of the coarse grid's points in it. */
  readonly grid: Float64Array;
  readonly coarse: readonly number[];
  readonly size: number;
  private readonly lineage: Lineage;
  private readonly centre: number;
  /** Per grid point: weight, first, second, ln-variance prefix sums, (size + 1) entries each. */
  private readonly rows: Array<Float64Array | null>;
  /** 1 where w + e_i > 0 for every horizon, 0 where not (the density does not exist there), -1 not yet known. */
  private readonly usableAt: Int8Array;

  constructor(lineage: Lineage, points = boundGridPoints) {
    this.lineage = lineage;
    this.size = lineage.mean.length;
    this.grid = boundGrid(lineage, points);
    this.coarse = [0, ...Array.from({ length: points }, (_, g) => 1 + g * boundSubdivision)];
    this.rows = new Array<Float64Array | null>(this.grid.length).fill(null);
    this.usableAt = new Int8Array(this.grid.length).fill(-1);
    let centre = 0;
    for (let i = 0; i < this.size; i++) centre += lineage.mean[i];
    this.centre = centre / this.size;
  }

  private row(g: number): Float64Array {
    const kept = this.rows[g];
    if (kept) return kept;
    const size = this.size;
    const stride = size + 1;
    const row = new Float64Array(4 * stride);
    let usable = 1;
    for (let i = 0; i < size; i++) {
      const variance = this.grid[g] + this.lineage.samplingVariance[i];
      if (!(variance > 0)) usable = 0;
      const w = 1 / variance;
      const x = this.lineage.mean[i] - this.centre;
      row[i + 1] = row[i] + w;
      row[stride + i + 1] = row[stride + i] + w * x;
      row[2 * stride + i + 1] = row[2 * stride + i] + w * x * x;
      row[3 * stride + i + 1] = row[3 * stride + i] + Math.log(variance);
    }
    this.rows[g] = row;
    this.usableAt[g] = usable;
    return row;
  }

  /** False at grid points where some horizon has w + e_i = 0. */
  usable(g: number): boolean {
    if (this.usableAt[g] < 0) this.row(g);
    return this.usableAt[g] === 1;
  }

  /** GLS residual sum of squares of the stasis segment [start, end) at grid point g. */
  residual(g: number, start: number, end: number): number {
    const row = this.row(g);
    const stride = this.size + 1;
    const weight = row[end] - row[start];
    const first = row[stride + end] - row[stride + start];
    const second = row[2 * stride + end] - row[2 * stride + start];
    return Math.max(0, second - (first * first) / weight);
  }

  /** ln det of the segment [start, end) at grid point g. */
  logDeterminant(g: number, start: number, end: number): number {
    const row = this.row(g);
    const stride = this.size + 1;
    return row[3 * stride + end] - row[3 * stride + start];
  }
}

const logTwoPi = Math.log(2 * Math.PI);

/**
 * Upper bound of the profile logL of stasis segments over every variance
 * w >= 0 between two grid points (issue 25: a bound, not an approximation,
 * so that no configuration whose maximum could beat the best full fit is
 * left out). On a cell [w_g, w_g+1] of the grid, ln det V = sum ln(w + e_i)
 * is increasing in w and the GLS residual RSS(w) = min over the means of
 * sum (x_i - mu_i)^2 / (w + e_i) is non-increasing (a minimum of
 * non-increasing functions), so logL(w) <= -1/2 (N ln 2 pi + ln det V(w_g) +
 * RSS(w_g+1)); above the last grid point RSS >= 0 bounds it. The maximum over
 * the cells bounds the maximum over w, hence over the search range. Cells
 * that could hold the maximum are cut {@link boundSubdivision} times finer.
 *
 * @param logDeterminant ln det V of the segments at grid point g
 * @param residual their GLS residual at grid point g
 */
function cellBound(sums: StasisPrefixSums, size: number, logDeterminant: (g: number) => number, residual: (g: number) => number): number {
  const constant = size * logTwoPi;
  const coarse = sums.coarse;
  // The exact profile at the coarse points is a lower bound of the maximum: a cell whose bound is below it cannot
  // hold the maximum, so only the other cells are cut into finer cells (a tighter bound at little cost).
  let lower = Number.NEGATIVE_INFINITY;
  for (const g of coarse) {
    const logDet = logDeterminant(g);
    // A grid point where some w + e_i = 0: the density is unbounded near it, so no finite bound.
    if (!sums.usable(g) || !(logDet > Number.NEGATIVE_INFINITY)) return Number.POSITIVE_INFINITY;
    const value = -0.5 * (constant + logDet + residual(g));
    if (value > lower) lower = value;
  }
  let bound = lower;
  for (let k = 0; k < coarse.length; k++) {
    const from = coarse[k];
    const to = k + 1 < coarse.length ? coarse[k + 1] : null;
    const cell = -0.5 * (constant + logDeterminant(from) + (to === null ? 0 : residual(to)));
    if (Number.isNaN(cell)) return Number.POSITIVE_INFINITY;
    if (!(cell >= lower)) continue;
    if (to === null || to - from === 1) {
      bound = Math.max(bound, cell);
      continue;
    }
    for (let g = from; g < to; g++) {
      const fine = -0.5 * (constant + logDeterminant(g) + residual(g + 1));
      bound = Number.isNaN(fine) ? Number.POSITIVE_INFINITY : Math.max(bound, fine);
    }
  }
  return Number.isNaN(bound) ? Number.POSITIVE_INFINITY : bound;
}

/**
 * Upper bound of the maximised logL of a shared-variance punctuated model at
 * each configuration (see {@link cellBound}): segment means by GLS, the one
 * variance anywhere in [0, infinity). O(grid × segments) per configuration
 * after O(grid × N) set-up.
 *
 * @example
 * // The bound is never below the fitted maximum (a bound on logL over every variance).
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 0.1, -0.1, 0, 2, 2.1, 1.9, 2], samplingVariance: Array(8).fill(0.01) });
 * const [bound] = boundSharedVariance(lineage, [{ shifts: [4] }]);
 * const fit = fitAtConfiguration(punctuatedOne, lineage, { shifts: [4] }, { intervals: false }, fitModel);
 * bound >= fit.logLik; // true
 */
export function boundSharedVariance(lineage: Lineage, configurations: readonly Configuration[]): Float64Array {
  const sums = new StasisPrefixSums(lineage);
  const size = lineage.mean.length;
  return Float64Array.from(configurations, (configuration) => {
    const bounds = [0, ...configuration.shifts, size];
    const residual = (g: number): number => {
      let total = 0;
      for (let k = 0; k + 1 < bounds.length; k++) total += sums.residual(g, bounds[k], bounds[k + 1]);
      return total;
    };
    return cellBound(sums, size, (g) => sums.logDeterminant(g, 0, size), residual);
  });
}

/**
 * Upper bound of the maximised logL of a separate-variance punctuated model
 * at each configuration: the likelihood is a sum over segments, each bounded
 * on its own by {@link cellBound} (cached by segment), so the sum bounds it.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 0.1, -0.1, 0, 2, 2.1, 1.9, 2], samplingVariance: Array(8).fill(0.01) });
 * const [bound] = boundSeparateVariances(lineage, [{ shifts: [4] }]);
 * const fit = fitAtConfiguration(punctuatedOneSeparate, lineage, { shifts: [4] }, { intervals: false }, fitModel);
 * bound >= fit.logLik; // true
 */
export function boundSeparateVariances(lineage: Lineage, configurations: readonly Configuration[]): Float64Array {
  const sums = new StasisPrefixSums(lineage);
  const size = lineage.mean.length;
  const stride = size + 1;
  const cache = new Float64Array(stride * stride).fill(Number.NaN);
  const segmentBound = (start: number, end: number): number => {
    const key = start * stride + end;
    if (Number.isNaN(cache[key])) {
      cache[key] = cellBound(sums, end - start, (g) => sums.logDeterminant(g, start, end), (g) => sums.residual(g, start, end));
    }
    return cache[key];
  };
  return Float64Array.from(configurations, (configuration) => {
    const bounds = [0, ...configuration.shifts, size];
    let total = 0;
    for (let k = 0; k + 1 < bounds.length; k++) total += segmentBound(bounds[k], bounds[k + 1]);
    return total;
  });
}
