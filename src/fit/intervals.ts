import { usageError } from '../data/errors.js';
import { informationLogDet, profileLogLik, reducedProfileSummary } from '../engine/gls.js';
import type { WhitenedSums } from '../engine/kalman-filter.js';
import type { Lineage } from '../lineage.js';
import { axisIndexOf, type EvolutionModel, type ParameterSpec } from '../models/model.js';
import type { LikelihoodEvaluator } from './evaluator.js';
import { polishMaximum } from './polish.js';
import { maximiseProcess, type ProcessMaximum } from './search.js';

/**
 * How the 95% intervals of a fit were made:
 * - `profile`: plain profile likelihood, cut-off logL_max - chi2(1; 0.95)/2
 *   (asymptotic);
 * - `adjusted`: restricted (REML-type) profile: the location parameters not
 *   being profiled are integrated out rather than maximised over, which
 *   adds -0.5 ln det(X_r' V^-1 X_r) to the profile (X_r the design without the
 *   column of the parameter held fixed; all columns for a process parameter);
 * - `bootstrap`: plain profile, with the cut-off taken from the 95% quantile
 *   of the likelihood-ratio statistic over a parametric bootstrap from the
 *   restricted (REML) fit of the model;
 * - `integrated`: equal-tailed 95% intervals of the integrated likelihood
 *   (location parameters under flat priors, the one variance under a
 *   uniform prior on its square root; `intervals-integrated.ts`), for models
 *   with at most one process parameter; other models fall back to `adjusted`.
 */
export type IntervalMethod = 'profile' | 'adjusted' | 'bootstrap' | 'integrated';

/** Every interval method, in the order tables list them. */
export const intervalMethods: readonly IntervalMethod[] = ['profile', 'adjusted', 'bootstrap', 'integrated'];

/** The method `fit` uses when `--intervals` is not given (see the README for its measured coverage). */
export const defaultIntervalMethod: IntervalMethod = 'integrated';

/** Label of each method for tables and JSON. */
export const intervalMethodLabels: Record<IntervalMethod, string> = {
  profile: 'profile likelihood (asymptotic chi-square cut-off)',
  adjusted: 'restricted (REML-type) adjusted profile likelihood',
  bootstrap: 'profile likelihood with a parametric-bootstrap cut-off',
  integrated: 'integrated likelihood (flat priors on locations, uniform on the standard deviation)',
};

/**
 * Parse a method name, or return null.
 *
 * @example
 * parseIntervalMethod('profile'); // 'profile'
 * parseIntervalMethod('wald'); // null
 */
export function parseIntervalMethod(text: string): IntervalMethod | null {
  return (intervalMethods as readonly string[]).includes(text) ? (text as IntervalMethod) : null;
}

/** Interval ends of one parameter. */
export interface IntervalEnds {
  readonly lower: number | null;
  readonly upper: number | null;
  readonly lowerAtBound: boolean;
  readonly upperAtBound: boolean;
}

/**
 * Restricted (REML-type) log-likelihood of the process parameters: the
 * profile log-likelihood minus 0.5 ln det(X' V^-1 X), i.e. the location
 * parameters integrated out under a flat prior instead of maximised over
 * (constants that do not depend on the parameters are dropped, which leaves
 * every likelihood-ratio unchanged).
 *
 * Patterson, H. D. & Thompson, R. (1971). Recovery of inter-block
 * information when block sizes are unequal. Biometrika 58:545-554.
 * Harville, D. A. (1974). Bayesian inference for variance components using
 * only error contrasts. Biometrika 61:383-385.
 *
 * @example
 * // One mean, unit sampling variances: X'V^-1 X = 2, so the restricted logL is the profile minus 0.5 ln 2 (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const sums = new LikelihoodEvaluator(strictStasis, lineage).whiten([]);
 * restrictedLogLik(sums) - profileLogLik(sums); // -0.34657359027997264 (to 1e-12; -0.5 ln 2)
 */
export function restrictedLogLik(sums: WhitenedSums): number {
  const logLik = profileLogLik(sums);
  if (!Number.isFinite(logLik)) return Number.NEGATIVE_INFINITY;
  return logLik - 0.5 * informationLogDet(sums);
}

/**
 * Profile log-likelihood with design coefficient `index` held at `value`,
 * the other coefficients profiled by GLS, and (when `adjusted`) the
 * restricted adjustment -0.5 ln det(X_r' V^-1 X_r) for those other
 * coefficients (Cox & Reid 1987, J. R. Stat. Soc. B 49:1-39, for adjusting
 * a profile likelihood for nuisance parameters; for linear location
 * parameters the adjustment is exactly the restricted likelihood of
 * Patterson & Thompson 1971).
 *
 * @example
 * // Means 1, 3 centred on 2: the coefficient held at 1 (the mean at 3) leaves residuals -2, 0, logL = -ln 2 pi - 2 (closed form);
 * // no other coefficient, so the adjustment adds nothing.
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const sums = new LikelihoodEvaluator(strictStasis, lineage).whiten([]);
 * fixedCoefficientLogLik(sums, 0, 1, false); // -3.8378770664093453 (to 1e-12)
 * fixedCoefficientLogLik(sums, 0, 1, true); // -3.8378770664093453 (to 1e-12)
 */
export function fixedCoefficientLogLik(sums: WhitenedSums, index: number, value: number, adjusted: boolean): number {
  const result = reducedProfileSummary(sums, index, value);
  if (!adjusted || !Number.isFinite(result.logLik)) return result.logLik;
  return result.logLik - 0.5 * result.logDetInformation;
}


/**
 * The profile log-likelihood of one parameter as a function of its value,
 * for one model and one lineage, by the plain or the adjusted method, with
 * its maximum and maximiser. The building block of every interval method
 * and of the bootstrap cut-offs.
 */
export interface ParameterProfile {
  /** Profile (or adjusted profile) at a trial value of the parameter. */
  at(value: number): number;
  /** Its maximum over the parameter. */
  readonly maximum: number;
  /** The value of the parameter at that maximum. */
  readonly maximiser: number;
  /** The process values at that maximum. */
  readonly process: readonly number[];
}

/**
 * Build the profile of parameter `name`. For a process parameter the others
 * are maximised by the nested search (12 grid points per axis); for a
 * location parameter the other location parameters are profiled by GLS (or
 * integrated out when `adjusted`) and the process parameters maximised.
 *
 * @example
 * // Strict stasis, unit sampling variances, means 1 and 3: the profile of the mean is -ln 2 pi - 1 - (m - 2)^2 (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const profile = parameterProfile(new LikelihoodEvaluator(strictStasis, lineage), 'stasis_mean', false);
 * [profile.maximum, profile.maximiser]; // [-2.8378770664093453, 2]
 * profile.at(2 + Math.SQRT1_2); // -3.3378770664093453 (to 1e-12; half a unit below)
 */
export function parameterProfile(
  evaluator: LikelihoodEvaluator,
  name: string,
  adjusted: boolean,
  points = 12,
): ParameterProfile {
  const model = evaluator.model;
  const lineage = evaluator.lineage;
  const axisIndex = axisIndexOf(model, name);
  if (axisIndex >= 0) {
    const at = profileFunction(evaluator, name, adjusted, points);
    const evaluate = (process: number[]): number => {
      const sums = evaluator.whiten(process);
      return adjusted ? restrictedLogLik(sums) : profileLogLik(sums);
    };
    const best = maximiseProcess(evaluate, model.process, lineage, { points: Math.max(points, 24), gradient: scoreOf(evaluator, adjusted) });
    const through = model.parameters.find((spec) => spec.name === name)?.searchedAs;
    const maximiser = through ? through.fromAxis(best.process[axisIndex], lineage) : best.process[axisIndex];
    return { at, maximum: best.logLik, maximiser, process: best.process };
  }
  const whole = locationSupremum(evaluator, name, adjusted);
  const best = maximiseProcess(whole, model.process, lineage, { points: Math.max(points, 24), gradient: supremumScore(evaluator, name, adjusted) });
  const estimates = model.toParameters(evaluator.details(best.process).coefficients, best.process, lineage);
  // The trial values' searches start from the maximum (issue 14b: a cold nested search at the first trial value cost thousands of filter passes).
  const at = profileFunction(evaluator, name, adjusted, points, { value: estimates[name], process: best.process });
  return { at, maximum: best.logLik, maximiser: estimates[name], process: best.process };
}

/**
 * The (plain or adjusted) profile of location parameter `name` maximised
 * over that parameter, at given process values: its GLS value, where the
 * restricted adjustment is the log-determinant without its column.
 */
function locationSupremum(evaluator: LikelihoodEvaluator, name: string, adjusted: boolean): (process: number[]) => number {
  const model = evaluator.model;
  return (process: number[]): number => {
    const sums = evaluator.whiten(process);
    const logLik = profileLogLik(sums);
    if (!adjusted || !Number.isFinite(logLik)) return logLik;
    const { index } = model.fixLocation(name, 0, process, evaluator.lineage);
    const logDet = reducedProfileSummary(sums, index, 0).logDetInformation;
    return Number.isFinite(logDet) ? logLik - 0.5 * logDet : Number.NEGATIVE_INFINITY;
  };
}

/**
 * The gradient of {@link locationSupremum} over the process values, for its
 * search: the plain profile's (`profileScore`), or for the adjusted one the
 * restricted gradient with the parameter's own design column left out of
 * the log-determinant (`restrictedScore` with `omit`). Undefined when the
 * model gives no state-space derivatives.
 *
 * @example
 * // Stasis (one column): leaving it out leaves no adjustment, so the adjusted supremum's slope is the profile's.
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const evaluator = new LikelihoodEvaluator(stasis, lineage);
 * supremumScore(evaluator, 'stasis_mean', true)?.([3])[0]; // -0.1875 (to 1e-12; -1 / (omega + 1) + 1 / (omega + 1)^2 at omega = 3, the profile's slope)
 */
export function supremumScore(evaluator: LikelihoodEvaluator, name: string, adjusted: boolean): ((process: number[]) => Float64Array) | undefined {
  if (!evaluator.hasScore) return undefined;
  const model = evaluator.model;
  const slopes = new Float64Array(model.process.length);
  if (!adjusted) return (process) => (evaluator.profileScore(process, slopes), slopes);
  return (process) => (evaluator.restrictedScore(process, slopes, model.fixLocation(name, 0, process, evaluator.lineage).index), slopes);
}

/**
 * Interval ends of a parameter from those of its searched axis: the same for
 * an axis parameter; mapped for one searched through another axis
 * (`searchedAs`), an end at the axis's bound or limit becoming open.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [0.1, 0.1, 0.1, 0.1] });
 * const spec = randomWalk.parameters.find((parameter) => parameter.name === 'step_variance');
 * parameterEnds(spec, lineage, { lower: 1, upper: 5, lowerAtBound: false, upperAtBound: false }); // { lower: 1, upper: 5, lowerAtBound: false, upperAtBound: false } (an axis parameter: unchanged)
 */
export function parameterEnds(spec: ParameterSpec | undefined, lineage: Lineage, ends: IntervalEnds): IntervalEnds {
  const through = spec?.searchedAs;
  if (!through) return ends;
  return {
    lower: ends.lowerAtBound || ends.lower === null ? null : through.fromAxis(ends.lower, lineage),
    upper: ends.upperAtBound || ends.upper === null ? null : through.fromAxis(ends.upper, lineage),
    lowerAtBound: ends.lowerAtBound,
    upperAtBound: ends.upperAtBound,
  };
}

/**
 * A location parameter that runs off to ±∞ at the zero limit of the first
 * process axis (`ParameterSpec.runaway`; ou's optimum as alpha → 0, its
 * profile tending to the directional walk with the drift (optimum − a)·alpha
 * free). Far out the profile computed with alpha held inside its search
 * range falls off only because alpha cannot get small enough (an artefact:
 * the sample data's ou gave an upper end of 125,000 that way), so when the
 * limit stays above the cut-off the interval is open on the side of the
 * sign of the coefficient that stays finite there. Other parameters: the
 * ends unchanged.
 *
 * @param cutoff the profile value that defines the interval
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const ends = { lower: 1, upper: 3, lowerAtBound: false, upperAtBound: false };
 * openTowardTrendLimit(new LikelihoodEvaluator(strictStasis, lineage), 'stasis_mean', ends, -10, false); // { lower: 1, upper: 3, lowerAtBound: false, upperAtBound: false } (no runaway: unchanged)
 */
export function openTowardTrendLimit(evaluator: LikelihoodEvaluator, name: string, ends: IntervalEnds, cutoff: number, adjusted: boolean): IntervalEnds {
  const side = trendLimitSide(evaluator, name, cutoff, adjusted);
  if (side > 0) return { ...ends, upper: null, upperAtBound: true };
  if (side < 0) return { ...ends, lower: null, lowerAtBound: true };
  return ends;
}

/**
 * The side (1 upper, -1 lower, 0 neither) on which {@link openTowardTrendLimit}
 * opens the interval of `name`. Known before the ends are searched, so the
 * search can skip that end (issue 14b: ou's optimum then walks out to 2^59
 * standard errors on one side only); the ends come out the same.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * trendLimitSide(new LikelihoodEvaluator(strictStasis, lineage), 'stasis_mean', -10, false); // 0 (not a runaway parameter)
 * ornsteinUhlenbeck.parameters.filter((parameter) => parameter.runaway).map((parameter) => parameter.name); // ['optimum']
 */
export function trendLimitSide(evaluator: LikelihoodEvaluator, name: string, cutoff: number, adjusted: boolean): 1 | -1 | 0 {
  const model = evaluator.model;
  const runaway = model.parameters.find((spec) => spec.name === name)?.runaway;
  if (!runaway || model.process[0]?.limitNames?.[0] !== runaway.limit || !model.process[0].allowZero) return 0;
  const limit = maximiseProcess(locationSupremum(evaluator, name, adjusted), model.process, evaluator.lineage, { fixed: new Map([[0, 0]]), points: 24 });
  if (!(limit.logLik >= cutoff)) return 0;
  const drift = evaluator.details(limit.process).coefficients[runaway.coefficient];
  return drift > 0 ? 1 : drift < 0 ? -1 : 0;
}

/**
 * The (plain or adjusted) profile log-likelihood of parameter `name` at a
 * trial value: the other process parameters maximised by the nested search
 * (`points` grid points per axis), the other location parameters profiled
 * by GLS or, when adjusted, integrated out.
 *
 * @param start for a location parameter, its maximiser and the process
 *   values there, to warm-start the searches from ({@link WarmStarts});
 *   without it the first trial gets the full nested search
 *
 * @example
 * // The profile of strict stasis's mean, -ln 2 pi - 1 - (m - 2)^2 here (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * profileFunction(new LikelihoodEvaluator(strictStasis, lineage), 'stasis_mean', false)(3); // -3.8378770664093453 (to 1e-12)
 */
export function profileFunction(
  evaluator: LikelihoodEvaluator,
  name: string,
  adjusted: boolean,
  points = 12,
  start?: { readonly value: number; readonly process: readonly number[] },
): (value: number) => number {
  const model = evaluator.model;
  const lineage = evaluator.lineage;
  const axisIndex = axisIndexOf(model, name);
  if (axisIndex >= 0) {
    const evaluate = (process: number[]): number => {
      const sums = evaluator.whiten(process);
      return adjusted ? restrictedLogLik(sums) : profileLogLik(sums);
    };
    const through = model.parameters.find((spec) => spec.name === name)?.searchedAs;
    return (parameterValue: number): number => {
      const value = through ? through.toAxis(parameterValue, lineage) : parameterValue;
      if (model.process.length === 1) return evaluate([value]);
      return maximiseProcess(evaluate, model.process, lineage, { fixed: new Map([[axisIndex, value]]), points }).logLik;
    };
  }
  const profile = locationProfile(evaluator, name, adjusted, points, start);
  return (value: number): number => profile.at(value).logLik;
}

/**
 * The location branch of {@link profileFunction}: at a trial value, the
 * maximum over the process values and where it is, each trial's search
 * warm-started ({@link WarmStarts}) from the trials kept so far (`keep`
 * adds a value whose maximiser is known from elsewhere).
 */
function locationProfile(
  evaluator: LikelihoodEvaluator,
  name: string,
  adjusted: boolean,
  points: number,
  start?: { readonly value: number; readonly process: readonly number[] },
): { at(value: number): ProcessMaximum; evaluateAt(value: number): (process: number[]) => number; keep(value: number, process: readonly number[]): void } {
  const model = evaluator.model;
  const lineage = evaluator.lineage;
  const warm = new WarmStarts(model, lineage, start);
  const evaluateAt = (value: number) => (process: number[]): number => {
    const { index, coefficient } = model.fixLocation(name, value, process, lineage);
    const constant = model.constantCoefficients(process, lineage);
    return fixedCoefficientLogLik(evaluator.whiten(process), index, coefficient - evaluator.centre * constant[index], adjusted);
  };
  const at = (value: number): ProcessMaximum => {
    const evaluate = evaluateAt(value);
    if (model.process.length === 0) return { process: [], logLik: evaluate([]), positions: [] };
    // The higher of the warm searches from the nearest trial on the maximum's side and from the maximum (WarmStarts).
    let found: ProcessMaximum | null = null;
    for (const from of warm.startsFor(value)) {
      const candidate = maximiseProcess(evaluate, model.process, lineage, { points, start: from });
      if (found === null || candidate.logLik > found.logLik) found = candidate;
    }
    found ??= maximiseProcess(evaluate, model.process, lineage, { points });
    warm.add(value, found.process);
    return found;
  };
  return { at, evaluateAt, keep: (value, process) => warm.add(value, process) };
}

/**
 * Warm starts of a location profile's trial values (issue 14b): the search
 * at a new value starts from the maximiser at the nearest value tried so
 * far on the side of the profile's maximum (continuation outward from the
 * maximum), or, when there is none on that side, from the nearest value.
 * Starting from the previous trial instead, a trial beyond the end (which
 * the root finder's bracket needs) could hand the next trials, back inside,
 * a lower local maximum of the process parameters: the profile would then
 * depend on the order of the trials, and an end found on those lower values
 * would lie inside the true interval. A process value at its bound 0 starts
 * from the geometric middle of its range instead: a polish started at 0
 * stays on that face (ou's step_variance 0 at the maximum, small but
 * positive a little away from it), while the warm search's grid still
 * holds 0 itself.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [0.1, 0.1, 0.1, 0.1] });
 * const starts = new WarmStarts(randomWalk, lineage, { value: 0, process: [2] });
 * starts.add(1, [3]);
 * starts.startsFor(1.5); // [[3], [2]] (the nearest kept value toward the maximum, then the maximum's own)
 * starts.startsFor(-1); // [[2]] (the nearest is the maximum itself)
 */
export class WarmStarts {
  private readonly values: number[] = [];
  private readonly processes: Array<readonly number[]> = [];
  private centre: number;
  private readonly model: EvolutionModel;
  private readonly lineage: Lineage;

  /** @param start the profile's maximiser and the process values there (omitted: the first trial gets the full search) */
  constructor(model: EvolutionModel, lineage: Lineage, start?: { readonly value: number; readonly process: readonly number[] }) {
    this.model = model;
    this.lineage = lineage;
    this.centre = start?.value ?? Number.NaN;
    if (start && Number.isFinite(start.value)) this.add(start.value, start.process);
  }

  /** Keep the process values that maximised the profile at `value`. */
  add(value: number, process: readonly number[]): void {
    if (!Number.isFinite(value)) return;
    this.values.push(value);
    this.processes.push(process);
    if (Number.isNaN(this.centre)) this.centre = value;
  }

  /**
   * Where the searches at `value` start: the maximiser at the nearest value kept on the side of
   * the profile's maximum (the nearest of all when there is none on that side), and the maximum's
   * own when that is another; zeros moved to the middle of their range. Empty before anything is
   * kept (the full search then). `profileFunction` keeps the higher of the maxima found from
   * them: from the nearest-inside start alone the locality sample's ou optimum stopped in a
   * lower local maximum (an end 2.6e-4 inside the true one).
   */
  startsFor(value: number): Array<readonly number[]> {
    let best = -1;
    let bestInside = -1;
    for (let k = 0; k < this.values.length; k++) {
      const distance = Math.abs(this.values[k] - value);
      if (best < 0 || distance < Math.abs(this.values[best] - value)) best = k;
      const towardCentre = (this.values[k] - value) * (this.centre - value) >= 0;
      if (towardCentre && (bestInside < 0 || distance < Math.abs(this.values[bestInside] - value))) bestInside = k;
    }
    const chosen = bestInside >= 0 ? bestInside : best;
    if (chosen < 0) return [];
    return (chosen === 0 ? [0] : [chosen, 0]).map((k) => liftedOffZero(this.model, this.lineage, this.processes[k]));
  }
}

/**
 * Process values with each value at an allowed bound 0 moved to the
 * geometric middle of its range (a polish started at 0 stays on that face).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [0.1, 0.1, 0.1, 0.1] });
 * const [lower, upper] = randomWalk.process[0].range(lineage, []);
 * liftedOffZero(randomWalk, lineage, [0])[0] === Math.sqrt(lower * upper); // true
 * liftedOffZero(randomWalk, lineage, [2]); // [2] (not at 0: unchanged)
 */
export function liftedOffZero(model: EvolutionModel, lineage: Lineage, process: readonly number[]): number[] {
  return process.map((value, level) => {
    const axis = model.process[level];
    if (value !== 0 || !axis?.allowZero) return value;
    const [lower, upper] = axis.range(lineage, process.slice(0, level));
    return Math.sqrt(lower * upper);
  });
}

/**
 * GLS estimate of design coefficient `index` and its variance
 * [(X' V^-1 X)^-1]_ii from the whitened sums (R beta = z; the variance is
 * the squared length of row `index` of R^-1), without allocating beyond a
 * kept scratch. Call only where {@link profileLogLik} is finite.
 *
 * @example
 * // One mean, unit sampling variances, means 1, 3 centred on 2: estimate 0 (the centred mean), variance 1/2 (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const spread = coefficientSpread(new LikelihoodEvaluator(strictStasis, lineage).whiten([]), 0);
 * spread.estimate; // 0 (to 1e-12)
 * spread.variance; // 0.5 (to 1e-12)
 */
export function coefficientSpread(sums: WhitenedSums, index: number): { estimate: number; variance: number } {
  const width = sums.width;
  const triangle = sums.triangle;
  if (spreadScratch.length < 2 * width) spreadScratch = new Float64Array(2 * width);
  const coefficients = spreadScratch;
  for (let i = width - 1; i >= 0; i--) {
    let value = sums.projected[i];
    for (let k = i + 1; k < width; k++) value -= triangle[i * width + k] * coefficients[k];
    coefficients[i] = value / triangle[i * width + i];
  }
  const estimate = coefficients[index];
  // Row `index` of R^-1 (upper triangular): u R = e_index, solved left to right from column `index`.
  let variance = 0;
  for (let column = index; column < width; column++) {
    let value = column === index ? 1 : 0;
    for (let k = index; k < column; k++) value -= spreadScratch[width + k] * triangle[k * width + column];
    const entry = value / triangle[column * width + column];
    spreadScratch[width + column] = entry;
    variance += entry * entry;
  }
  return { estimate, variance };
}

let spreadScratch = new Float64Array(8);

/**
 * How far one side of a location parameter's interval reaches at given
 * process values: the log-likelihood with the parameter's coefficient held
 * at c and the other coefficients profiled by GLS is exactly the quadratic
 * top(theta) - (c - c_hat)^2 / (2 s^2) (c_hat the GLS estimate, s^2 its
 * variance; for the adjusted profile `top` also carries the restricted
 * adjustment -0.5 ln det(X_r' V^-1 X_r) = -0.5 (ln det(X' V^-1 X) + ln s^2),
 * which does not depend on c), so the values of the parameter where it stays
 * above `cutoff` are the interval c_hat ± s sqrt(2 (top - cutoff)), mapped
 * from the coefficient to the parameter through `fixLocation` (affine in the
 * parameter). Returns `direction` × that interval's end on the side
 * `direction` (so larger is farther out), -Infinity where the profile at
 * these process values is below the cut-off everywhere, and +Infinity where
 * the coefficient does not depend on the parameter (ou's optimum at alpha =
 * 0) and the likelihood there is above the cut-off: every value is inside.
 * Maximised over the process values this is the interval's end
 * ({@link locationEndsBySupremum}).
 *
 * @example
 * // Strict stasis, means 1 and 3, unit sampling variances: the mean's 95% ends are 2 ± 1.959964 sqrt(1/2) (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const evaluator = new LikelihoodEvaluator(strictStasis, lineage);
 * const cutoff = evaluator.profile([]) - 1.920729410347062;
 * locationReach(evaluator, 'stasis_mean', false, cutoff, 1)([]); // 3.385903824349677 (to 1e-9)
 * locationReach(evaluator, 'stasis_mean', false, cutoff, -1)([]); // -0.6140961756503224 (to 1e-9; minus the lower end)
 */
export function locationReach(evaluator: LikelihoodEvaluator, name: string, adjusted: boolean, cutoff: number, direction: 1 | -1): (process: number[]) => number {
  const parts = reachParts(evaluator, name, adjusted, cutoff, direction);
  return (process: number[]): number => {
    const reach = parts(process);
    return reach.whole ? Number.POSITIVE_INFINITY : reach.inside ? reach.value : Number.NEGATIVE_INFINITY;
  };
}

/** What {@link locationReach} computes, where it is -Infinity outside the region continued by the mirror image of the root (finite), for the searches. */
interface ReachParts {
  /** direction × the end at these process values; outside the region, direction × (c_hat - s sqrt(2 (cutoff - top))) mapped (continuous at the region's edge, falling away from it). */
  readonly value: number;
  /** The profile at these process values reaches the cut-off (the value is an end, not the continuation). */
  readonly inside: boolean;
  /** Every value of the parameter is inside (its coefficient does not depend on it here). */
  readonly whole: boolean;
}

/**
 * How location parameter `name` enters the design at these process values:
 * the coefficient it fixes (`index`) is perUnit × value + offset on the
 * evaluator's centred trait (`fixLocation` is affine in the value; ou's
 * optimum enters as optimum·alpha, so perUnit = alpha there).
 *
 * @example
 * // Strict stasis, means 1 and 3 centred on 2: the mean is its own coefficient, less the centre.
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * coefficientLine(new LikelihoodEvaluator(strictStasis, lineage), 'stasis_mean', []); // { index: 0, offset: -2, perUnit: 1 }
 */
export function coefficientLine(evaluator: LikelihoodEvaluator, name: string, process: readonly number[]): { index: number; offset: number; perUnit: number } {
  const model = evaluator.model;
  const atZero = model.fixLocation(name, 0, process, evaluator.lineage);
  const offset = atZero.coefficient - evaluator.centre * model.constantCoefficients(process, evaluator.lineage)[atZero.index];
  const perUnit = model.fixLocation(name, 1, process, evaluator.lineage).coefficient - atZero.coefficient;
  return { index: atZero.index, offset, perUnit };
}

function reachParts(evaluator: LikelihoodEvaluator, name: string, adjusted: boolean, cutoff: number, direction: 1 | -1): (process: number[]) => ReachParts {
  const nowhere: ReachParts = { value: Number.NEGATIVE_INFINITY, inside: false, whole: false };
  return (process: number[]): ReachParts => {
    const sums = evaluator.whiten(process);
    const logLik = profileLogLik(sums);
    if (!Number.isFinite(logLik)) return nowhere;
    const { index, offset, perUnit } = coefficientLine(evaluator, name, process);
    const { estimate, variance } = coefficientSpread(sums, index);
    if (!(variance > 0) || !Number.isFinite(variance)) return nowhere;
    const top = adjusted ? logLik - 0.5 * (informationLogDet(sums) + Math.log(variance)) : logLik;
    if (!Number.isFinite(top)) return nowhere;
    if (perUnit === 0) return top - (offset - estimate) ** 2 / (2 * variance) >= cutoff ? { value: Number.POSITIVE_INFINITY, inside: true, whole: true } : nowhere;
    const room = top - cutoff;
    const inside = room >= 0;
    const half = Math.sqrt(2 * Math.abs(room) * variance) * (inside ? 1 : -1);
    const end = ((direction * perUnit > 0 ? estimate + half : estimate - half) - offset) / perUnit;
    return { value: direction * end, inside, whole: false };
  };
}

/**
 * Interval of a location parameter where its (plain or adjusted) profile
 * stays above `cutoff`, each end found by one maximisation over the process
 * values and a few Newton steps, instead of a root search whose every trial
 * value maximises over them (issue 14). The upper end is
 * sup{v : max_theta L(theta, v) >= cutoff} = max_theta of the upper end at
 * fixed theta, which is closed-form ({@link locationReach}); likewise the
 * lower end. That maximisation is the warm one of the profile searches
 * (`maximiseProcess` with a start: the grid over every process axis, with 0
 * where allowed, then polishes from the start and from the best grid point),
 * from `best` (the process values at the profile's maximum, where the reach
 * is finite) and from `best` lifted off any face at 0. Its maximum can sit a
 * hair inside the edge of the region where the reach is defined (ou's
 * adjusted optimum: 1e-3 of ln alpha), where a polish stalls; the farthest
 * point found is inside the interval, so safeguarded Newton steps on the
 * profile, from there, finish the end ({@link newtonCrossing}; the inner
 * maximisations local from the last trial's maximiser, the warm global
 * search where that is on a face at 0 or the local polish does not
 * converge). The end is thus never inside a point already shown to be in the
 * interval; a profile that dipped below the cut-off and rose again could
 * give its outer crossing. An end beyond 2^59 `scale`s of `estimate`, or
 * where every value is inside, is open (null, `AtBound` true).
 *
 * @param best process values at the profile's maximum (inside the interval's region)
 * @param estimate the parameter's value at that maximum
 * @param scale its standard-error-like step ({@link locationScale})
 * @param open a side (1 upper, -1 lower) known to be open, not searched ({@link trendLimitSide})
 *
 * @example
 * // Strict stasis, means 1 and 3, unit sampling variances: 2 ± 1.959964 sqrt(1/2) (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const evaluator = new LikelihoodEvaluator(strictStasis, lineage);
 * const ends = locationEndsBySupremum(evaluator, 'stasis_mean', false, evaluator.profile([]) - 1.920729410347062, [], 2, Math.SQRT1_2);
 * ends.lower; // 0.6140961756503224 (to 1e-9)
 * ends.upper; // 3.385903824349677 (to 1e-9)
 */
export function locationEndsBySupremum(
  evaluator: LikelihoodEvaluator,
  name: string,
  adjusted: boolean,
  cutoff: number,
  best: readonly number[],
  estimate: number,
  scale: number,
  open: 1 | -1 | 0 = 0,
  points = 12,
): IntervalEnds {
  const model = evaluator.model;
  const lineage = evaluator.lineage;
  const end = (direction: 1 | -1): number | null => {
    if (direction === open) return null;
    const reach = reachParts(evaluator, name, adjusted, cutoff, direction);
    // The farthest reach seen at process values inside the region (the search also sees the continuation outside it).
    let everything = false;
    let farthest = Number.NEGATIVE_INFINITY;
    let farthestAt: readonly number[] = best;
    const searched = (process: number[]): number => {
      const found = reach(process);
      if (found.whole) everything = true;
      else if (found.inside && found.value > farthest) {
        farthest = found.value;
        farthestAt = process.slice();
      }
      return found.value;
    };
    searched(best.slice());
    if (model.process.length > 0 && !everything) {
      maximiseProcess(searched, model.process, lineage, { points, start: best });
      // A start on a face (a variance at 0) polishes on that face only: the farthest reach can be off it, so also from
      // the start lifted off it (zeros to the middle of their range, as WarmStarts does).
      const lifted = liftedOffZero(model, lineage, best);
      if (lifted.some((value, level) => value !== best[level])) maximiseProcess(searched, model.process, lineage, { points, start: lifted });
    }
    if (everything || !Number.isFinite(farthest)) return null;
    const inside = direction * farthest;
    if (Math.abs(inside - estimate) > scale * 2 ** 59) return null;
    if (model.process.length === 0) return inside;
    // The sup search was the global one (its grid covers every process axis, 0 included); each Newton trial maximises
    // over the process values locally, from the last trial's maximiser, and only a polish that does not converge
    // falls back to the warm global search of the profile.
    const profile = locationProfile(evaluator, name, adjusted, points, { value: estimate, process: best });
    profile.keep(inside, farthestAt);
    let last: readonly number[] = farthestAt;
    const maximumAt = (value: number): ProcessMaximum => {
      const evaluate = profile.evaluateAt(value);
      // From a face (a value at 0) a local polish cannot leave it, and the farthest reach can be off it (the sup searches'
      // polishes, even from the start lifted off the face, can miss that): the warm global search of the profile there.
      const onFace = last.some((processValue) => processValue === 0);
      const start = { process: last, logLik: evaluate(last.slice()) };
      const polished = onFace ? null : polishMaximum(evaluate, model.process, lineage, start, last.map((_, level) => level), { largestStep: 2, backtrack: true, iterations: 8 });
      const found = polished?.converged ? { process: polished.process.slice(), logLik: polished.logLik, positions: [] } : profile.at(value);
      last = found.process;
      return found;
    };
    const root = newtonCrossing(evaluator, name, cutoff, direction, inside, estimate, maximumAt);
    return root === null || Math.abs(root - estimate) > scale * 2 ** 59 ? null : root;
  };
  const lower = end(-1);
  const upper = end(1);
  return { lower, upper, lowerAtBound: lower === null, upperAtBound: upper === null };
}

/**
 * Where a location parameter's profile P(v) crosses `cutoff` beyond `inside`
 * (a value known to be inside the interval), by safeguarded Newton steps with
 * the profile's exact slope: by the envelope theorem dP/dv is the partial
 * derivative at the process values that maximise the profile at v, and there
 * the log-likelihood is the quadratic of {@link locationReach} in the
 * coefficient c = k v + b, so dP/dv = -k (c - c_hat) / s^2. Steps outward are
 * at most 4 times the distance from the estimate; once a trial falls below
 * the cut-off the root is kept in the bracket (false position with the
 * Illinois halving when a Newton step leaves it; Dowell & Jarratt 1971, BIT
 * 11:168-174, from memory). Converged when a Newton step is below 1e-12
 * relative (the root finder's tolerance); null when it does not converge in
 * 60 trials.
 */
function newtonCrossing(
  evaluator: LikelihoodEvaluator,
  name: string,
  cutoff: number,
  direction: 1 | -1,
  inside: number,
  estimate: number,
  maximumAt: (value: number) => ProcessMaximum,
): number | null {
  const slopeAt = (value: number, process: readonly number[]): number => {
    const sums = evaluator.whiten(process as number[]);
    const { index, offset, perUnit } = coefficientLine(evaluator, name, process);
    const { estimate: centre, variance } = coefficientSpread(sums, index);
    return (-perUnit * (perUnit * value + offset - centre)) / variance;
  };
  let inner = inside;
  let innerGap = Number.NaN;
  let outer: number | null = null;
  let outerGap = Number.NaN;
  let value = inside;
  let side = 0;
  for (let trial = 0; trial < 60; trial++) {
    const found = maximumAt(value);
    const gap = found.logLik - cutoff;
    if (!Number.isFinite(gap)) return null;
    if (gap >= 0) {
      inner = value;
      innerGap = gap;
    } else {
      outer = value;
      outerGap = gap;
    }
    const slope = slopeAt(value, found.process);
    const newton = value - gap / slope;
    const tolerance = 1e-12 * Math.max(1, Math.abs(value));
    // Converged: the Newton step (toward the crossing from either side) is below the tolerance.
    if (Number.isFinite(newton) && Math.abs(newton - value) <= tolerance) return newton;
    let next = newton;
    const reachable = Number.isFinite(newton) && direction * slope < 0;
    if (outer === null) {
      const farthest = inner + direction * Math.max(4 * Math.abs(inner - estimate), tolerance);
      if (!reachable || direction * (next - inner) <= 0 || direction * (next - farthest) > 0) next = farthest;
    } else if (!reachable || (next - inner) * (next - outer) >= 0) {
      // Outside the bracket: false position, with the Illinois halving of the end kept twice in a row.
      if (gap < 0) {
        if (side === -1) innerGap *= 0.5;
        side = -1;
      } else {
        if (side === 1) outerGap *= 0.5;
        side = 1;
      }
      next = inner - innerGap * ((outer - inner) / (outerGap - innerGap));
      if (!Number.isFinite(next) || (next - inner) * (next - outer) >= 0) next = 0.5 * (inner + outer);
    }
    if (outer !== null && Math.abs(outer - inner) <= tolerance) return inner;
    value = next;
  }
  return null;
}

/**
 * A standard-error-like step for a location parameter's interval search.
 *
 * @example
 * // Strict stasis, two unit sampling variances: the GLS standard error of the mean is sqrt(1/2) (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * locationScale(new LikelihoodEvaluator(strictStasis, lineage), 'stasis_mean', [], 2); // 0.7071067811865476 (to 1e-12)
 */
export function locationScale(evaluator: LikelihoodEvaluator, name: string, process: readonly number[], estimate: number): number {
  const model = evaluator.model;
  const details = evaluator.details(process);
  const index = model.fixLocation(name, estimate, process, evaluator.lineage).index;
  const width = Math.sqrt(details.coefficientCovariance.length);
  let scale = Math.sqrt(Math.max(0, details.coefficientCovariance[index * width + index]));
  const { perUnit } = coefficientLine(evaluator, name, process);
  if (perUnit > 0) scale /= perUnit;
  if (!(scale > 0) || !Number.isFinite(scale)) scale = Math.max(1e-8, Math.abs(estimate) * 1e-3);
  return scale;
}

/** Options of the model-agnostic interval builder. */
export interface IntervalRequest {
  /** Plain or adjusted profile. */
  readonly adjusted: boolean;
  /** Likelihood-ratio cut-off (2 × the allowed drop from the maximum) per parameter name. */
  readonly ratioCutoff: (name: string) => number;
}

/**
 * The model-free part of every interval: for each parameter, the set of
 * values whose (plain or adjusted) profile lies within ratioCutoff / 2 of
 * the maximum. Process parameters use `processEnds` (the fitter's own
 * search for variance and rate ends), handed the gradient of the plain or
 * restricted profile ({@link scoreOf}) when the model has state-space
 * derivatives; location parameters step out by their GLS standard error.
 *
 * @example
 * // Strict stasis: the mean's interval is 2 ± 1.959964 × sqrt(1/2) (closed form: the profile is exactly quadratic).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const ends = intervalsByProfile(new LikelihoodEvaluator(strictStasis, lineage), ['stasis_mean'], { adjusted: false, ratioCutoff: () => 3.841458820694124 }, (evaluate, best, axis, cutoff) => processInterval(evaluate, strictStasis, lineage, best, axis, cutoff));
 * ends.stasis_mean.lower; // 0.6140961756503224 (to 1e-9)
 * ends.stasis_mean.upper; // 3.3859038243496773 (to 1e-9)
 */
export function intervalsByProfile(
  evaluator: LikelihoodEvaluator,
  names: readonly string[],
  request: IntervalRequest,
  processEnds: (evaluate: (process: number[]) => number, best: readonly number[], axisIndex: number, cutoff: number, gradient?: (process: number[]) => ArrayLike<number>) => IntervalEnds,
): Record<string, IntervalEnds> {
  const model = evaluator.model;
  const result: Record<string, IntervalEnds> = {};
  const evaluate = (process: number[]): number => {
    const sums = evaluator.whiten(process);
    return request.adjusted ? restrictedLogLik(sums) : profileLogLik(sums);
  };
  const gradient = scoreOf(evaluator, request.adjusted);
  // The maximum over every process parameter is the same for each of them: searched once.
  let processBest: ProcessMaximum | null = null;
  for (const name of names) {
    // A bootstrap cut-off can be 0 when the truth sits on a bound; a tiny floor keeps the root search bracketed.
    const drop = Math.max(request.ratioCutoff(name), 1e-6) / 2;
    const axisIndex = axisIndexOf(model, name);
    if (axisIndex >= 0) {
      processBest ??= maximiseProcess(evaluate, model.process, evaluator.lineage, { points: 24, gradient });
      const best = processBest;
      const spec = model.parameters.find((candidate) => candidate.name === name);
      result[name] = parameterEnds(spec, evaluator.lineage, processEnds(evaluate, best.process, axisIndex, best.logLik - drop, gradient));
      continue;
    }
    const profile = parameterProfile(evaluator, name, request.adjusted);
    const scale = locationScale(evaluator, name, profile.process, profile.maximiser);
    // The side the trend limit opens (openTowardTrendLimit) is known first and not searched.
    const open = trendLimitSide(evaluator, name, profile.maximum - drop, request.adjusted);
    result[name] = locationEndsBySupremum(evaluator, name, request.adjusted, profile.maximum - drop, profile.process, profile.maximiser, scale, open);
  }
  return result;
}

/**
 * The gradient of the (plain or adjusted) profile over the process values
 * for the searches (`SearchOptions.gradient`): `profileScore` or
 * `restrictedScore` of the evaluator, into one reused array; undefined when
 * the model gives no state-space derivatives.
 *
 * @example
 * // Stasis, two horizons of unit sampling variance, means 1 and 3: the restricted slope at omega = 3 is -1/8 + 1/16 (closed form; see restrictedScore).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * scoreOf(new LikelihoodEvaluator(stasis, lineage), true)?.([3])[0]; // -0.0625 (to 1e-12)
 * scoreOf(new LikelihoodEvaluator(strictStasis, lineage), false); // undefined (no process values, no derivatives)
 */
export function scoreOf(evaluator: LikelihoodEvaluator, adjusted: boolean): ((process: number[]) => Float64Array) | undefined {
  if (!evaluator.hasScore) return undefined;
  const slopes = new Float64Array(evaluator.model.process.length);
  return adjusted
    ? (process) => (evaluator.restrictedScore(process, slopes), slopes)
    : (process) => (evaluator.profileScore(process, slopes), slopes);
}

/**
 * Does an interval contain a value? An open end (null) contains everything beyond it.
 *
 * @example
 * covers({ lower: 1, upper: 2 }, 1.5); // true
 * covers({ lower: 1, upper: null }, 100); // true (open upper end)
 * covers({ lower: 1, upper: 2 }, 3); // false
 */
export function covers(ends: IntervalEnds, value: number): boolean {
  return (ends.lower === null || value >= ends.lower) && (ends.upper === null || value <= ends.upper);
}

/**
 * Fit options from the value of the CLI's `--intervals` / `--no-intervals`
 * (commander gives true when neither is given, false for --no-intervals, or
 * the method's name).
 *
 * @throws InputError (usage) for an unknown method name
 * @example
 * intervalOptions('bootstrap'); // { intervals: true, intervalMethod: 'bootstrap' }
 */
export function intervalOptions(value: boolean | string | undefined): { intervals: boolean; intervalMethod: IntervalMethod } {
  if (value === false) return { intervals: false, intervalMethod: defaultIntervalMethod };
  if (value === true || value === undefined) return { intervals: true, intervalMethod: defaultIntervalMethod };
  const method = parseIntervalMethod(value);
  if (method === null) throw usageError(`--intervals must be one of ${intervalMethods.join(', ')}, got "${value}"`);
  return { intervals: true, intervalMethod: method };
}

/**
 * Natural parameters at the maximum of the restricted likelihood (process
 * parameters by REML, location parameters by GLS at those values): the fit
 * a parametric bootstrap draws from, because unlike the ML fit it rarely
 * puts a variance at exactly 0 (Patterson & Thompson 1971).
 *
 * @example
 * // Nearly exact means: the ancestral mean is the first mean, so the REML step variance is the ML one, (1 + 4 + 1) / 3 (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [1e-12, 1e-12, 1e-12, 1e-12] });
 * restrictedEstimates(new LikelihoodEvaluator(randomWalk, lineage)).step_variance; // 2 (to 1e-9)
 */
export function restrictedEstimates(evaluator: LikelihoodEvaluator): Record<string, number> {
  const evaluate = (process: number[]): number => restrictedLogLik(evaluator.whiten(process));
  // Polished like the reported estimates: a bootstrap drawn from it is then invariant to rounding-level changes of the data.
  const best = maximiseProcess(evaluate, evaluator.model.process, evaluator.lineage, { points: 24, polish: true });
  return evaluator.model.toParameters(evaluator.details(best.process).coefficients, best.process, evaluator.lineage);
}
