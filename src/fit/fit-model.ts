import type { Lineage } from '../lineage.js';
import { axisIndexOf, varianceScale, type EvolutionModel } from '../models/model.js';
import { LikelihoodEvaluator } from './evaluator.js';
import { fitOverConfigurations, shiftRecords } from './fit-configurations.js';
import { unfittedFit, type FitOptions, type ModelFit, type ParameterEstimate } from './fit-results.js';
import { replaceIntervals, strayIntervals, strayReason, type IntervalMethod } from './intervals-method.js';
import { locationEndsBySupremum, locationScale, parameterEnds, trendLimitSide } from './intervals.js';
import { chiSquare1At95 } from './model-choice.js';
import { profileCrossing } from './root-find.js';
import { maximiseProcess, type AxisPosition } from './search.js';

// The results types live in fit-results.ts (so fit-configurations.ts and the interval methods need not import this file); re-exported for the code that imports them from here.
export { unfittedFit, type FitOptions, type ModelFit, type ParameterEstimate, type SearchProgress } from './fit-results.js';

/** How a flag saying that a model's intervals fell back to another method starts (the CLI prints these as `interval-fallback` warnings). */
export const intervalFallbackPrefix = 'intervals by the plain profile likelihood';

/** Half the 95% chi-square(1) quantile: the profile drop that defines a 95% interval. */
export const profileDrop = chiSquare1At95 / 2;

/**
 * Fit one model to one lineage by maximum likelihood: location parameters by
 * exact GLS, process parameters by the nested search, then 95%
 * profile-likelihood intervals for every parameter (maximising over all the
 * others, cut-off logL_max - 1.92 from the chi-square(1) 95% quantile).
 *
 * Never throws for legal data: a model that cannot be fitted comes back with
 * converged = false and a message.
 *
 * @example
 * // Strict stasis with unit sampling variances: the ML mean is the average 2, logL = -ln 2 pi - 1, and the
 * // profile interval is 2 ± 1.959964 × sqrt(1/2) (closed forms: the profile of a normal mean is exactly quadratic).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const fit = fitModel(strictStasis, lineage);
 * fit.logLik; // -2.8378770664093453 (to 1e-12)
 * fit.parameters.stasis_mean.estimate; // 2 (to 1e-12)
 * fit.parameters.stasis_mean.lower; // 0.6140961756503224 (to 1e-9)
 */
export function fitModel(model: EvolutionModel, lineage: Lineage, options: FitOptions = {}): ModelFit {
  const scaling = standardScaling(model, lineage);
  if (scaling === null) return fitStandardised(model, lineage, options);
  return scaleFitBack(model, lineage, scaling, fitStandardised(model, scaling.lineage, options));
}

/** How {@link fitModel} rescaled a lineage: trait values divided by `trait`, times by `time`. */
interface StandardScaling {
  readonly trait: number;
  readonly time: number;
  readonly lineage: Lineage;
}

/**
 * The fit is made on standardised data (issues 23 and 25): elapsed time
 * divided by the lineage's span and the trait by the square root of its
 * variance scale (the larger of the spread of the means and the average
 * sampling variance), then reported in the user's units. Every search
 * range, grid, tolerance and root finder then works on numbers of order 1,
 * so the answer does not depend on the units (trait in mm² or m², ages in
 * ka or Ma) beyond rounding, and times of any accepted magnitude (1e-15 or
 * 1e14) fit like any other. Null when there is nothing to rescale, or when
 * the model has a searched axis that is not one of its parameters (its unit
 * unknown).
 */
function standardScaling(model: EvolutionModel, lineage: Lineage): StandardScaling | null {
  // An axis a signed parameter is searched through (`searchedAs`) is unit-free.
  if (!model.process.every((axis) => model.parameters.some((spec) => spec.name === axis.name || spec.searchedAs?.axis === axis.name))) return null;
  // One standardised copy per lineage for all the models fitted to it (issue 14): the same numbers, and the
  // caches kept per time array (time span, variance scale, ou's exponentials) then serve every model.
  let kept = standardisedLineages.get(lineage);
  if (kept === undefined) {
    kept = standardise(lineage);
    standardisedLineages.set(lineage, kept);
  }
  return kept;
}

const standardisedLineages = new WeakMap<Lineage, StandardScaling | null>();

/** The scaling of {@link standardScaling}, whatever the model. */
function standardise(lineage: Lineage): StandardScaling | null {
  const size = lineage.mean.length;
  if (size < 2) return null;
  // The largest elapsed time (the last one for one section; a lineage of several sections restarts its time).
  let span = 0;
  for (let i = 0; i < size; i++) span = Math.max(span, Math.abs(lineage.time[i]));
  const variance = varianceScale(lineage);
  const trait = Number.isFinite(variance) && variance > 0 ? Math.sqrt(variance) : 1;
  const time = Number.isFinite(span) && span > 0 ? span : 1;
  if (trait === 1 && time === 1) return null;
  const traitSquared = trait * trait;
  return {
    trait,
    time,
    lineage: {
      ...lineage,
      time: Float64Array.from(lineage.time, (value) => value / time),
      mean: Float64Array.from(lineage.mean, (value) => value / trait),
      withinVariance: Float64Array.from(lineage.withinVariance, (value) => value / traitSquared),
      samplingVariance: Float64Array.from(lineage.samplingVariance, (value) => value / traitSquared),
    },
  };
}

/** Units of the quantities a fit reports that are not among the model's parameters: half_life, and what the parameters' `runaway` says. */
function otherUnits(model: EvolutionModel): Record<string, { trait: number; time: number }> {
  const units: Record<string, { trait: number; time: number }> = { half_life: { trait: 0, time: 1 } };
  for (const spec of model.parameters) if (spec.runaway) units[spec.runaway.derived] = spec.runaway.unit;
  return units;
}

/** A fit made on standardised data, in the units of the original lineage (logL with the Jacobian of the trait's scale). */
function scaleFitBack(model: EvolutionModel, lineage: Lineage, scaling: StandardScaling, fit: ModelFit): ModelFit {
  const others = otherUnits(model);
  const factor = (name: string): number => {
    const unit = model.parameters.find((spec) => spec.name === name)?.unit ?? others[name] ?? (/_time$/.test(name) ? { trait: 0, time: 1 } : { trait: 0, time: 0 });
    return scaling.trait ** unit.trait * scaling.time ** unit.time;
  };
  const scaled = (value: number | null, by: number): number | null => (value === null ? null : value * by);
  const estimatesBack = (record: Readonly<Record<string, ParameterEstimate>>): Record<string, ParameterEstimate> =>
    Object.fromEntries(
      Object.entries(record).map(([name, estimate]) => {
        const by = factor(name);
        return [name, { ...estimate, estimate: scaled(estimate.estimate, by), lower: scaled(estimate.lower, by), upper: scaled(estimate.upper, by) }];
      }),
    );
  const process = fit.process.map((value, level) => (level < model.process.length ? value * factor(model.process[level].name) : value));
  const extra = fit.extra && Array.isArray(fit.extra.shifts)
    ? { ...fit.extra, shifts: shiftRecords(lineage, (fit.extra.shifts as Array<{ index: number }>).map((record) => record.index)) }
    : fit.extra;
  return {
    ...fit,
    logLik: fit.logLik - lineage.mean.length * Math.log(scaling.trait),
    parameters: estimatesBack(fit.parameters),
    derived: estimatesBack(fit.derived),
    process: fit.converged ? process : fit.process,
    estimates: Object.fromEntries(Object.entries(fit.estimates).map(([name, value]) => [name, value * factor(name)])),
    ...(extra === undefined ? {} : { extra }),
  };
}

/** The bootstrap intervals' refit of each replicate (handed to `replaceIntervals`, which cannot import this file). */
const refitWithoutIntervals = (model: EvolutionModel, lineage: Lineage): ModelFit => fitModel(model, lineage, { intervals: false });

/** {@link fitModel} on the lineage as given (standardised by the caller). */
function fitStandardised(model: EvolutionModel, lineage: Lineage, options: FitOptions): ModelFit {
  const size = lineage.mean.length;
  if (size < model.minimumHorizons) {
    return unfittedFit(model, lineage, `needs at least ${model.minimumHorizons} horizons, has ${size}`);
  }
  const unavailable = model.unavailable?.(lineage);
  if (unavailable) return unfittedFit(model, lineage, unavailable);
  // Models with discrete configurations (shift positions): exhaustive loop over them (fit-configurations.ts).
  if (model.configurations) return fitOverConfigurations(model, lineage, options, fitStandardised);
  const evaluator = new LikelihoodEvaluator(model, lineage);
  try {
    return fitWithEvaluator(model, lineage, options, evaluator);
  } finally {
    evaluator.release();
  }
}

/** The body of {@link fitStandardised} for a model without configurations, on its evaluator. */
function fitWithEvaluator(model: EvolutionModel, lineage: Lineage, options: FitOptions, evaluator: LikelihoodEvaluator): ModelFit {
  const size = lineage.mean.length;
  const evaluate = (process: number[]): number => evaluator.profile(process);
  // Models that give their state space's derivatives are searched with the analytic gradient (ou; issue 14).
  const slopes = new Float64Array(model.process.length);
  const gradient = evaluator.hasScore ? (process: number[]): Float64Array => (evaluator.profileScore(process, slopes), slopes) : undefined;
  const maximum = maximiseProcess(evaluate, model.process, lineage, { points: options.gridPoints, polish: true, gradient });
  if (!Number.isFinite(maximum.logLik)) {
    // Probe at an interior point to tell a singular covariance from a likelihood that is merely not finite.
    const probe = model.process.map((axis) => {
      const [lower, upper] = axis.range(lineage, []);
      return Math.sqrt(lower * upper);
    });
    const singular = evaluator.whiten(probe).singular;
    return unfittedFit(
      model,
      lineage,
      singular
        ? 'not fitted: the covariance is singular (a horizon where the model has no process variance also has zero sampling variance)'
        : 'not fitted: the likelihood is not finite anywhere in the search range',
    );
  }
  const details = evaluator.details(maximum.process);
  const estimates = model.toParameters(details.coefficients, maximum.process, lineage);
  const flags: string[] = [];
  const boundOf = (name: string): string | null => {
    const axisIndex = axisIndexOf(model, name);
    if (axisIndex < 0) return null;
    return positionName(model, axisIndex, maximum.positions[axisIndex]);
  };
  for (const spec of model.parameters) {
    const bound = boundOf(spec.name);
    if (bound) flags.push(`${spec.name} at ${bound === 'zero' ? 'its bound 0' : `the ${bound} limit`}`);
  }
  const parameters: Record<string, ParameterEstimate> = {};
  const wantIntervals = options.intervals ?? true;
  const requested = wantIntervals ? (options.intervalMethod ?? 'profile') : 'none';
  const cutoff = maximum.logLik - profileDrop;
  /** Every parameter with plain profile ends (`withEnds`) or with none yet. */
  const plainIntervals = (withEnds: boolean): void => {
    for (const spec of model.parameters) {
      const estimate = estimates[spec.name];
      const atBound = boundOf(spec.name);
      const finite = Number.isFinite(estimate);
      const wanted = !options.intervalParameters || options.intervalParameters.includes(spec.name);
      if (!withEnds || !finite || !wanted) {
        parameters[spec.name] = { estimate: finite ? estimate : null, lower: null, upper: null, atBound, lowerAtBound: false, upperAtBound: false };
        continue;
      }
      const axisIndex = axisIndexOf(model, spec.name);
      const interval = axisIndex >= 0
        ? parameterEnds(spec, lineage, processInterval(evaluate, model, lineage, maximum.process, axisIndex, cutoff, gradient))
        : locationInterval(evaluator, spec.name, estimate, maximum.process, cutoff, options.gridPoints);
      parameters[spec.name] = { estimate, atBound, ...interval };
    }
  };
  // Another interval method replaces every end (replaceIntervals), so plain profile ends are only made when asked for.
  plainIntervals(requested === 'profile');
  let intervalMethod: string = requested;
  if (intervalMethod !== 'profile' && intervalMethod !== 'none') {
    // The method actually used: 'integrated' falls back to 'adjusted' for models with several process parameters.
    const replaced = replaceIntervals(intervalMethod as Exclude<IntervalMethod, 'profile'>, evaluator, estimates, parameters, processInterval, { ...options, refit: refitWithoutIntervals });
    intervalMethod = replaced.method;
    let fallback = replaced.fallback;
    const stray = fallback === null ? strayIntervals(parameters) : [];
    // Intervals that leave out their own estimate describe another fit (ou's restricted maximum at the opposite limit, issue 18): the plain profile describes this one.
    if (stray.length > 0) fallback = strayReason(intervalMethod, stray);
    if (fallback !== null) {
      flags.push(`${intervalFallbackPrefix}: ${fallback}`);
      plainIntervals(true);
      intervalMethod = 'profile';
    }
  }
  const derived = derivedEstimates(model, parameters, details.coefficients);
  return {
    id: model.id,
    label: model.labelFor?.(estimates) ?? model.label,
    k: model.parameterCount(lineage),
    horizons: size,
    logLik: maximum.logLik,
    converged: true,
    message: null,
    parameters,
    derived,
    process: maximum.process,
    estimates,
    flags,
    intervalMethod,
    evaluations: evaluator.evaluations,
  };
}

/**
 * The quantities a fit derives from its parameters, as the model's
 * parameters declare them: at the zero limit of the first process axis,
 * each `runaway` parameter's finite coefficient (ou: `limit_drift`, the
 * drift (optimum − a)·alpha of the directional walk ou equals there); and
 * `half_life` = ln 2 / value of a `halfLife` parameter, its interval the
 * parameter's mapped (an open end where the parameter reaches its limit).
 */
function derivedEstimates(model: EvolutionModel, parameters: Readonly<Record<string, ParameterEstimate>>, coefficients: ArrayLike<number>): Record<string, ParameterEstimate> {
  const derived: Record<string, ParameterEstimate> = {};
  const first = model.process[0] ? parameters[model.process[0].name] : undefined;
  for (const spec of model.parameters) {
    const runaway = spec.runaway;
    if (runaway && first && first.estimate === 0) {
      derived[runaway.derived] = { estimate: coefficients[runaway.coefficient], lower: null, upper: null, atBound: runaway.limit, lowerAtBound: false, upperAtBound: false };
    }
  }
  for (const spec of model.parameters) {
    const rate = spec.halfLife ? parameters[spec.name] : undefined;
    if (!rate) continue;
    const halfLife = (value: number | null): number | null => (value === null ? null : value > 0 ? Math.LN2 / value : null);
    derived.half_life = {
      estimate: halfLife(rate.estimate),
      lower: rate.upperAtBound ? 0 : halfLife(rate.upper),
      upper: rate.lowerAtBound ? null : halfLife(rate.lower),
      atBound: rate.atBound,
      lowerAtBound: rate.upperAtBound,
      upperAtBound: rate.lowerAtBound,
    };
  }
  return derived;
}

function positionName(model: EvolutionModel, axisIndex: number, position: AxisPosition): string | null {
  const axis = model.process[axisIndex];
  if (position === 'zero') return axis.limitNames?.[0] ?? 'zero';
  if (position === 'range-lower') return axis.limitNames?.[0] ?? 'zero';
  if (position === 'range-upper') return axis.limitNames?.[1] ?? 'search-upper-end';
  return null;
}

type IntervalEnds = Pick<ParameterEstimate, 'lower' | 'upper' | 'lowerAtBound' | 'upperAtBound'>;

/**
 * Profile interval of a process parameter: hold it at trial values (on a log
 * scale), maximise over the other process parameters, and find where the
 * profile crosses the cut-off. The bound 0 (or the lower limit) counts as
 * reached when the profile there is still above the cut-off.
 *
 * @param gradient the gradient of `evaluate` in the process values (`profileScore` for the plain profile,
 *   `restrictedScore` for the adjusted one; `scoreOf` in intervals.ts), when the model has state-space
 *   derivatives: each trial's search over the other process axes then refines its grid by the slope
 *   (`SearchOptions.gradient`), the same ends in fewer filter passes (issue 14)
 *
 * @example
 * // Nearly exact means with increments 1, 2, 1: the walk's profile is c - 1.5 ln q - 3/q (closed form, maximum at q = 2);
 * // the 95% ends are where it falls chi2(1; 0.95)/2 = 1.920729410347062 below the maximum.
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [1e-12, 1e-12, 1e-12, 1e-12] });
 * const evaluator = new LikelihoodEvaluator(randomWalk, lineage);
 * const ends = processInterval((process) => evaluator.profile(process), randomWalk, lineage, [2], 0, evaluator.profile([2]) - 1.920729410347062);
 * -1.5 * Math.log(ends.lower) - 3 / ends.lower + 1.5 * Math.log(2) + 1.5; // -1.920729410347062 (to 1e-8)
 * -1.5 * Math.log(ends.upper) - 3 / ends.upper + 1.5 * Math.log(2) + 1.5; // -1.920729410347062 (to 1e-8)
 */
export function processInterval(
  evaluate: (process: number[]) => number,
  model: EvolutionModel,
  lineage: Lineage,
  best: readonly number[],
  axisIndex: number,
  cutoff: number,
  gradient?: (process: number[]) => ArrayLike<number>,
): IntervalEnds {
  const axis = model.process[axisIndex];
  const others = model.process.length > 1;
  const profileAt = (value: number): number => {
    if (!others) {
      const process = [...best];
      process[axisIndex] = value;
      return evaluate(process);
    }
    // With the gradient the grid's cells are refined by the slope (search.ts); the grid itself, which keeps each
    // trial's maximum global, is the same. (A trial started from its neighbour's maximum with a coarser guard grid
    // was tried and dropped: DEVELOPERS.md, "Process-parameter interval ends".)
    return maximiseProcess(evaluate, model.process, lineage, { fixed: new Map([[axisIndex, value]]), points: 12, gradient }).logLik;
  };
  const [rangeLower, rangeUpper] = axis.range(lineage, best.slice(0, axisIndex));
  const estimate = best[axisIndex];
  const gap = (logValue: number): number => profileAt(Math.exp(logValue)) - cutoff;
  // Each end by profileCrossing (root-find.ts) on the ln scale: first trial a factor 4 from the estimate, then quadratic steps
  // aimed past the cut-off and Brent on the bracket (issue 14b; the same ends as stepping out by factors of 4, with fewer trials).
  const atBest = evaluate([...best]) - cutoff;
  // Lower end.
  let lower: number | null;
  let lowerAtBound = false;
  const lowestValue = axis.allowZero ? 0 : rangeLower;
  const lowerBound = axis.allowZero ? 0 : axis.limitNames?.[0] ? 0 : rangeLower;
  if (estimate <= rangeLower * (1 + 1e-8) || profileAt(lowestValue) >= cutoff) {
    lower = lowerBound;
    lowerAtBound = true;
  } else {
    const from = Math.log(estimate);
    const root = profileCrossing(gap, from, atBest, Math.max(Math.log(rangeLower), from - Math.LN2 * 2), { tolerance: 1e-10, limit: Math.log(rangeLower), maxSteps: 80 });
    if (root !== null) lower = Math.exp(root);
    else {
      lower = axis.allowZero ? 0 : rangeLower;
      lowerAtBound = true;
    }
  }
  // Upper end: search beyond the range for variances; alpha's range end is its limit.
  let upper: number | null;
  let upperAtBound = false;
  const ceiling = axis.limitNames?.[1] ? Math.log(rangeUpper) : Math.log(rangeUpper) + Math.log(1e6);
  if (estimate >= rangeUpper * (1 - 1e-8) && axis.limitNames?.[1]) {
    upper = null;
    upperAtBound = true;
  } else {
    const from = estimate > 0 ? Math.log(estimate) : Math.log(rangeLower);
    const root = profileCrossing(gap, from, atBest, Math.min(ceiling, from + Math.LN2 * 2), { tolerance: 1e-10, limit: ceiling, maxSteps: 200 });
    if (root !== null) upper = Math.exp(root);
    else {
      upper = null;
      upperAtBound = true;
    }
  }
  return { lower, upper, lowerAtBound, upperAtBound };
}

/**
 * Profile interval of a location parameter: the values where the profile
 * (the other location parameters by GLS, the process parameters maximised)
 * stays above the cut-off, each end as one maximisation over the process
 * values ({@link locationEndsBySupremum}), started at the maximum.
 */
function locationInterval(
  evaluator: LikelihoodEvaluator,
  name: string,
  estimate: number,
  best: readonly number[],
  cutoff: number,
  gridPoints: number | undefined,
): IntervalEnds {
  const scale = locationScale(evaluator, name, best, estimate);
  // The side the trend limit opens (openTowardTrendLimit) is known first and not searched.
  const open = trendLimitSide(evaluator, name, cutoff, false);
  return locationEndsBySupremum(evaluator, name, false, cutoff, best, estimate, scale, open, Math.min(gridPoints ?? 12, 12));
}
