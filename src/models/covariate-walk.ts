import { buildCovariance, type EvolutionModel } from './model.js';
import { covariateIsConstant, covariateMethodsNote, covariateProblem } from './covariate-shared.js';
import { fillWalkDerivatives, fillWalkDynamics, stepVarianceRange } from './walk-dynamics.js';

/**
 * Covariate-following walk: each step of the lineage mean follows the change
 * in the covariate plus random-walk noise,
 * z_0 = a, z_i = z_{i-1} + b (c_i - c_{i-1}) + N(0, sigma2 tau_i),
 * so mu_i = a + b (c_i - c_0) and C_ij = sigma2 min(t_i, t_j).
 *
 * Parameters: ancestral_mean a (trait units), covariate_slope b (trait units
 * per covariate unit), step_variance sigma2 (trait^2 per time unit, >= 0).
 * K = 3. With a constant covariate it is exactly the unbiased random walk
 * (slope not estimable).
 *
 * The walk variant of covariate tracking, after Hunt, G., Wicaksono, S. A.,
 * Brown, J. E. & Macleod, K. G. (2010). Climate-driven body-size trends in the
 * ostracod fauna of the deep Indian Ocean. Palaeontology 53:1255-1268.
 */
export const covariateWalk: EvolutionModel = {
  id: 'covariate-walk',
  label: 'covariate-following walk (steps follow covariate changes plus random-walk noise)',
  summary: 'A random walk from ancestral_mean whose steps add covariate_slope × the change in the covariate to random steps with step_variance per time unit.',
  citation: 'After Hunt, G., Wicaksono, S. A., Brown, J. E. & Macleod, K. G. (2010). Climate-driven body-size trends in the ostracod fauna of the deep Indian Ocean. Palaeontology 53:1255-1268.',
  referenceKeys: ['huntEtAl2010'],
  plainWords: 'the trait mean tracked the covariate',
  help: { heading: 'covariate-walk', lines: ['random walk whose steps add covariate_slope x the change in the covariate', 'to random steps with step_variance (K = 3)'] },
  methodsNotes: [covariateMethodsNote],
  parameters: [
    { name: 'ancestral_mean', label: 'ancestral mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'covariate_slope', label: 'slope on covariate changes', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'step_variance', label: 'step variance', role: 'variance', unit: { trait: 2, time: -1 }, lowerBound: 0, rate: 'step-variance' },
  ],
  process: [{ name: 'step_variance', allowZero: true, range: (lineage) => stepVarianceRange(lineage) }],
  minimumHorizons: 4,
  unavailable: covariateProblem,
  width: (lineage) => (covariateIsConstant(lineage) ? 1 : 2),
  parameterCount: () => 3,
  fillSpace(lineage, process, space) {
    fillWalkDynamics(lineage, process[0], space);
    const covariate = lineage.covariate as Float64Array;
    for (let i = 0; i < space.size; i++) {
      space.design[i * space.width] = 1;
      if (space.width === 2) space.design[i * 2 + 1] = covariate[i] - covariate[0];
    }
  },
  fillSpaceDerivatives: (lineage, _process, derivatives) => fillWalkDerivatives(lineage, derivatives[0]),
  toParameters: (coefficients, process) => ({
    ancestral_mean: coefficients[0],
    covariate_slope: coefficients.length > 1 ? coefficients[1] : Number.NaN,
    step_variance: process[0],
  }),
  constantCoefficients: (_process, lineage) => (covariateIsConstant(lineage) ? Float64Array.of(1) : Float64Array.of(1, 0)),
  fixLocation: (name, value) => ({ index: name === 'covariate_slope' ? 1 : 0, coefficient: value }),
  processFrom: (parameters) => [parameters.step_variance],
  coefficientsFrom: (parameters, lineage) => (covariateIsConstant(lineage) ? [parameters.ancestral_mean] : [parameters.ancestral_mean, parameters.covariate_slope]),
  meanCovariance(lineage, parameters) {
    const covariate = lineage.covariate as Float64Array;
    const time = lineage.time;
    const slope = Number.isFinite(parameters.covariate_slope) ? parameters.covariate_slope : 0;
    return {
      mean: Float64Array.from(covariate, (c) => parameters.ancestral_mean + slope * (c - covariate[0])),
      covariance: buildCovariance(time.length, (i, j) => parameters.step_variance * Math.min(time[i], time[j])),
    };
  },
  expectation(_parameters, time) {
    // The expected trajectory follows the covariate, which is known only at the horizons, not at arbitrary
    // times: not a number, so a figure draws no model curve rather than a wrong one.
    return { mean: new Float64Array(time.length).fill(Number.NaN), variance: new Float64Array(time.length).fill(Number.NaN) };
  },
};
