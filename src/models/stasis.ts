import { buildCovariance, type EvolutionModel, stasisVarianceRange } from './model.js';

/**
 * Stasis: independent fluctuation about a constant mean, mu_i = theta,
 * C = omega I. Parameters: stasis_mean theta (trait units), stasis_variance
 * omega (trait^2, >= 0).
 *
 * Hunt, G. (2006). Fitting and comparing models of phyletic evolution: random
 * walks and beyond. Paleobiology 32:578-601. Sheets, H. D. & Mitchell, C. E.
 * (2001). Why the null matters: statistical tests, random walks and
 * evolution. Genetica 112-113:105-125.
 */
export const stasis: EvolutionModel = {
  id: 'stasis',
  label: 'stasis',
  summary: 'Horizon means fluctuate independently about a constant stasis mean with variance stasis_variance (plus sampling error).',
  citation: 'Hunt, G. (2006). Fitting and comparing models of phyletic evolution: random walks and beyond. Paleobiology 32:578-601.',
  referenceKeys: ['hunt2006'],
  help: { heading: 'stasis', lines: ['independent fluctuation about stasis_mean with stasis_variance (K = 2)'] },
  caution: 'stasis',
  plainWords: 'the trait mean fluctuated about a constant value without wandering or trending',
  parameters: [
    { name: 'stasis_mean', label: 'stasis mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'stasis_variance', label: 'stasis variance', role: 'variance', unit: { trait: 2, time: 0 }, lowerBound: 0 },
  ],
  process: [
    {
      name: 'stasis_variance',
      allowZero: true,
      range: (lineage) => stasisVarianceRange(lineage),
    },
  ],
  minimumHorizons: 3,
  width: () => 1,
  parameterCount: () => 2,
  fillSpace(_lineage, process, space) {
    space.transition.fill(0);
    space.processVariance.fill(process[0]);
    space.design.fill(1);
  },
  // d/d stasis_variance: the process variance of every horizon is that variance itself.
  fillSpaceDerivatives(_lineage, _process, derivatives) {
    derivatives[0].transition.fill(0);
    derivatives[0].design.fill(0);
    derivatives[0].processVariance.fill(1);
  },
  toParameters: (coefficients, process) => ({ stasis_mean: coefficients[0], stasis_variance: process[0] }),
  constantCoefficients: () => Float64Array.of(1),
  fixLocation: (_name, value) => ({ index: 0, coefficient: value }),
  processFrom: (parameters) => [parameters.stasis_variance],
  coefficientsFrom: (parameters) => [parameters.stasis_mean],
  meanCovariance(lineage, parameters) {
    const size = lineage.time.length;
    return {
      mean: new Float64Array(size).fill(parameters.stasis_mean),
      covariance: buildCovariance(size, (i, j) => (i === j ? parameters.stasis_variance : 0)),
    };
  },
  expectation(parameters, time) {
    return {
      mean: Float64Array.from(time, () => parameters.stasis_mean),
      variance: Float64Array.from(time, () => parameters.stasis_variance),
    };
  },
};
