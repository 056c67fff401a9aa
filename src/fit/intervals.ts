import { usageError } from '../data/errors.js';
import { informationLogDet, profileLogLik, reducedProfileSummary } from '../engine/gls.js';
import type { WhitenedSums } from '../engine/kalman-filter.js';
import type { Lineage } from '../lineage.js';
import { axisIndexOf, type EvolutionModel, type ParameterSpec } from '../models/model.js';
import type { LikelihoodEvaluator } from './evaluator.js';
import { profileCrossing } from './root-find.js';
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
  const best = maximiseProcess(whole, model.process, lineage, { points: Math.max(points, 24) });
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
  const warm = new WarmStarts(model, lineage, start);
  return (value: number): number => {
    const evaluate = (process: number[]): number => {
      const { index, coefficient } = model.fixLocation(name, value, process, lineage);
      const constant = model.constantCoefficients(process, lineage);
      return fixedCoefficientLogLik(evaluator.whiten(process), index, coefficient - evaluator.centre * constant[index], adjusted);
    };
    if (model.process.length === 0) return evaluate([]);
    // The higher of the warm searches from the nearest trial on the maximum's side and from the maximum (WarmStarts).
    let found: ProcessMaximum | null = null;
    for (const from of warm.startsFor(value)) {
      const candidate = maximiseProcess(evaluate, model.process, lineage, { points, start: from });
      if (found === null || candidate.logLik > found.logLik) found = candidate;
    }
    found ??= maximiseProcess(evaluate, model.process, lineage, { points });
    warm.add(value, found.process);
    return found.logLik;
  };
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
    return (chosen === 0 ? [0] : [chosen, 0]).map((k) => this.awayFromZero(this.processes[k]));
  }

  private awayFromZero(process: readonly number[]): number[] {
    return process.map((value, level) => {
      const axis = this.model.process[level];
      if (value !== 0 || !axis?.allowZero) return value;
      const [lower, upper] = axis.range(this.lineage, process.slice(0, level));
      return Math.sqrt(lower * upper);
    });
  }
}

/**
 * Interval of a location parameter where a profile stays above `cutoff`:
 * from `start` (the profile's maximiser, where it is `peak`) each end by
 * {@link profileCrossing}, the first trial value where the quadratic with
 * the curvature 1/scale^2 of the GLS standard error `scale` falls to the
 * cut-off (issue 14b: about half the trial values of stepping out by
 * doubling multiples of `scale`, which this replaced, with the same ends to
 * the root finder's tolerance). An end not crossed within 2^59 scales of
 * the start is open (null, `AtBound` true).
 *
 * @param peak the profile at `start` (its maximum); default: evaluated
 * @param open a side (1 upper, -1 lower) known to be open, not searched ({@link trendLimitSide})
 *
 * @example
 * // The quadratic -(v - 2)^2 / 2 falls to -1.920729410347062 at 2 ± 1.959963984540054 (closed form).
 * const ends = locationEnds((value) => -0.5 * (value - 2) ** 2, 2, 1, -1.920729410347062);
 * ends.upper; // 3.959963984540054 (to 1e-9)
 * ends.lower; // 0.040036015459946 (to 1e-9)
 */
export function locationEnds(at: (value: number) => number, start: number, scale: number, cutoff: number, peak?: number, open: 1 | -1 | 0 = 0): IntervalEnds {
  const gap = (value: number): number => at(value) - cutoff;
  const fromGap = peak !== undefined && Number.isFinite(peak) ? peak - cutoff : gap(start);
  const end = (direction: 1 | -1): number | null => {
    if (direction === open) return null;
    // Not above the cut-off at the start (a profile maximum that was not found): no interval around it, as before.
    if (!(fromGap > 0)) return null;
    const firstTrial = start + direction * Math.sqrt(2 * fromGap) * scale;
    const root = profileCrossing(gap, start, fromGap, firstTrial, { tolerance: 1e-12, limit: start + direction * scale * 2 ** 59, maxSteps: 120 });
    return root !== null && Number.isFinite(root) ? root : null;
  };
  const lower = end(-1);
  const upper = end(1);
  return { lower, upper, lowerAtBound: lower === null, upperAtBound: upper === null };
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
  const perUnit = model.fixLocation(name, 1, process, evaluator.lineage).coefficient - model.fixLocation(name, 0, process, evaluator.lineage).coefficient;
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
    result[name] = locationEnds(profile.at, profile.maximiser, scale, profile.maximum - drop, profile.maximum, open);
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
