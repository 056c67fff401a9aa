import { buildCovariance, type EvolutionModel } from './model.js';

/**
 * Strict stasis: no evolutionary change at all, every horizon mean differs
 * from the stasis mean by sampling error only; mu_i = theta, C = 0.
 * Parameter: stasis_mean theta (trait units). Its ML estimate is the
 * inverse-sampling-variance weighted mean (closed form).
 *
 * Hunt, G., Hopkins, M. J. & Lidgard, S. (2015). Simple versus complex
 * models of trait evolution and stasis as a response to environmental
 * change. Proceedings of the National Academy of Sciences USA 112:4885-4890.
 */
export const strictStasis: EvolutionModel = {
  id: 'strict-stasis',
  label: 'strict stasis',
  summary: 'No change: every horizon mean is the stasis mean plus sampling error alone.',
  // The paper that introduced strict stasis as a model of its own (issue 19 checked the attribution; it was the 2008 ou paper before).
  citation: 'Hunt, G., Hopkins, M. J. & Lidgard, S. (2015). Simple versus complex models of trait evolution and stasis as a response to environmental change. PNAS 112:4885-4890.',
  referenceKeys: ['huntHopkinsLidgard2015'],
  help: { heading: 'strict-stasis', lines: ['no change: horizon means differ from stasis_mean by sampling error only (K = 1)'] },
  caution: 'stasis',
  plainWords: 'the trait mean did not change at all: the horizon means differ by sampling error alone',
  parameters: [
    { name: 'stasis_mean', label: 'stasis mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
  ],
  process: [],
  minimumHorizons: 2,
  width: () => 1,
  parameterCount: () => 1,
  fillSpace(_lineage, _process, space) {
    space.transition.fill(0);
    space.processVariance.fill(0);
    space.design.fill(1);
  },
  toParameters: (coefficients) => ({ stasis_mean: coefficients[0] }),
  constantCoefficients: () => Float64Array.of(1),
  fixLocation: (_name, value) => ({ index: 0, coefficient: value }),
  processFrom: () => [],
  coefficientsFrom: (parameters) => [parameters.stasis_mean],
  meanCovariance(lineage, parameters) {
    const size = lineage.time.length;
    return { mean: new Float64Array(size).fill(parameters.stasis_mean), covariance: buildCovariance(size, () => 0) };
  },
  expectation(parameters, time) {
    return { mean: Float64Array.from(time, () => parameters.stasis_mean), variance: new Float64Array(time.length) };
  },
};
