import { profileOut } from '../engine/gls.js';
import type { LikelihoodEvaluator } from './evaluator.js';
import type { IntervalEnds } from './intervals.js';

/**
 * Complementary error function, erfc(x) = 1 - erf(x), by the Chebyshev
 * fit of Press, Teukolsky, Vetterling & Flannery (2007), Numerical Recipes,
 * 3rd ed., section 6.2 (fractional error below 1.2e-7 everywhere).
 *
 * @example
 * erfc(0); // 1 (to 1e-7; exactly 1, the fit's fractional error is below 1.2e-7)
 * erfc(1); // 0.1572992070502851 (to 2e-8; erfc(1), Abramowitz & Stegun 1964, table 7.1)
 */
export function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const value =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? value : 2 - value;
}

/**
 * Standard normal distribution function Phi(x) = erfc(-x / sqrt 2) / 2.
 *
 * @example
 * normalCdf(0); // 0.5 (to 1e-7)
 * normalCdf(1.959963984540054); // 0.975 (to 1e-7; the normal's 97.5% quantile, common practice)
 */
export function normalCdf(x: number): number {
  return 0.5 * erfc(-x / Math.SQRT2);
}

/** One grid point of the process parameter with what the location parameters look like there. */
interface GridPoint {
  readonly value: number;
  /** log of the (unnormalised) posterior mass of the grid cell. */
  readonly logMass: number;
  /** GLS estimate and variance of each location parameter at this value. */
  readonly locations: Record<string, { mean: number; variance: number }>;
}

/** Options of {@link integratedIntervals}. */
export interface IntegratedOptions {
  /** Probability inside the interval (default 0.95, equal tails). */
  readonly level?: number;
  /** Grid points of the refined grid over the process parameter (default 240). */
  readonly points?: number;
}

/**
 * Integrated-likelihood intervals for a model with one process parameter
 * (a variance: the walks, stasis). The location parameters are integrated
 * out under flat priors and the variance under a uniform prior on its
 * square root (the standard deviation), the prior Gelman (2006) recommends
 * for a variance component; every interval is the equal-tailed 95% interval
 * of that marginal distribution.
 *
 * Given the variance s, the location parameters are Gaussian about their GLS
 * estimate with the GLS covariance, and s itself has density proportional
 * to the restricted likelihood times the prior: L_p(s) det(X'V^-1 X)^(-1/2)
 * s^(-1/2) (Harville 1974). So a location parameter's marginal is a mixture
 * of normals over a grid in s, and the variance's is the grid itself. This
 * widens the intervals when the variance is poorly determined (an estimate
 * at 0 no longer means "no variance"), which is what the plain and adjusted
 * profiles miss in short fossil sequences; measured coverage is in the README.
 *
 * Gelman, A. (2006). Prior distributions for variance parameters in
 * hierarchical models. Bayesian Analysis 1:515-534.
 * Harville, D. A. (1974). Bayesian inference for variance components using
 * only error contrasts. Biometrika 61:383-385.
 *
 * @returns interval ends per parameter name, or null when the model has more than one process parameter
 *
 * @example
 * // Strict stasis has no variance to integrate over: the mean's interval is the normal one, 2 ± 1.959964 × sqrt(1/2) (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * integratedIntervals(new LikelihoodEvaluator(strictStasis, lineage), ['stasis_mean']).stasis_mean.upper; // 3.3859038243496773 (to 1e-6)
 * integratedIntervals(new LikelihoodEvaluator(ornsteinUhlenbeck, lineage), ['optimum']); // null (two process parameters)
 */
export function integratedIntervals(
  evaluator: LikelihoodEvaluator,
  names: readonly string[],
  options: IntegratedOptions = {},
): Record<string, IntervalEnds> | null {
  const model = evaluator.model;
  const lineage = evaluator.lineage;
  if (model.process.length > 1) return null;
  const level = options.level ?? 0.95;
  const tail = (1 - level) / 2;
  const result: Record<string, IntervalEnds> = {};
  const locationNames = names.filter((name) => !model.process.some((axis) => axis.name === name));
  // The mixture below needs each location parameter to be a design coefficient itself (as in every one-variance model here).
  const probe = model.process.map((axis) => Math.sqrt(axis.range(lineage, [])[0] * axis.range(lineage, [])[1]));
  for (const name of locationNames) {
    if (model.fixLocation(name, 0, probe, lineage).coefficient !== 0 || model.fixLocation(name, 1, probe, lineage).coefficient !== 1) return null;
  }
  if (model.process.length === 0) {
    // Nothing to integrate: the location parameters are exactly Gaussian about their GLS estimate.
    const point = gridPoint(evaluator, [], locationNames, 0);
    if (!point) return null;
    for (const name of locationNames) {
      const { mean, variance } = point.locations[name];
      const half = 1.959963984540054 * Math.sqrt(variance);
      result[name] = { lower: mean - half, upper: mean + half, lowerAtBound: false, upperAtBound: false };
    }
    return result;
  }
  const axis = model.process[0];
  const [rangeLower, rangeUpper] = axis.range(lineage, []);
  const coarse = buildGrid(evaluator, locationNames, Math.log(rangeLower), Math.log(rangeUpper) + Math.log(1e3), 240);
  if (coarse.length === 0) return null;
  // Refine where the mass is: from the first to the last coarse point within e^-30 of the largest.
  const top = Math.max(...coarse.map((point) => point.logMass));
  const significant = coarse.map((point, i) => (point.logMass > top - 30 ? i : -1)).filter((i) => i >= 0);
  const first = Math.max(0, significant[0] - 1);
  const last = Math.min(coarse.length - 1, significant[significant.length - 1] + 1);
  const grid = buildGrid(evaluator, locationNames, Math.log(coarse[first].value), Math.log(coarse[last].value), options.points ?? 240);
  if (grid.length === 0) return null;
  const peak = Math.max(...grid.map((point) => point.logMass));
  const weights = grid.map((point) => Math.exp(point.logMass - peak));
  const total = weights.reduce((sum, weight) => sum + weight, 0);
  for (const name of names) {
    if (name === axis.name) {
      result[name] = gridQuantiles(grid.map((point) => point.value), weights, total, tail);
      continue;
    }
    const components = grid.map((point) => point.locations[name]);
    const spread = Math.max(...components.map((component) => Math.sqrt(component.variance)));
    const centre = components[weights.indexOf(Math.max(...weights))].mean;
    const quantile = mixtureQuantile(components, weights, total, centre, spread);
    result[name] = { lower: quantile(tail), upper: quantile(1 - tail), lowerAtBound: false, upperAtBound: false };
  }
  return result;
}

function gridPoint(evaluator: LikelihoodEvaluator, process: number[], locationNames: readonly string[], logStep: number): GridPoint | null {
  const profile = profileOut(evaluator.whiten(process));
  if (!Number.isFinite(profile.logLik) || !Number.isFinite(profile.logDetInformation)) return null;
  // The GLS details of this one filter pass, as `evaluator.details` would give them (coefficients on the trait's own scale) without a second solve.
  const constant = evaluator.model.constantCoefficients(process, evaluator.lineage);
  const coefficients = Float64Array.from(profile.coefficients, (value, j) => value + evaluator.centre * constant[j]);
  const width = Math.sqrt(profile.coefficientCovariance.length);
  const estimates = evaluator.model.toParameters(coefficients, process, evaluator.lineage);
  const locations: GridPoint['locations'] = {};
  for (const name of locationNames) {
    const index = evaluator.model.fixLocation(name, estimates[name], process, evaluator.lineage).index;
    locations[name] = { mean: estimates[name], variance: profile.coefficientCovariance[index * width + index] };
  }
  const value = process[0] ?? 0;
  // Restricted likelihood x prior s^(-1/2) x the cell width s d(log s) on a log grid.
  const logMass = profile.logLik - 0.5 * profile.logDetInformation + (value > 0 ? 0.5 * Math.log(value) : 0) + logStep;
  return { value, logMass, locations };
}

/**
 * The p-quantile of a mixture of normals (cell weights / total), within
 * centre ± 40 spread: Newton's method on cdf(x) - p with the mixture
 * density as derivative, kept inside a bracket that every evaluation
 * narrows, and bisection whenever a Newton step would leave it (issue 14b:
 * about 6 evaluations of the mixture instead of the 45 of plain bisection
 * to the same 1e-12 relative precision, which it replaced; the root is the
 * same, of the same cdf).
 */
function mixtureQuantile(components: ReadonlyArray<{ mean: number; variance: number }>, weights: readonly number[], total: number, centre: number, spread: number): (p: number) => number {
  const count = components.length;
  const means = Float64Array.from(components, (component) => component.mean);
  const deviations = Float64Array.from(components, (component) => Math.sqrt(component.variance));
  const inverseRootTwoPi = 1 / Math.sqrt(2 * Math.PI);
  let density = 0;
  // The cdf (with the normalCdf of every component, as the equal-tailed interval is defined) and, beside it, the density.
  const cdfAndDensity = (x: number): number => {
    let sum = 0;
    let slope = 0;
    for (let g = 0; g < count; g++) {
      const z = (x - means[g]) / deviations[g];
      sum += weights[g] * normalCdf(z);
      slope += (weights[g] * Math.exp(-0.5 * z * z) * inverseRootTwoPi) / deviations[g];
    }
    density = slope / total;
    return sum / total;
  };
  const precision = 1e-12 * (Math.abs(centre) + spread);
  return (p: number): number => {
    let low = centre - 40 * spread;
    let high = centre + 40 * spread;
    let x = centre;
    for (let step = 0; step < 200 && high - low > precision; step++) {
      const excess = cdfAndDensity(x) - p;
      if (excess === 0) return x;
      const newtonStep = density > 0 ? excess / density : Number.NaN;
      // Converged: a Newton step far below the precision, or down to the last bits of x (quadratic convergence leaves the error about its square).
      if (Math.abs(newtonStep) <= Math.max(1e-3 * precision, 4 * Number.EPSILON * Math.abs(x))) return x - newtonStep;
      if (excess < 0) low = x;
      else high = x;
      const newton = x - newtonStep;
      x = newton > low && newton < high ? newton : 0.5 * (low + high);
    }
    return 0.5 * (low + high);
  };
}

function buildGrid(evaluator: LikelihoodEvaluator, locationNames: readonly string[], logLower: number, logUpper: number, points: number): GridPoint[] {
  const step = (logUpper - logLower) / points;
  const grid: GridPoint[] = [];
  for (let g = 0; g < points; g++) {
    const point = gridPoint(evaluator, [Math.exp(logLower + (g + 0.5) * step)], locationNames, Math.log(step));
    if (point) grid.push(point);
  }
  return grid;
}

/** Equal-tailed quantiles of a distribution given by cell masses on a log-spaced grid (log-linear within cells). */
function gridQuantiles(values: readonly number[], weights: readonly number[], total: number, tail: number): IntervalEnds {
  const at = (p: number): number => {
    let cumulative = 0;
    for (let g = 0; g < values.length; g++) {
      const next = cumulative + weights[g] / total;
      if (next >= p) {
        const fraction = weights[g] > 0 ? (p - cumulative) / (weights[g] / total) : 0.5;
        const lowerEdge = g === 0 ? Math.log(values[0]) - 0.5 * (Math.log(values[1]) - Math.log(values[0])) : 0.5 * (Math.log(values[g - 1]) + Math.log(values[g]));
        const upperEdge = g === values.length - 1 ? Math.log(values[g]) + 0.5 * (Math.log(values[g]) - Math.log(values[g - 1])) : 0.5 * (Math.log(values[g]) + Math.log(values[g + 1]));
        return Math.exp(lowerEdge + fraction * (upperEdge - lowerEdge));
      }
      cumulative = next;
    }
    return values[values.length - 1];
  };
  return { lower: at(tail), upper: at(1 - tail), lowerAtBound: false, upperAtBound: false };
}
