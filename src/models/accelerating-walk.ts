import type { Lineage } from '../lineage.js';
import { buildCovariance, timeSpan, type EvolutionModel } from './model.js';
import { stepVarianceRange } from './walk-dynamics.js';

/**
 * The searched axis behind rate_change: the growth of the step variance
 * over the lineage, g = exp(rate_change · span), between exp(-40) and
 * exp(40) (our choice, as ou's alpha · shortest interval = 40: a step
 * variance per time unit 2e17 times larger at one end of the sequence than
 * at the other; an estimate there is flagged and its interval open).
 */
const growthEnd = 40;

/**
 * (exp(r t) - 1) / r, the variance accumulated from t = 0 per unit step variance; t at r = 0, exact near it.
 *
 * @example
 * acceleratedTime(0, 2); // 2 (a constant step variance: plain elapsed time)
 * acceleratedTime(Math.log(2), 1); // 1.4426950408889634 (to 1e-15; (2 - 1) / ln 2)
 */
export function acceleratedTime(rate: number, t: number): number {
  return rate === 0 ? t : Math.expm1(rate * t) / rate;
}

/** rate_change from the growth axis g: ln g / span. */
const rateOf = (growth: number, lineage: Lineage): number => Math.log(growth) / timeSpan(lineage).span;

/** Mean multiplier of the step variance over the span, (g - 1) / ln g (1 at g = 1). */
function meanMultiplier(growth: number): number {
  const logGrowth = Math.log(growth);
  return Math.abs(logGrowth) < 1e-12 ? 1 : Math.expm1(logGrowth) / logGrowth;
}

/**
 * An unbiased random walk whose step variance per time unit changes
 * exponentially in time: the step from t_{i-1} to t_i has variance
 * sigma2 (exp(r t_i) - exp(r t_{i-1})) / r, so
 * mu_i = a, C_ij = sigma2 (exp(r min(t_i, t_j)) - 1) / r.
 * r = rate_change > 0 accelerates, r < 0 decelerates, r -> 0 is the random
 * walk (C_ij = sigma2 min(t_i, t_j)).
 *
 * Parameters: ancestral_mean a (trait units), step_variance sigma2 (at the
 * oldest horizon; trait^2 per time unit, >= 0), rate_change r (per time
 * unit, either sign); K = 3. r is searched through g = exp(r span) on a log
 * scale (a linear scale in r); the ends of its range are flagged
 * (`rate-change-low-end`, `rate-change-high-end`).
 *
 * After Voje, K. L. (2023). Fitting and evaluating univariate and
 * multivariate models of within-lineage evolution. Paleobiology 49:747-764.
 */
export const acceleratingWalk: EvolutionModel = {
  id: 'accelerating-walk',
  label: 'accelerating walk (step variance growing exponentially)',
  labelFor: (estimates) => (estimates.rate_change < 0 ? 'decelerating walk (step variance shrinking exponentially)' : 'accelerating walk (step variance growing exponentially)'),
  summary: 'An unbiased random walk from the ancestral mean whose step variance per time unit changes exponentially at rate_change (accelerating when positive, decelerating when negative).',
  citation: 'Voje, K. L. (2023). Fitting and evaluating univariate and multivariate models of within-lineage evolution. Paleobiology 49:747-764.',
  referenceKeys: ['voje2023'],
  plainWords: 'the trait mean wandered without a preferred direction, in steps that grew or shrank in size over time',
  // rate_change is searched relative to the lineage's span, and each section of a shared fit has its own span.
  nests: { model: 'random-walk', condition: 'rate_change = 0' },
  notShared: 'the rate of change is searched relative to each lineage\'s own span, so sections with their own times cannot share it; compare it as separate or shared-offset',
  methodsNotes: [{
    key: 'accelerating-walk',
    sentence: () => 'In the accelerating walk the step variance per time unit changes exponentially in time, σ² e^(r t), so the walk speeds up (r > 0) or slows down (r < 0); r = 0 is the unbiased random walk.',
  }],
  help: {
    heading: 'accelerating-walk',
    lines: [
      'unbiased random walk whose step_variance per time unit changes as',
      'exp(rate_change x t): accelerating when rate_change > 0, decelerating when < 0',
      '(K = 3; rate_change = 0 is random-walk)',
    ],
  },
  parameters: [
    { name: 'ancestral_mean', label: 'ancestral mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'step_variance', label: 'step variance at the oldest horizon', role: 'variance', unit: { trait: 2, time: -1 }, lowerBound: 0, rate: 'step-variance' },
    {
      name: 'rate_change', label: 'rate of change of the step variance', role: 'rate', unit: { trait: 0, time: -1 }, lowerBound: Number.NEGATIVE_INFINITY,
      searchedAs: { axis: 'variance_growth', fromAxis: rateOf, toAxis: (rate, lineage) => Math.exp(rate * timeSpan(lineage).span) },
    },
  ],
  process: [
    {
      name: 'variance_growth',
      allowZero: false,
      range: () => [Math.exp(-growthEnd), Math.exp(growthEnd)],
      limitNames: ['rate-change-low-end', 'rate-change-high-end'],
    },
    {
      name: 'step_variance',
      allowZero: true,
      // Scaled by the mean multiplier so the range covers the same accumulated variance whatever the growth.
      range: (lineage, before) => {
        const [lower, upper] = stepVarianceRange(lineage);
        const multiplier = meanMultiplier(before[0] ?? 1);
        return [lower / multiplier, upper / multiplier];
      },
    },
  ],
  minimumHorizons: 4,
  width: () => 1,
  parameterCount: () => 3,
  fillSpace(lineage, process, space) {
    const rate = rateOf(process[0], lineage);
    const stepVariance = process[1];
    const time = lineage.time;
    space.transition[0] = 0;
    space.processVariance[0] = 0;
    space.design[0] = 1;
    for (let i = 1; i < space.size; i++) {
      space.transition[i] = 1;
      // sigma2 (e^{r t_i} - e^{r t_{i-1}}) / r = sigma2 e^{r t_{i-1}} (e^{r tau} - 1) / r, without cancellation.
      space.processVariance[i] = stepVariance * Math.exp(rate * time[i - 1]) * acceleratedTime(rate, time[i] - time[i - 1]);
      space.design[i] = 1;
    }
  },
  toParameters: (coefficients, process, lineage) => ({
    ancestral_mean: coefficients[0],
    step_variance: process[1],
    rate_change: rateOf(process[0], lineage),
  }),
  constantCoefficients: () => Float64Array.of(1),
  fixLocation: (_name, value) => ({ index: 0, coefficient: value }),
  processFrom: (parameters, lineage) => [Math.exp(parameters.rate_change * timeSpan(lineage).span), parameters.step_variance],
  coefficientsFrom: (parameters) => [parameters.ancestral_mean],
  meanCovariance(lineage, parameters) {
    const time = lineage.time;
    const { ancestral_mean: start, step_variance: stepVariance, rate_change: rate } = parameters;
    return {
      mean: Float64Array.from(time, () => start),
      covariance: buildCovariance(time.length, (i, j) => stepVariance * acceleratedTime(rate, Math.min(time[i], time[j]))),
    };
  },
  expectation(parameters, time) {
    const { ancestral_mean: start, step_variance: stepVariance, rate_change: rate } = parameters;
    return {
      mean: Float64Array.from(time, () => start),
      variance: Float64Array.from(time, (t) => stepVariance * acceleratedTime(rate, t)),
    };
  },
};
