import type { Lineage } from '../lineage.js';
import { defaultMinimumSegment, varianceScale, type Configuration, type ConfigurationOptions } from './model.js';

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

/** The minimum segment length asked for, validated (an integer >= 1). */
export function minimumSegmentOf(options: ConfigurationOptions, floor = 1): number {
  const value = options.minimumSegment ?? defaultMinimumSegment;
  if (!Number.isInteger(value) || value < 1) throw new RangeError(`minimum segment length must be a whole number >= 1, got ${value}`);
  return Math.max(floor, value);
}

/** Segment (0-based) of horizon `index` given increasing shift indices. */
export function segmentOfIndex(index: number, shifts: ArrayLike<number>): number {
  let segment = 0;
  while (segment < shifts.length && index >= shifts[segment]) segment += 1;
  return segment;
}

/** Segment (0-based) of elapsed time `t` given the elapsed times at which new segments start. */
export function segmentOfTime(t: number, shiftTimes: readonly number[]): number {
  let segment = 0;
  while (segment < shiftTimes.length && t >= shiftTimes[segment]) segment += 1;
  return segment;
}

/**
 * The shift indices stored at the end of a process vector (after the
 * `searched` continuous values), rounded to whole horizons.
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
 */
export function shiftEstimates(lineage: Lineage, shifts: readonly number[]): Record<string, number> {
  const record: Record<string, number> = {};
  shifts.forEach((shift, k) => {
    record[`shift_${k + 1}_time`] = lineage.time[shift];
    record[`shift_${k + 1}_previous_time`] = lineage.time[shift - 1];
  });
  return record;
}

/** Shift times from parameters (see {@link shiftEstimates}). */
export function shiftTimesOf(parameters: Record<string, number>, count: number): number[] {
  return Array.from({ length: count }, (_, k) => parameters[`shift_${k + 1}_time`]);
}

/** Previous-horizon times of the shifts from parameters (see {@link shiftEstimates}). */
export function shiftPreviousTimesOf(parameters: Record<string, number>, count: number): number[] {
  return Array.from({ length: count }, (_, k) => parameters[`shift_${k + 1}_previous_time`]);
}

/**
 * Shift indices of a design lineage from shift times: the first horizon at or
 * after each shift time (so a fit's own lineage gets its own indices back).
 */
export function shiftIndicesFrom(parameters: Record<string, number>, count: number, lineage: Lineage): number[] {
  return shiftTimesOf(parameters, count).map((shiftTime) => {
    const time = lineage.time;
    const tolerance = 1e-12 * Math.max(1, Math.abs(time[time.length - 1]));
    for (let i = 0; i < time.length; i++) if (time[i] >= shiftTime - tolerance) return i;
    return time.length;
  });
}

/**
 * Grid of stasis variances for the closed-form screen: 0, then log-spaced
 * from 1e-5 to 2 times the lineage's variance scale (no segment's ML
 * variance can exceed the spread of all the means by much).
 */
function screenGrid(lineage: Lineage, points: number): Float64Array {
  const scale = varianceScale(lineage);
  const grid = new Float64Array(points + 1);
  const low = Math.log(1e-5 * scale);
  const high = Math.log(2 * scale);
  for (let g = 0; g < points; g++) grid[g + 1] = Math.exp(low + ((high - low) * g) / (points - 1));
  return grid;
}

/**
 * Prefix sums, at each grid variance w, of 1/(w + e_i), x_i/(w + e_i),
 * x_i^2/(w + e_i) and ln(w + e_i) over the (centred) means: with them the
 * GLS residual and log-determinant of a stasis segment [a, b) are O(1):
 * RSS = S2 - S1^2 / S0, because a stasis segment's covariance is diagonal.
 */
export class StasisPrefixSums {
  readonly grid: Float64Array;
  readonly size: number;
  /** Per grid point, (size + 1) entries each; NaN rows where w + e_i = 0 for some i. */
  readonly weight: Float64Array;
  readonly first: Float64Array;
  readonly second: Float64Array;
  readonly logVariance: Float64Array;
  /** False at grid points where some horizon has w + e_i = 0 (the density does not exist there). */
  readonly usable: boolean[];

  constructor(lineage: Lineage, points = 240) {
    const size = lineage.mean.length;
    this.size = size;
    this.grid = screenGrid(lineage, points);
    const stride = size + 1;
    const count = this.grid.length;
    this.weight = new Float64Array(count * stride);
    this.first = new Float64Array(count * stride);
    this.second = new Float64Array(count * stride);
    this.logVariance = new Float64Array(count * stride);
    this.usable = [];
    let centre = 0;
    for (let i = 0; i < size; i++) centre += lineage.mean[i];
    centre /= size;
    for (let g = 0; g < count; g++) {
      let usable = true;
      const base = g * stride;
      for (let i = 0; i < size; i++) {
        const variance = this.grid[g] + lineage.samplingVariance[i];
        if (!(variance > 0)) usable = false;
        const w = 1 / variance;
        const x = lineage.mean[i] - centre;
        this.weight[base + i + 1] = this.weight[base + i] + w;
        this.first[base + i + 1] = this.first[base + i] + w * x;
        this.second[base + i + 1] = this.second[base + i] + w * x * x;
        this.logVariance[base + i + 1] = this.logVariance[base + i] + Math.log(variance);
      }
      this.usable.push(usable);
    }
  }

  /** GLS residual sum of squares of the stasis segment [start, end) at grid point g. */
  residual(g: number, start: number, end: number): number {
    const base = g * (this.size + 1);
    const weight = this.weight[base + end] - this.weight[base + start];
    const first = this.first[base + end] - this.first[base + start];
    const second = this.second[base + end] - this.second[base + start];
    return Math.max(0, second - (first * first) / weight);
  }

  /** ln det of the segment [start, end) at grid point g. */
  logDeterminant(g: number, start: number, end: number): number {
    const base = g * (this.size + 1);
    return this.logVariance[base + end] - this.logVariance[base + start];
  }
}

const logTwoPi = Math.log(2 * Math.PI);

/**
 * Screen of a shared-variance punctuated model: for each configuration the
 * maximum over the variance grid of the exact profile logL (segment means by
 * GLS). O(grid × segments) per configuration after O(grid × N) set-up.
 */
export function screenSharedVariance(lineage: Lineage, configurations: readonly Configuration[]): Float64Array {
  const sums = new StasisPrefixSums(lineage);
  const size = lineage.mean.length;
  const scores = new Float64Array(configurations.length).fill(Number.NEGATIVE_INFINITY);
  const totalLogDet = Array.from(sums.grid, (_, g) => sums.logDeterminant(g, 0, size));
  configurations.forEach((configuration, c) => {
    const bounds = [0, ...configuration.shifts, size];
    let best = Number.NEGATIVE_INFINITY;
    for (let g = 0; g < sums.grid.length; g++) {
      if (!sums.usable[g]) continue;
      let residual = 0;
      for (let k = 0; k + 1 < bounds.length; k++) residual += sums.residual(g, bounds[k], bounds[k + 1]);
      const value = -0.5 * (size * logTwoPi + totalLogDet[g] + residual);
      if (value > best) best = value;
    }
    scores[c] = best;
  });
  return scores;
}

/**
 * Screen of a separate-variance punctuated model: each segment [a, b) is
 * maximised over the variance grid on its own (the likelihood is a sum over
 * segments), cached by (a, b); a configuration scores the sum.
 */
export function screenSeparateVariances(lineage: Lineage, configurations: readonly Configuration[]): Float64Array {
  const sums = new StasisPrefixSums(lineage);
  const size = lineage.mean.length;
  const stride = size + 1;
  const cache = new Float64Array(stride * stride).fill(Number.NaN);
  const segmentBest = (start: number, end: number): number => {
    const key = start * stride + end;
    const cached = cache[key];
    if (!Number.isNaN(cached)) return cached;
    let best = Number.NEGATIVE_INFINITY;
    for (let g = 0; g < sums.grid.length; g++) {
      const logDet = sums.logDeterminant(g, start, end);
      if (!Number.isFinite(logDet)) continue;
      const value = -0.5 * ((end - start) * logTwoPi + logDet + sums.residual(g, start, end));
      if (value > best) best = value;
    }
    cache[key] = best;
    return best;
  };
  return Float64Array.from(configurations, (configuration) => {
    const bounds = [0, ...configuration.shifts, size];
    let total = 0;
    for (let k = 0; k + 1 < bounds.length; k++) total += segmentBest(bounds[k], bounds[k + 1]);
    return total;
  });
}
