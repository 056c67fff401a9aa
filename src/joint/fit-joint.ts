import { aicc, akaikeWeights, lowestCriterion } from '../fit/model-choice.js';
import { brentMaximize, nelderMead } from '../fit/optimise.js';
import {
  covarianceParameterCount,
  jointDesign,
  jointDynamics,
  locationsPerTrait,
  parameterCount,
  type JointModel,
} from './joint-models.js';
import { profileIntervals, type JointInterval, type JointIntervals } from './joint-intervals.js';
import { profileFromWhitened, whitenJoint, type JointData, type JointProfile } from './vector-filter.js';

/**
 * Lowest log variance (and log Cholesky diagonal, times 2) searched, on the
 * standardised scale (trait sd 1, time span 1): a variance of e^-30 ≈ 1e-13
 * of the trait's spread is 0 to double precision in every likelihood here.
 */
const lowestLogVariance = -30;
const highestLogVariance = 12;
/** Below this (standardised) a variance or Cholesky diagonal is reported at the bound 0. */
const zeroVariance = 1e-9;

/** The fitted parameters of one joint model in the user's units, arrays in the group's trait order. */
export interface JointParameters {
  readonly ancestral_mean: number[] | null;
  readonly drift: number[] | null;
  readonly step_covariance: number[][] | null;
  readonly step_correlation: (number | null)[][] | null;
  readonly stasis_mean: number[] | null;
  readonly stasis_covariance: number[][] | null;
  readonly optimum: (number | null)[] | null;
  readonly alpha: number[] | null;
}

/** One joint model fitted to one group. */
export interface JointModelFit {
  readonly id: string;
  readonly label: string;
  readonly k: number;
  /** Maximised logL, or null when not fitted. */
  readonly logLik: number | null;
  readonly parameters: JointParameters | null;
  /** 95% profile-likelihood intervals in the layout of `parameters`, or null (not asked for, or not fitted). */
  readonly intervals: JointIntervals | null;
  /** Where an estimate sits at a bound or limit, in words (also sent to the warning channel by the caller). */
  readonly flags: string[];
  /** Why the model was not fitted, when it was not. */
  readonly message: string | null;
  /**
   * The optimiser's unconstrained process values on the standardised scale
   * (for simulation and refits); empty when not fitted.
   */
  readonly process: number[];
}

/** A joint model fit with its place in the model choice. */
export interface RankedJointFit extends JointModelFit {
  readonly aicc: number | null;
  readonly deltaAicc: number | null;
  readonly weight: number | null;
  readonly notCompared: string | null;
}

/** The standardisation of a group: trait centres and scales, the time span. */
interface Scaling {
  readonly centre: number[];
  readonly scale: number[];
  readonly span: number;
}

function scalingOf(data: JointData): Scaling {
  const k = data.traits;
  const centre: number[] = [];
  const scale: number[] = [];
  for (let j = 0; j < k; j++) {
    const values: number[] = [];
    for (let i = 0; i < data.time.length; i++) {
      const value = data.values[i * k + j];
      if (!Number.isNaN(value)) values.push(value);
    }
    const mean = values.reduce((sum, value) => sum + value, 0) / values.length;
    const spread = Math.sqrt(values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / Math.max(values.length - 1, 1));
    centre.push(mean);
    scale.push(spread > 0 && Number.isFinite(spread) ? spread : 1);
  }
  const span = data.time[data.time.length - 1] - data.time[0];
  return { centre, scale, span: span > 0 ? span : 1 };
}

function standardise(data: JointData, scaling: Scaling): JointData {
  const k = data.traits;
  const values = Float64Array.from(data.values, (value, index) => (value - scaling.centre[index % k]) / scaling.scale[index % k]);
  const sampling = Float64Array.from(data.sampling, (value, index) => {
    const within = index % (k * k);
    return value / (scaling.scale[Math.floor(within / k)] * scaling.scale[within % k]);
  });
  return { traits: k, time: Float64Array.from(data.time, (t) => t / scaling.span), values, sampling };
}

/** Process values → covariance (k × k, row-major) and alphas, on the standardised scale. */
function processParts(model: JointModel, k: number, process: readonly number[]): { covariance: Float64Array; alpha: number[] | null; factorDiagonal: number[] } {
  const covariance = new Float64Array(k * k);
  const factorDiagonal: number[] = [];
  const clamp = (value: number): number => Math.min(Math.max(value, lowestLogVariance), highestLogVariance);
  if (model.correlated) {
    const factor = new Float64Array(k * k);
    let at = 0;
    for (let j = 0; j < k; j++) {
      for (let l = 0; l <= j; l++) {
        const value = process[at++];
        factor[j * k + l] = j === l ? Math.exp(clamp(value) / 2) : value;
      }
      factorDiagonal.push(factor[j * k + j]);
    }
    for (let j = 0; j < k; j++) {
      for (let l = 0; l <= j; l++) {
        let sum = 0;
        for (let p = 0; p <= l; p++) sum += factor[j * k + p] * factor[l * k + p];
        covariance[j * k + l] = sum;
        covariance[l * k + j] = sum;
      }
    }
  } else {
    for (let j = 0; j < k; j++) {
      covariance[j * k + j] = Math.exp(clamp(process[j]));
      factorDiagonal.push(Math.sqrt(covariance[j * k + j]));
    }
  }
  const count = covarianceParameterCount(model, k);
  const alpha = model.process === 'ou' ? Array.from({ length: k }, (_, j) => Math.exp(process[count + j])) : null;
  return { covariance, alpha, factorDiagonal };
}

/**
 * The profile logL (GLS over the locations) of a model at process values, on standardised data; null when not defined.
 *
 * @example
 * const time = [0, 1, 2, 3, 4, 5];
 * const x = [0, 0.5, 0.2, 1.1, 1.6, 1.2];
 * const y = [1, 1.4, 1.1, 1.9, 2.6, 2.0];
 * const data = { traits: 2, time: Float64Array.from(time), values: Float64Array.from(time.flatMap((_, i) => [x[i], y[i]])), sampling: Float64Array.from(time.flatMap(() => [0.01, 0, 0, 0.01])) };
 * jointProfileAt(jointModel('independent-random-walks'), data, [0, 0]).logLik; // -8.124993274207071 (to 1e-9; unit step variances, locations by GLS)
 */
export function jointProfileAt(model: JointModel, data: JointData, process: readonly number[]): JointProfile | null {
  const { covariance, alpha } = processParts(model, data.traits, process);
  const whitened = whitenJoint(data, jointDynamics(model, data, covariance, alpha), jointDesign(model, data, alpha));
  return whitened ? profileFromWhitened(whitened) : null;
}

/** Search range of ln alpha on the standardised time scale (span 1): alpha·span from 1e-5 to alpha·shortest interval 40, as the single-trait ou. */
function alphaRange(data: JointData): [number, number] {
  let shortest = Number.POSITIVE_INFINITY;
  for (let i = 1; i < data.time.length; i++) shortest = Math.min(shortest, data.time[i] - data.time[i - 1]);
  return [Math.log(1e-5), Math.log(40 / shortest)];
}

/** The data of one trait of a group (k = 1), for the starting values of the independent models. */
function traitData(data: JointData, j: number): JointData {
  const k = data.traits;
  const horizons = data.time.length;
  return {
    traits: 1,
    time: data.time,
    values: Float64Array.from({ length: horizons }, (_, i) => data.values[i * k + j]),
    sampling: Float64Array.from({ length: horizons }, (_, i) => data.sampling[i * k * k + j * k + j]),
  };
}

/** Maximise a one-trait model's profile over its process values (ln variance; ou: ln alpha too). */
function fitOneTrait(model: JointModel, data: JointData): number[] {
  const single = { ...model, correlated: false };
  const logLik = (process: readonly number[]): number => jointProfileAt(single, data, process)?.logLik ?? Number.NEGATIVE_INFINITY;
  if (model.process !== 'ou') {
    const best = brentMaximize((value) => logLik([value]), lowestLogVariance, highestLogVariance);
    // Brent on a unimodal-looking curve can stop in a local maximum: compare with a coarse grid.
    let start = best.at;
    let value = best.value;
    for (let grid = lowestLogVariance; grid <= highestLogVariance; grid += 2) {
      const at = logLik([grid]);
      if (at > value + 1e-9) {
        const refined = brentMaximize((x) => logLik([x]), Math.max(grid - 2, lowestLogVariance), Math.min(grid + 2, highestLogVariance));
        if (refined.value > value) {
          start = refined.at;
          value = refined.value;
        }
      }
    }
    return [start];
  }
  const [low, high] = alphaRange(data);
  let best: number[] = [0, Math.log(0.5)];
  let bestValue = Number.NEGATIVE_INFINITY;
  const steps = 16;
  for (let g = 0; g <= steps; g++) {
    const logAlpha = low + ((high - low) * g) / steps;
    const inner = brentMaximize((value) => logLik([value, logAlpha]), lowestLogVariance, highestLogVariance);
    if (inner.value > bestValue) {
      bestValue = inner.value;
      best = [inner.at, logAlpha];
    }
  }
  const polished = nelderMead((x) => -logLik([x[0], Math.min(Math.max(x[1], low), high)]), best, { step: [0.5, 0.5] });
  return -polished.value > bestValue ? [polished.at[0], Math.min(Math.max(polished.at[1], low), high)] : best;
}

/** Starting process values of a model: per-trait maxima (diagonal), zero off-diagonal Cholesky entries. */
function startingValues(model: JointModel, data: JointData): number[] {
  const k = data.traits;
  const perTrait = Array.from({ length: k }, (_, j) => fitOneTrait(model, traitData(data, j)));
  const start: number[] = [];
  if (model.correlated) {
    for (let j = 0; j < k; j++) for (let l = 0; l <= j; l++) start.push(j === l ? perTrait[j][0] : 0);
  } else {
    for (let j = 0; j < k; j++) start.push(perTrait[j][0]);
  }
  if (model.process === 'ou') for (let j = 0; j < k; j++) start.push(perTrait[j][1]);
  return start;
}

/** Options of {@link fitJointModel}. */
export interface JointFitOptions {
  /** Starting process values (standardised scale), e.g. the independent model's maximum for its correlated counterpart. */
  readonly start?: readonly number[];
  /** Compute the 95% profile-likelihood intervals (default false). */
  readonly intervals?: boolean;
}

/**
 * Fit one joint model to one group by maximum likelihood: locations by
 * exact GLS, process values (log variances or a Cholesky factor with log
 * diagonal, and ln alpha for ou) by Nelder–Mead from per-trait maxima, on
 * data standardised per trait (centre and sd of its means) and time divided
 * by its span; every estimate is converted back and logL is given in the
 * user's units (minus the sum over observed values of ln scale_j).
 *
 * @example
 * // Independent random walks with diagonal sampling covariances: the joint logL is the sum of the two
 * // single-trait random walks' maxima (the likelihood factorises by trait), a check against the scalar fitter.
 * const time = [0, 1, 2, 3, 4, 5];
 * const x = [0, 0.5, 0.2, 1.1, 1.6, 1.2];
 * const y = [1, 1.4, 1.1, 1.9, 2.6, 2.0];
 * const data = { traits: 2, time: Float64Array.from(time), values: Float64Array.from(time.flatMap((_, i) => [x[i], y[i]])), sampling: Float64Array.from(time.flatMap(() => [0.01, 0, 0, 0.01])) };
 * const joint = fitJointModel(jointModel('independent-random-walks'), data);
 * const single = (mean) => fitModel(randomWalk, lineageFromArrays({ time, mean, samplingVariance: Array(6).fill(0.01) })).logLik;
 * joint.logLik; // -5.807239873520929 (to 1e-9)
 * Math.abs(joint.logLik - (single(x) + single(y))) < 1e-9; // true
 * joint.parameters.step_covariance[0][0]; // 0.28663918 (to 1e-6; the first trait's random-walk step variance)
 */
export function fitJointModel(model: JointModel, data: JointData, options: JointFitOptions = {}): JointModelFit {
  const k = data.traits;
  const count = parameterCount(model, k);
  const unfitted = (message: string): JointModelFit => ({ id: model.id, label: model.label, k: count, logLik: null, parameters: null, intervals: null, flags: [], message, process: [] });
  const scaling = scalingOf(data);
  const standard = standardise(data, scaling);
  const [lowAlpha, highAlpha] = model.process === 'ou' ? alphaRange(standard) : [0, 0];
  const covarianceCount = covarianceParameterCount(model, k);
  const bounded = (x: readonly number[]): number[] => x.map((value, index) => (index >= covarianceCount ? Math.min(Math.max(value, lowAlpha), highAlpha) : value));
  const logLik = (x: readonly number[]): number => jointProfileAt(model, standard, bounded(x))?.logLik ?? Number.NEGATIVE_INFINITY;
  const candidates: number[][] = [startingValues(model, standard), ...gridStarts(model, k, lowAlpha, highAlpha)];
  if (options.start) candidates.push([...options.start]);
  // A diagonal model with diagonal sampling covariance separates by trait: the per-trait maxima are the joint one.
  const separable = !model.correlated && diagonalSampling(standard);
  const scored = candidates.map((start) => ({ start, value: logLik(start) })).sort((left, right) => right.value - left.value);
  let best = scored[0].start;
  let bestValue = scored[0].value;
  if (separable) {
    best = candidates[0];
    bestValue = logLik(best);
  } else {
    // The likelihood surface can have several maxima: search from the per-trait start, the given start and the best grid starts.
    const starts = [candidates[0], ...(options.start ? [[...options.start]] : []), ...scored.slice(0, 3).map((entry) => entry.start)];
    for (const start of starts) {
      let at = start;
      let value = logLik(at);
      for (let round = 0; round < 3; round++) {
        const searched = nelderMead((x) => -logLik(x), at, { step: at.map(() => 0.5), maxEvaluations: 4000 * at.length });
        if (-searched.value > value + 1e-10) {
          value = -searched.value;
          at = bounded(searched.at);
        } else break;
      }
      if (value > bestValue) {
        bestValue = value;
        best = at;
      }
    }
  }
  const profile = jointProfileAt(model, standard, bounded(best));
  if (!profile || !Number.isFinite(profile.logLik)) {
    return unfitted('not fitted: the covariance of the observed means is singular for these data (e.g. a walk whose first horizon has zero sampling variance)');
  }
  let logScale = 0;
  for (let i = 0; i < data.time.length; i++) {
    for (let j = 0; j < k; j++) if (!Number.isNaN(data.values[i * k + j])) logScale += Math.log(scaling.scale[j]);
  }
  const parts = processParts(model, k, bounded(best));
  const flags: string[] = [];
  const variance: number[][] = Array.from({ length: k }, (_, j) => Array.from({ length: k }, (_, l) => parts.covariance[j * k + l] * scaling.scale[j] * scaling.scale[l] / (model.process === 'stasis' ? 1 : scaling.span)));
  const covarianceName = model.process === 'stasis' ? 'stasis_covariance' : 'step_covariance';
  parts.factorDiagonal.forEach((diagonal, j) => {
    if (diagonal * diagonal < zeroVariance) {
      flags.push(model.correlated
        ? `${covarianceName}: at the boundary of positive semi-definite matrices (Cholesky diagonal ${j + 1} at 0): a combination of the traits does not ${model.process === 'stasis' ? 'fluctuate' : 'change'} beyond what earlier traits explain`
        : `${covarianceName}[${j + 1}][${j + 1}] at the bound 0`);
    }
  });
  const alpha = parts.alpha ? parts.alpha.map((value) => value / scaling.span) : null;
  const alphaAtLow = parts.alpha ? parts.alpha.map((value) => Math.log(value) <= lowAlpha + 1e-6) : [];
  if (parts.alpha) {
    parts.alpha.forEach((value, j) => {
      if (alphaAtLow[j]) flags.push(`alpha[${j + 1}] at its lower limit (the random-walk limit): optimum[${j + 1}] is not identifiable and reported as null`);
      else if (Math.log(value) >= highAlpha - 1e-6) flags.push(`alpha[${j + 1}] at its upper limit (the stasis-like limit)`);
    });
  }
  const per = locationsPerTrait(model);
  const location = (j: number, which: 0 | 1): number => profile.coefficients[j * per + which];
  const back = (j: number, value: number): number => scaling.centre[j] + scaling.scale[j] * value;
  const correlation = variance.map((row, j) => row.map((value, l) => {
    const denominator = Math.sqrt(variance[j][j] * variance[l][l]);
    return denominator > 0 ? Math.max(-1, Math.min(1, value / denominator)) : null;
  }));
  const parameters: JointParameters = {
    ancestral_mean: model.process === 'stasis' ? null : Array.from({ length: k }, (_, j) => back(j, location(j, 0))),
    drift: model.mean === 'drift' ? Array.from({ length: k }, (_, j) => (location(j, 1) * scaling.scale[j]) / scaling.span) : null,
    step_covariance: model.process === 'stasis' ? null : variance,
    step_correlation: model.process === 'stasis' ? null : correlation,
    stasis_mean: model.process === 'stasis' ? Array.from({ length: k }, (_, j) => back(j, location(j, 0))) : null,
    stasis_covariance: model.process === 'stasis' ? variance : null,
    optimum: model.mean === 'ou' ? Array.from({ length: k }, (_, j) => (alphaAtLow[j] ? null : back(j, location(j, 1)))) : null,
    alpha,
  };
  let intervals: JointIntervals | null = null;
  if (options.intervals) {
    const found = profileIntervals(model, standard, { covariance: parts.covariance, alpha: parts.alpha, locations: profile.coefficients, logLik: profile.logLik, alphaRange: [lowAlpha, highAlpha] });
    const varianceUnit = (j: number, l: number): number => (scaling.scale[j] * scaling.scale[l]) / (model.process === 'stasis' ? 1 : scaling.span);
    const scaled = (interval: JointInterval, factor: number, shift = 0): JointInterval => ({
      lower: interval.lower === null ? null : shift + factor * interval.lower,
      upper: interval.upper === null ? null : shift + factor * interval.upper,
    });
    const locationIntervals = (which: 0 | 1, kind: 'level' | 'rate'): JointInterval[] => Array.from({ length: k }, (_, j) => {
      const interval = found.locations[j * per + which];
      return kind === 'level' ? scaled(interval, scaling.scale[j], scaling.centre[j]) : scaled(interval, scaling.scale[j] / scaling.span);
    });
    const covarianceIntervals = Array.from({ length: k }, (_, j) => Array.from({ length: k }, (_, l) => (j === l ? scaled(found.variances[j], varianceUnit(j, j)) : null)));
    intervals = {
      method: 'profile',
      level: 0.95,
      ancestral_mean: model.process === 'stasis' ? null : locationIntervals(0, 'level'),
      drift: model.mean === 'drift' ? locationIntervals(1, 'rate') : null,
      stasis_mean: model.process === 'stasis' ? locationIntervals(0, 'level') : null,
      // alpha's interval reaching its random-walk limit leaves the optimum unbounded (it can run away as alpha -> 0): open ends.
      optimum: model.mean === 'ou' ? locationIntervals(1, 'level').map((interval, j) => (alphaAtLow[j] || found.alphas?.[j].lower === null ? { lower: null, upper: null } : interval)) : null,
      alpha: found.alphas ? found.alphas.map((interval) => scaled(interval, 1 / scaling.span)) : null,
      step_covariance: model.process === 'stasis' ? null : covarianceIntervals,
      stasis_covariance: model.process === 'stasis' ? covarianceIntervals : null,
      step_correlation: model.process === 'stasis' ? null : found.correlations.map((row, j) => row.map((interval, l) => (j === l || !model.correlated ? null : interval))),
      stasis_correlation: model.process === 'stasis' ? found.correlations.map((row, j) => row.map((interval, l) => (j === l || !model.correlated ? null : interval))) : null,
    };
  }
  return {
    id: model.id,
    label: model.label,
    k: count,
    logLik: profile.logLik - logScale,
    parameters,
    intervals,
    flags,
    message: null,
    process: bounded(best),
  };
}

function diagonalSampling(data: JointData): boolean {
  const k = data.traits;
  for (let index = 0; index < data.sampling.length; index++) {
    const within = index % (k * k);
    if (Math.floor(within / k) !== within % k && data.sampling[index] !== 0) return false;
  }
  return true;
}

/**
 * Coarse starting points: every combination of the log variances -4, -1, 2
 * (standardised scale; zero off-diagonal Cholesky entries) and, for ou, ln
 * alpha at the middle of its range. At most 3^k points (k = 3: 27).
 */
function gridStarts(model: JointModel, k: number, lowAlpha: number, highAlpha: number): number[][] {
  const levels = [-4, -1, 2];
  const starts: number[][] = [];
  const total = levels.length ** k;
  for (let code = 0; code < total; code++) {
    const diagonal = Array.from({ length: k }, (_, j) => levels[Math.floor(code / levels.length ** j) % levels.length]);
    const start: number[] = [];
    if (model.correlated) for (let j = 0; j < k; j++) for (let l = 0; l <= j; l++) start.push(j === l ? diagonal[j] : 0);
    else start.push(...diagonal);
    if (model.process === 'ou') for (let j = 0; j < k; j++) start.push((lowAlpha + highAlpha) / 2);
    starts.push(start);
  }
  return starts;
}

/**
 * The number of observed trait values of a group (N of AICc).
 *
 * @example
 * observedValues({ traits: 2, time: Float64Array.of(0, 1), values: Float64Array.of(1, NaN, 2, 3), sampling: new Float64Array(8) }); // 3
 */
export function observedValues(data: JointData): number {
  let count = 0;
  for (const value of data.values) if (!Number.isNaN(value)) count += 1;
  return count;
}

/**
 * Fit several joint models to one group and rank them by AICc (N = the
 * number of observed trait values) with Akaike weights. A correlated model
 * starts (also) from its independent counterpart's maximum, so its logL is
 * never below that model's (they are nested: R diagonal is a special case).
 *
 * @example
 * const time = [0, 1, 2, 3, 4, 5];
 * const x = [0, 0.5, 0.2, 1.1, 1.6, 1.2];
 * const y = [1, 1.4, 1.1, 1.9, 2.6, 2.0];
 * const data = { traits: 2, time: Float64Array.from(time), values: Float64Array.from(time.flatMap((_, i) => [x[i], y[i]])), sampling: Float64Array.from(time.flatMap(() => [0.01, 0, 0, 0.01])) };
 * const ranked = fitJointModels([jointModel('independent-random-walks'), jointModel('correlated-random-walk')], data);
 * ranked.best; // 'correlated-random-walk'
 * ranked.models.map((model) => model.k); // [4, 5] (2 means + 2 variances; one covariance more)
 * ranked.models[1].logLik >= ranked.models[0].logLik; // true (nested: R diagonal is a special case)
 */
export function fitJointModels(models: readonly JointModel[], data: JointData, options: { intervals?: boolean } = {}): { models: RankedJointFit[]; best: string | null } {
  const fits: JointModelFit[] = [];
  const done = new Map<string, JointModelFit>();
  // Independent models first, so the correlated ones can start from them.
  const order = [...models].sort((left, right) => Number(left.correlated) - Number(right.correlated));
  for (const model of order) {
    const partner = done.get(`${model.process}/${model.mean}`);
    const start = model.correlated && partner && partner.logLik !== null ? diagonalToFactor(partner.process, data.traits, model.process === 'ou') : undefined;
    const fit = fitJointModel(model, data, { start, intervals: options.intervals === true });
    done.set(`${model.process}/${model.mean}`, fit);
    fits.push(fit);
  }
  return rankJointFits(models.map((model) => fits.find((fit) => fit.id === model.id) as JointModelFit), data);
}

/**
 * Rank fits (in the order given) by AICc with N = the number of observed
 * trait values, with Akaike weights and the best model's id.
 *
 * @example
 * const data = { traits: 1, time: Float64Array.of(0, 1, 2, 3, 4, 5), values: new Float64Array(6), sampling: new Float64Array(6) };
 * const fits = [{ id: 'a', k: 2, logLik: -10 }, { id: 'b', k: 2, logLik: -8 }];
 * const ranked = rankJointFits(fits, data);
 * ranked.best; // 'b'
 * ranked.models[0].weight; // 0.11920292202211755 (to 1e-12; exp(-2) / (1 + exp(-2)), ΔAICc = 4)
 */
export function rankJointFits(ordered: readonly JointModelFit[], data: JointData): { models: RankedJointFit[]; best: string | null } {
  const observed = observedValues(data);
  const criteria = ordered.map((fit) => (fit.logLik === null ? null : aicc(fit.logLik, fit.k, observed)));
  const { delta, weight } = akaikeWeights(criteria);
  const ranked = ordered.map((fit, j) => ({
    ...fit,
    aicc: criteria[j],
    deltaAicc: delta[j],
    weight: weight[j],
    notCompared: criteria[j] !== null ? null : fit.logLik === null ? (fit.message ?? 'not fitted') : `not compared: N - K - 1 = ${observed - fit.k - 1} <= 0 (too few observed values for K = ${fit.k})`,
  }));
  const lowest = lowestCriterion(criteria);
  return { models: ranked, best: lowest === -1 ? null : ranked[lowest].id };
}

/**
 * An independent model's process values (k log variances [+ k ln alpha]) as a correlated model's (Cholesky entries with log diagonal).
 *
 * @example
 * diagonalToFactor([1, 2], 2, false); // [1, 0, 2] (log variances on the diagonal of the Cholesky factor, rows l <= j)
 * diagonalToFactor([1, 2, 3, 4], 2, true); // [1, 0, 2, 3, 4] (the ln alphas follow)
 */
export function diagonalToFactor(process: readonly number[], k: number, ou: boolean): number[] {
  const start: number[] = [];
  for (let j = 0; j < k; j++) for (let l = 0; l <= j; l++) start.push(j === l ? process[j] : 0);
  if (ou) for (let j = 0; j < k; j++) start.push(process[k + j]);
  return start;
}
