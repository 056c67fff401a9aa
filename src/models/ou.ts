import type { StateSpace } from '../engine/state-space.js';
import type { Lineage } from '../lineage.js';
import { buildCovariance, timeSpan, varianceScale, type EvolutionModel } from './model.js';

/**
 * (1 - exp(-rate * t)) / rate, equal to t at rate 0 and accurate near it.
 *
 * @example
 * relaxedTime(0, 2); // 2 (the limit at rate 0)
 * relaxedTime(1, 1); // 0.6321205588285577 (to 1e-15; 1 - 1/e)
 */
export function relaxedTime(rate: number, t: number): number {
  return rate === 0 ? t : -Math.expm1(-rate * t) / rate;
}

/** Coefficients of the series of ((1 + x) e^-x - 1) / x^2 in x (the terms (-1)^m (1 - m) / m!, m = 2..10). */
const slopeSeries = [-1 / 2, 1 / 3, -1 / 8, 1 / 30, -1 / 144, 1 / 840, -1 / 5760, 1 / 45360, -1 / 403200];

/**
 * d/d(rate) of {@link relaxedTime}: t^2 ((1 + x) e^-x - 1) / x^2 with x = rate t,
 * -t^2 / 2 at rate 0; by its series below x = 0.1 (truncation below 1e-16
 * relative), else through expm1 (cancellation below 1e-14 relative).
 *
 * @example
 * relaxedTimeSlope(0, 2); // -2 (= -t^2 / 2)
 * relaxedTimeSlope(1, 1); // -0.26424111765711533 (to 1e-14; = 2/e - 1)
 */
export function relaxedTimeSlope(rate: number, t: number): number {
  const x = rate * t;
  if (Math.abs(x) < 0.1) {
    let sum = 0;
    for (let m = slopeSeries.length - 1; m >= 0; m--) sum = sum * x + slopeSeries[m];
    return t * t * sum;
  }
  return (t * t * (Math.expm1(-x) + x * Math.exp(-x))) / (x * x);
}

/**
 * Latent dynamics of ou (and the models built on it): started exactly at the
 * ancestral mean, transition exp(-alpha tau_i), process variance
 * sigma2 (1 - exp(-2 alpha tau_i)) / (2 alpha).
 *
 * @example
 * // alpha = ln 2 over unit steps: transition 1/2, process variance sigma2 (1 - 1/4) / (2 ln 2) (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [0, 0, 0], samplingVariance: [0.1, 0.1, 0.1] });
 * const space = allocateStateSpace(3, 2, lineage.samplingVariance);
 * fillAttractionDynamics(lineage, Math.LN2, 1, space);
 * Array.from(space.transition); // [0, 0.5, 0.5]
 * space.processVariance[1]; // 0.5410106403333613 (to 1e-15; 0.75 / (2 ln 2))
 */
export function fillAttractionDynamics(lineage: Lineage, alpha: number, stepVariance: number, space: StateSpace): void {
  const time = lineage.time;
  space.transition[0] = 0;
  space.processVariance[0] = 0;
  for (let i = 1; i < space.size; i++) {
    const interval = time[i] - time[i - 1];
    space.transition[i] = Math.exp(-alpha * interval);
    space.processVariance[i] = stepVariance * relaxedTime(2 * alpha, interval);
  }
}

/** The alpha-dependent factors of ou's state space over one time axis. */
interface AlphaFactors {
  alpha: number;
  /** exp(-alpha t_i) and (1 - exp(-alpha t_i)) / alpha: the design. */
  readonly decay: Float64Array;
  readonly relaxed: Float64Array;
  /** exp(-alpha dt_i) and (1 - exp(-2 alpha dt_i)) / (2 alpha): transition, process variance per unit step variance. */
  readonly transition: Float64Array;
  readonly varianceTime: Float64Array;
}

/**
 * The factors at the last alpha asked for, per time axis. The searches hold
 * alpha fixed while they vary step_variance (the inner axis), so most fills
 * reuse the exponentials of the previous one: the same numbers, computed once.
 */
const factorsByTime = new WeakMap<Float64Array, AlphaFactors>();

function alphaFactors(time: Float64Array, alpha: number): AlphaFactors {
  let factors = factorsByTime.get(time);
  if (factors === undefined || factors.decay.length !== time.length) {
    const size = time.length;
    factors = { alpha: Number.NaN, decay: new Float64Array(size), relaxed: new Float64Array(size), transition: new Float64Array(size), varianceTime: new Float64Array(size) };
    factorsByTime.set(time, factors);
  } else if (factors.alpha === alpha) return factors;
  for (let i = 0; i < time.length; i++) {
    factors.decay[i] = Math.exp(-alpha * time[i]);
    factors.relaxed[i] = relaxedTime(alpha, time[i]);
    if (i > 0) {
      const interval = time[i] - time[i - 1];
      factors.transition[i] = Math.exp(-alpha * interval);
      factors.varianceTime[i] = relaxedTime(2 * alpha, interval);
    }
  }
  factors.alpha = alpha;
  return factors;
}

/** d/d alpha of the {@link AlphaFactors} at one alpha (the score recursions' inputs; transition and variance per unit step variance). */
interface AlphaSlopes {
  alpha: number;
  readonly decay: Float64Array;
  readonly relaxed: Float64Array;
  readonly transition: Float64Array;
  readonly varianceTime: Float64Array;
}

/** The slopes at the last alpha asked for, per time axis (the searches vary step_variance at fixed alpha, as for the factors). */
const slopesByTime = new WeakMap<Float64Array, AlphaSlopes>();

function alphaSlopes(time: Float64Array, alpha: number): AlphaSlopes {
  let slopes = slopesByTime.get(time);
  if (slopes === undefined || slopes.decay.length !== time.length) {
    const size = time.length;
    slopes = { alpha: Number.NaN, decay: new Float64Array(size), relaxed: new Float64Array(size), transition: new Float64Array(size), varianceTime: new Float64Array(size) };
    slopesByTime.set(time, slopes);
  } else if (slopes.alpha === alpha) return slopes;
  for (let i = 0; i < time.length; i++) {
    slopes.decay[i] = -time[i] * Math.exp(-alpha * time[i]);
    slopes.relaxed[i] = relaxedTimeSlope(alpha, time[i]);
    if (i > 0) {
      const interval = time[i] - time[i - 1];
      slopes.transition[i] = -interval * Math.exp(-alpha * interval);
      slopes.varianceTime[i] = 2 * relaxedTimeSlope(2 * alpha, interval);
    }
  }
  slopes.alpha = alpha;
  return slopes;
}

/**
 * Ranges of alpha searched: alpha * span = 1e-5 (the random-walk limit) to alpha * shortest interval = 40 (the stasis-like limit).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 0.5, 2], mean: [0, 0, 0], samplingVariance: [0.1, 0.1, 0.1] });
 * alphaRange(lineage); // [0.000005, 80] (1e-5 / span 2, 40 / shortest interval 0.5)
 */
export function alphaRange(lineage: Lineage): readonly [number, number] {
  const { span, shortest } = timeSpan(lineage);
  return [1e-5 / span, 40 / shortest];
}

/**
 * Ornstein–Uhlenbeck evolution toward an optimum:
 * mu_i = theta + (a - theta) exp(-alpha t_i),
 * C_ij = sigma2 / (2 alpha) exp(-alpha (t_i + t_j)) (exp(2 alpha min(t_i, t_j)) - 1).
 * Parameters: ancestral_mean a, optimum theta (trait units), alpha (per time
 * unit, >= 0), step_variance sigma2 (trait^2 per time unit, >= 0). Derived:
 * half_life = ln 2 / alpha.
 *
 * The mean is written in the basis exp(-alpha t) and (1 - exp(-alpha t)) / alpha,
 * which spans the same means and tends to (1, t) as alpha -> 0, so the
 * profile likelihood is continuous into the directional-walk limit.
 *
 * Hunt, G., Bell, M. A. & Travis, M. P. (2008). Evolution toward a new
 * adaptive optimum: phenotypic evolution in a fossil stickleback lineage.
 * Evolution 62:700-710. Hansen, T. F. (1997). Stabilizing selection and the
 * comparative analysis of adaptation. Evolution 51:1341-1351.
 */
export const ornsteinUhlenbeck: EvolutionModel = {
  id: 'ou',
  label: 'Ornstein–Uhlenbeck (approach to an optimum)',
  summary: 'The lineage mean is pulled toward an optimum at rate alpha while wandering with step variance; it starts at the ancestral mean.',
  citation: 'Hunt, G., Bell, M. A. & Travis, M. P. (2008). Evolution toward a new adaptive optimum: phenotypic evolution in a fossil stickleback lineage. Evolution 62:700-710.',
  referenceKeys: ['huntBellTravis2008'],
  plainWords: 'the trait mean moved toward an optimum and then stayed near it',
  help: { heading: 'ou', lines: ['Ornstein–Uhlenbeck approach from ancestral_mean to optimum at rate alpha (K = 4)'] },
  limitDrawing: {
    applies: (estimates, derived) => estimates.alpha === 0 && !('optimum' in estimates) && 'limit_drift' in derived,
    drawnAs: 'directional-walk',
    parameters: (estimates, derived) => ({ ancestral_mean: estimates.ancestral_mean, drift: derived.limit_drift, step_variance: estimates.step_variance }),
    words: 'alpha at its limit 0, drawn as the directional walk it equals there',
  },
  parameters: [
    { name: 'ancestral_mean', label: 'ancestral mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    {
      name: 'optimum', label: 'optimum', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY,
      // At alpha = 0 the second coefficient of the mean is the drift (optimum − a)·alpha of the directional walk ou equals there.
      runaway: { coefficient: 1, derived: 'limit_drift', unit: { trait: 1, time: -1 }, limit: 'alpha-zero' },
    },
    { name: 'alpha', label: 'alpha (strength of attraction)', role: 'rate', unit: { trait: 0, time: -1 }, lowerBound: 0, halfLife: true },
    { name: 'step_variance', label: 'step variance', role: 'variance', unit: { trait: 2, time: -1 }, lowerBound: 0, rate: 'step-variance' },
  ],
  process: [
    // alpha = 0 itself is evaluated exactly (the basis and process variance are
    // continuous there), so a supremum at the random-walk / directional-walk
    // limit is reported as that supremum, not as a value near it.
    { name: 'alpha', allowZero: true, range: (lineage) => alphaRange(lineage), limitNames: ['alpha-zero', 'alpha-infinite'] },
    {
      name: 'step_variance',
      allowZero: true,
      range: (lineage, before) => {
        const scale = varianceScale(lineage);
        const { span, shortest } = timeSpan(lineage);
        const alpha = before[0] ?? 0;
        return [(1e-9 * scale) / span, 1e3 * scale * Math.max(1 / shortest, 2 * alpha)];
      },
    },
  ],
  minimumHorizons: 4,
  width: () => 2,
  parameterCount: () => 4,
  fillSpace(lineage, process, space) {
    const stepVariance = process[1];
    const factors = alphaFactors(lineage.time, process[0]);
    space.transition[0] = 0;
    space.processVariance[0] = 0;
    for (let i = 0; i < space.size; i++) {
      space.design[2 * i] = factors.decay[i];
      space.design[2 * i + 1] = factors.relaxed[i];
      if (i > 0) {
        space.transition[i] = factors.transition[i];
        space.processVariance[i] = stepVariance * factors.varianceTime[i];
      }
    }
  },
  // d/d alpha and d/d step_variance of the entries fillSpace writes (for the score recursions, engine/kalman-score.ts).
  fillSpaceDerivatives(lineage, process, derivatives) {
    const stepVariance = process[1];
    const factors = alphaFactors(lineage.time, process[0]);
    const slopes = alphaSlopes(lineage.time, process[0]);
    const [byAlpha, byVariance] = derivatives;
    for (let i = 0; i < lineage.time.length; i++) {
      byAlpha.design[2 * i] = slopes.decay[i];
      byAlpha.design[2 * i + 1] = slopes.relaxed[i];
      byVariance.design[2 * i] = 0;
      byVariance.design[2 * i + 1] = 0;
      if (i === 0) {
        byAlpha.transition[0] = byAlpha.processVariance[0] = byVariance.transition[0] = byVariance.processVariance[0] = 0;
        continue;
      }
      byAlpha.transition[i] = slopes.transition[i];
      byAlpha.processVariance[i] = stepVariance * slopes.varianceTime[i];
      byVariance.transition[i] = 0;
      byVariance.processVariance[i] = factors.varianceTime[i];
    }
  },
  // At alpha = 0 the optimum is not finite (it ran away with (optimum - a) alpha -> drift); it is reported as null.
  toParameters: (coefficients, process) => ({
    ancestral_mean: coefficients[0],
    optimum: process[0] === 0 ? Number.NaN : coefficients[1] / process[0],
    alpha: process[0],
    step_variance: process[1],
  }),
  constantCoefficients: (process) => Float64Array.of(1, process[0]),
  fixLocation: (name, value, process) => (name === 'optimum' ? { index: 1, coefficient: value * process[0] } : { index: 0, coefficient: value }),
  processFrom: (parameters) => [parameters.alpha, parameters.step_variance],
  coefficientsFrom: (parameters) => [parameters.ancestral_mean, parameters.optimum * parameters.alpha],
  meanCovariance(lineage, parameters) {
    const time = lineage.time;
    const { ancestral_mean: start, optimum, alpha, step_variance: stepVariance } = parameters;
    // exp(-alpha (t_i + t_j)) (exp(2 alpha min) - 1) = exp(-alpha |t_i - t_j|) - exp(-alpha (t_i + t_j)), without overflow.
    return {
      mean: Float64Array.from(time, (t) => optimum + (start - optimum) * Math.exp(-alpha * t)),
      covariance: buildCovariance(time.length, (i, j) =>
        (stepVariance / (2 * alpha)) * (Math.exp(-alpha * Math.abs(time[i] - time[j])) - Math.exp(-alpha * (time[i] + time[j])))),
    };
  },
  expectation(parameters, time) {
    const { ancestral_mean: start, optimum, alpha, step_variance: stepVariance } = parameters;
    return {
      mean: Float64Array.from(time, (t) => optimum + (start - optimum) * Math.exp(-alpha * t)),
      variance: Float64Array.from(time, (t) => stepVariance * relaxedTime(2 * alpha, t)),
    };
  },
};
