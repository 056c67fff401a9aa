import { chiSquare1At95 } from '../fit/model-choice.js';
import { findRoot, nelderMead } from '../fit/optimise.js';
import { jointDesign, jointDynamics, locationsPerTrait, type JointModel } from './joint-models.js';
import { profileFromWhitened, whitenJoint, type JointData } from './vector-filter.js';

/**
 * 95% profile-likelihood intervals of the joint models: for each parameter,
 * the values whose profile logL (every other parameter re-maximised,
 * locations by exact GLS) is within chi^2_1(0.95) / 2 = 1.92 of the
 * maximum (Venzon & Moolgavkar 1988, Applied Statistics 37:87-94, the
 * profile-likelihood interval).
 *
 * The project's default interval method (integrated likelihood) is written
 * for one trait; here the plain profile serves every parameter.
 *
 * Profiling needs each quantity as a coordinate, so the covariance is
 * written as variances times a correlation matrix whose Cholesky factor is
 * built from canonical partial correlations (Lewandowski, Kurowicka & Joe
 * 2009, J. Multivariate Anal. 100:1989-2001): with the pair (j, l) put first,
 * their correlation is itself the first partial correlation, and every
 * value of the others in (-1, 1) gives a positive definite matrix.
 * Coordinates: ln variance (k), atanh of the partial correlations
 * (k(k-1)/2, correlated models), ln alpha (k, ou).
 */

/** Lower and upper end of one interval (null: not computed); `lowerAtBound` when the end is the bound 0 of a variance. */
export interface JointInterval {
  readonly lower: number | null;
  readonly upper: number | null;
}

/** Intervals in the layout of the estimates (arrays in trait order; null where there is none). */
export interface JointIntervals {
  readonly method: 'profile';
  readonly level: 0.95;
  readonly ancestral_mean: JointInterval[] | null;
  readonly drift: JointInterval[] | null;
  readonly stasis_mean: JointInterval[] | null;
  readonly optimum: JointInterval[] | null;
  readonly alpha: JointInterval[] | null;
  /** Diagonal: the variances; off-diagonal null (covariances are given by the variances and correlations). */
  readonly step_covariance: (JointInterval | null)[][] | null;
  readonly stasis_covariance: (JointInterval | null)[][] | null;
  /** Off-diagonal: the correlations; diagonal null. */
  readonly step_correlation: (JointInterval | null)[][] | null;
  /** The stasis models' correlations of the fluctuations about the stasis means, as `step_correlation`. */
  readonly stasis_correlation: (JointInterval | null)[][] | null;
}

const cutoff = chiSquare1At95 / 2;
const lowestLogVariance = -30;
const largestAtanh = 7; // tanh(7) = 0.9999983: a correlation this close to ±1 is reported as the bound

/** Correlation matrix (k × k) from canonical partial correlations in `ordering` (ordering[0], ordering[1] first). */
function correlationFrom(partials: readonly number[], k: number, ordering: readonly number[]): Float64Array {
  const lower = new Float64Array(k * k);
  let at = 0;
  const z = new Float64Array(k * k);
  for (let m = 0; m < k; m++) for (let i = m + 1; i < k; i++) z[m * k + i] = partials[at++];
  for (let i = 0; i < k; i++) {
    let remaining = 1;
    for (let m = 0; m < i; m++) {
      lower[i * k + m] = z[m * k + i] * Math.sqrt(remaining);
      remaining *= 1 - z[m * k + i] ** 2;
    }
    lower[i * k + i] = Math.sqrt(remaining);
  }
  const correlation = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      let sum = 0;
      for (let m = 0; m <= Math.min(i, j); m++) sum += lower[i * k + m] * lower[j * k + m];
      correlation[ordering[i] * k + ordering[j]] = sum;
    }
  }
  return correlation;
}

/** The partial correlations of a correlation matrix in `ordering` (inverse of {@link correlationFrom}). */
function partialsOf(correlation: Float64Array, k: number, ordering: readonly number[]): number[] {
  const permuted = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) permuted[i * k + j] = correlation[ordering[i] * k + ordering[j]];
  // Cholesky (lower) of the permuted matrix, ridged slightly when singular.
  const lower = new Float64Array(k * k);
  for (let j = 0; j < k; j++) {
    let diagonal = permuted[j * k + j];
    for (let p = 0; p < j; p++) diagonal -= lower[j * k + p] ** 2;
    lower[j * k + j] = Math.sqrt(Math.max(diagonal, 1e-24));
    for (let i = j + 1; i < k; i++) {
      let sum = permuted[i * k + j];
      for (let p = 0; p < j; p++) sum -= lower[i * k + p] * lower[j * k + p];
      lower[i * k + j] = sum / lower[j * k + j];
    }
  }
  const partials: number[] = [];
  const z = new Float64Array(k * k);
  for (let i = 1; i < k; i++) {
    let remaining = 1;
    for (let m = 0; m < i; m++) {
      z[m * k + i] = Math.max(-1, Math.min(1, lower[i * k + m] / Math.sqrt(remaining)));
      remaining *= 1 - z[m * k + i] ** 2;
      if (!(remaining > 0)) remaining = 1e-300;
    }
  }
  for (let m = 0; m < k; m++) for (let i = m + 1; i < k; i++) partials.push(z[m * k + i]);
  return partials;
}

/** A point in profile coordinates: ln variances, atanh partials, ln alphas. */
type Coordinates = number[];

function partsOf(model: JointModel, k: number, coordinates: Coordinates, ordering: readonly number[]): { covariance: Float64Array; alpha: number[] | null } {
  const variance = coordinates.slice(0, k).map((value) => Math.exp(Math.max(value, lowestLogVariance)));
  const partialCount = model.correlated ? (k * (k - 1)) / 2 : 0;
  const correlation = model.correlated
    ? correlationFrom(coordinates.slice(k, k + partialCount).map((value) => Math.tanh(Math.max(-largestAtanh, Math.min(largestAtanh, value)))), k, ordering)
    : Float64Array.from({ length: k * k }, (_, index) => (Math.floor(index / k) === index % k ? 1 : 0));
  const covariance = Float64Array.from(correlation, (value, index) => value * Math.sqrt(variance[Math.floor(index / k)] * variance[index % k]));
  const alpha = model.process === 'ou' ? coordinates.slice(k + partialCount).map(Math.exp) : null;
  return { covariance, alpha };
}

/** Profile logL at coordinates, with optionally one location coefficient held at a value. */
function logLikAt(model: JointModel, data: JointData, coordinates: Coordinates, ordering: readonly number[], held: { column: number; value: number } | null): number {
  const { covariance, alpha } = partsOf(model, data.traits, coordinates, ordering);
  const design = jointDesign(model, data, alpha);
  let used = data;
  let columns = design;
  if (held) {
    const column = design[held.column];
    used = { ...data, values: Float64Array.from(data.values, (value, index) => value - held.value * column[index]) };
    columns = design.filter((_, index) => index !== held.column);
  }
  const whitened = whitenJoint(used, jointDynamics(model, data, covariance, alpha), columns);
  const profile = whitened ? profileFromWhitened(whitened) : null;
  return profile?.logLik ?? Number.NEGATIVE_INFINITY;
}

/** The estimates the intervals start from, on the standardised scale. */
export interface IntervalStart {
  readonly covariance: Float64Array;
  readonly alpha: readonly number[] | null;
  readonly locations: Float64Array;
  readonly logLik: number;
  readonly alphaRange: readonly [number, number];
}

/**
 * Profile-likelihood 95% intervals of one fitted model on standardised data
 * (the caller converts them back). Ends that the profile never crosses
 * within the search range are the bound (0 for a variance, ±1 for a
 * correlation) or null (open: alpha, a location whose profile stays high).
 *
 * @example
 * // One trait: the joint profile intervals equal the scalar fitter's profile-likelihood intervals (an outside check).
 * const time = [0, 1, 2, 3, 4, 5];
 * const x = [0, 0.5, 0.2, 1.1, 1.6, 1.2];
 * const single = fitModel(randomWalk, lineageFromArrays({ time, mean: x, samplingVariance: Array(6).fill(0.01) }), { intervalMethod: 'profile' });
 * const data = { traits: 1, time: Float64Array.from(time), values: Float64Array.from(x), sampling: Float64Array.from(Array(6).fill(0.01)) };
 * const start = { covariance: Float64Array.of(single.estimates.step_variance), alpha: null, locations: Float64Array.of(single.estimates.ancestral_mean), logLik: single.logLik, alphaRange: [1, 1] };
 * const found = profileIntervals(jointModel('independent-random-walks'), data, start);
 * found.locations[0].lower - single.parameters.ancestral_mean.lower; // 0 (to 1e-8)
 * found.variances[0].upper / single.parameters.step_variance.upper; // 1 (to 1e-6)
 */
export function profileIntervals(model: JointModel, data: JointData, start: IntervalStart): {
  locations: JointInterval[];
  variances: JointInterval[];
  correlations: (JointInterval | null)[][];
  alphas: JointInterval[] | null;
} {
  const k = data.traits;
  const identity = Array.from({ length: k }, (_, j) => j);
  const baseCoordinates = (ordering: readonly number[]): Coordinates => {
    const variance = Array.from({ length: k }, (_, j) => Math.log(Math.max(start.covariance[j * k + j], Math.exp(lowestLogVariance))));
    const correlation = Float64Array.from(start.covariance, (value, index) => {
      const i = Math.floor(index / k);
      const j = index % k;
      return i === j ? 1 : value / Math.sqrt(start.covariance[i * k + i] * start.covariance[j * k + j]) || 0;
    });
    const partials = model.correlated ? partialsOf(correlation, k, ordering).map((value) => Math.atanh(Math.max(-0.999999, Math.min(0.999999, value)))) : [];
    return [...variance, ...partials, ...(start.alpha ? start.alpha.map(Math.log) : [])];
  };
  const [lowAlpha, highAlpha] = start.alphaRange;
  const clampAlpha = (coordinates: Coordinates): Coordinates => {
    if (model.process !== 'ou') return coordinates;
    const from = coordinates.length - k;
    return coordinates.map((value, index) => (index >= from ? Math.min(Math.max(value, lowAlpha), highAlpha) : value));
  };
  const target = start.logLik - cutoff;
  /** Maximum over the free coordinates with `fixed` coordinate indices held. */
  const maximise = (coordinates: Coordinates, fixed: number | null, ordering: readonly number[], held: { column: number; value: number } | null): { value: number; at: Coordinates } => {
    const free = coordinates.map((_, index) => index).filter((index) => index !== fixed);
    const full = (x: readonly number[]): Coordinates => {
      const point = [...coordinates];
      free.forEach((index, position) => { point[index] = x[position]; });
      return clampAlpha(point);
    };
    const objective = (x: number[]): number => -logLikAt(model, data, full(x), ordering, held);
    if (free.length === 0) return { value: -objective([]), at: coordinates };
    const result = nelderMead(objective, free.map((index) => coordinates[index]), { step: free.map(() => 0.3), tolerance: 1e-9, maxEvaluations: 250 * free.length, restarts: 0 });
    return { value: -result.value, at: full(result.at) };
  };
  /** One end: walk from the estimate along `direction` until the profile drops below the cut-off or `limit` is reached; then a root. */
  const end = (estimate: number, direction: 1 | -1, firstStep: number, limit: number, profile: (value: number) => number): number | null => {
    let inside = estimate;
    let step = firstStep;
    for (let tries = 0; tries < 40; tries++) {
      let next = inside + direction * step;
      if ((next - limit) * direction >= 0) next = limit;
      const value = profile(next);
      if (!(value > target)) return findRoot((x) => profile(x) - target, Math.min(inside, next), Math.max(inside, next), 1e-6 * (Math.abs(next) + 1));
      if (next === limit) return null;
      inside = next;
      step *= 2;
    }
    return null;
  };
  const coordinates = baseCoordinates(identity);
  // Warm start: each profile point starts from the last maximum found.
  const coordinateInterval = (index: number, ordering: readonly number[], base: Coordinates, low: number, high: number, firstStep: number): JointInterval => {
    let warm = base;
    const profile = (value: number): number => {
      const point = [...warm];
      point[index] = value;
      const best = maximise(point, index, ordering, null);
      if (best.value > target) warm = best.at;
      return best.value;
    };
    const lower = end(base[index], -1, firstStep, low, (value) => profile(value));
    warm = base;
    const upper = end(base[index], 1, firstStep, high, (value) => profile(value));
    return { lower, upper };
  };
  const variances = Array.from({ length: k }, (_, j) => {
    const interval = coordinateInterval(j, identity, coordinates, lowestLogVariance, 12, 0.5);
    return { lower: interval.lower === null ? 0 : Math.exp(interval.lower), upper: interval.upper === null ? null : Math.exp(interval.upper) };
  });
  const alphas = model.process === 'ou'
    ? Array.from({ length: k }, (_, j) => {
        const index = coordinates.length - k + j;
        const interval = coordinateInterval(index, identity, coordinates, lowAlpha, highAlpha, 0.5);
        return { lower: interval.lower === null ? null : Math.exp(interval.lower), upper: interval.upper === null ? null : Math.exp(interval.upper) };
      })
    : null;
  const correlations: (JointInterval | null)[][] = Array.from({ length: k }, () => new Array<JointInterval | null>(k).fill(null));
  if (model.correlated) {
    for (let j = 0; j < k; j++) {
      for (let l = j + 1; l < k; l++) {
        const ordering = [j, l, ...identity.filter((index) => index !== j && index !== l)];
        const base = baseCoordinates(ordering);
        const interval = coordinateInterval(k, ordering, base, -largestAtanh, largestAtanh, 0.3);
        const result = { lower: interval.lower === null ? -1 : Math.tanh(interval.lower), upper: interval.upper === null ? 1 : Math.tanh(interval.upper) };
        correlations[j][l] = result;
        correlations[l][j] = result;
      }
    }
  }
  const per = locationsPerTrait(model);
  const locations = Array.from({ length: k * per }, (_, column) => {
    const estimate = start.locations[column];
    let warm = coordinates;
    const profile = (value: number): number => {
      const best = maximise(warm, null, identity, { column, value });
      if (best.value > target) warm = best.at;
      return best.value;
    };
    // First step: about one conditional standard error, from the curvature at the estimate (common practice).
    const probe = 1e-3 * (Math.abs(estimate) + 1);
    const drop = start.logLik - logLikAt(model, data, coordinates, identity, { column, value: estimate + probe });
    const standardError = drop > 0 ? probe / Math.sqrt(2 * drop) : 1;
    const lower = end(estimate, -1, standardError, estimate - 1e6 * standardError, profile);
    warm = coordinates;
    const upper = end(estimate, 1, standardError, estimate + 1e6 * standardError, profile);
    return { lower, upper };
  });
  return { locations, variances, correlations, alphas };
}
