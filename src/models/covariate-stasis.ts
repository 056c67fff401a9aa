import { buildCovariance, type EvolutionModel, stasisVarianceRange } from './model.js';
import { covariateIsConstant, covariateMethodsNote, covariateProblem } from './covariate-shared.js';

/**
 * Covariate tracking with residual stasis: the lineage mean is a linear
 * function of an environmental covariate c_i (e.g. a temperature proxy)
 * measured at each horizon, and fluctuates about it independently:
 * mu_i = b_0 + b_1 c_i, C = omega I.
 *
 * Parameters: covariate_intercept b_0 (trait units; the mean at c = 0),
 * covariate_slope b_1 (trait units per covariate unit) and stasis_variance
 * omega (trait^2, >= 0). K = 3. With a constant covariate the slope is not
 * identifiable; the slope column is dropped and the model is exactly stasis
 * (same logL), with the slope reported as not estimable.
 *
 * The trait tracking an environmental proxy, as in: Hunt, G., Wicaksono, S. A.,
 * Brown, J. E. & Macleod, K. G. (2010). Climate-driven body-size trends in the
 * ostracod fauna of the deep Indian Ocean. Palaeontology 53:1255-1268.
 */
export const covariateStasis: EvolutionModel = {
  id: 'covariate-stasis',
  label: 'covariate tracking (mean linear in the covariate, residual stasis)',
  summary: 'The mean is covariate_intercept + covariate_slope × covariate at each horizon, with independent stasis_variance about it.',
  citation: 'Hunt, G., Wicaksono, S. A., Brown, J. E. & Macleod, K. G. (2010). Climate-driven body-size trends in the ostracod fauna of the deep Indian Ocean. Palaeontology 53:1255-1268.',
  referenceKeys: ['huntEtAl2010'],
  plainWords: 'the trait mean tracked the covariate',
  help: { heading: 'covariate-stasis', lines: ['mean = covariate_intercept + covariate_slope x covariate, independent', 'stasis_variance about it (K = 3); needs a covariate column or --covariate-file'] },
  methodsNotes: [covariateMethodsNote],
  parameters: [
    { name: 'covariate_intercept', label: 'intercept (mean at covariate 0)', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'covariate_slope', label: 'slope on the covariate', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'stasis_variance', label: 'residual stasis variance', role: 'variance', unit: { trait: 2, time: 0 }, lowerBound: 0 },
  ],
  process: [
    {
      name: 'stasis_variance',
      allowZero: true,
      range: (lineage) => stasisVarianceRange(lineage),
    },
  ],
  minimumHorizons: 4,
  unavailable: covariateProblem,
  width: (lineage) => (covariateIsConstant(lineage) ? 1 : 2),
  parameterCount: () => 3,
  fillSpace(lineage, process, space) {
    space.transition.fill(0);
    space.processVariance.fill(process[0]);
    const covariate = lineage.covariate as Float64Array;
    for (let i = 0; i < space.size; i++) {
      space.design[i * space.width] = 1;
      if (space.width === 2) space.design[i * 2 + 1] = covariate[i];
    }
  },
  // d/d stasis_variance (the design does not depend on it), as stasis's: with a constant covariate the search is stasis's, step for step.
  fillSpaceDerivatives(_lineage, _process, derivatives) {
    derivatives[0].transition.fill(0);
    derivatives[0].design.fill(0);
    derivatives[0].processVariance.fill(1);
  },
  toParameters: (coefficients, process) => ({
    covariate_intercept: coefficients[0],
    covariate_slope: coefficients.length > 1 ? coefficients[1] : Number.NaN,
    stasis_variance: process[0],
  }),
  constantCoefficients: (_process, lineage) => (covariateIsConstant(lineage) ? Float64Array.of(1) : Float64Array.of(1, 0)),
  fixLocation: (name, value) => ({ index: name === 'covariate_slope' ? 1 : 0, coefficient: value }),
  processFrom: (parameters) => [parameters.stasis_variance],
  coefficientsFrom: (parameters, lineage) =>
    covariateIsConstant(lineage) ? [parameters.covariate_intercept + (Number.isFinite(parameters.covariate_slope) ? parameters.covariate_slope * (lineage.covariate?.[0] ?? 0) : 0)] : [parameters.covariate_intercept, parameters.covariate_slope],
  meanCovariance(lineage, parameters) {
    const covariate = lineage.covariate as Float64Array;
    const slope = Number.isFinite(parameters.covariate_slope) ? parameters.covariate_slope : 0;
    return {
      mean: Float64Array.from(covariate, (c) => parameters.covariate_intercept + slope * c),
      covariance: buildCovariance(covariate.length, (i, j) => (i === j ? parameters.stasis_variance : 0)),
    };
  },
  expectation(_parameters, time) {
    // The expected trajectory follows the covariate, which is known only at the horizons, not at arbitrary
    // times: not a number, so a figure draws no model curve rather than a wrong one.
    return { mean: new Float64Array(time.length).fill(Number.NaN), variance: new Float64Array(time.length).fill(Number.NaN) };
  },
};
