import { buildCovariance, type EvolutionModel } from './model.js';
import { fillWalkDerivatives, fillWalkDynamics, stepVarianceRange } from './walk-dynamics.js';

/**
 * Unbiased random walk (URW): mu_i = a, C_ij = sigma2 min(t_i, t_j).
 * Parameters: ancestral_mean a (trait units), step_variance sigma2 (trait^2 per time unit, >= 0).
 *
 * Hunt, G. (2006). Fitting and comparing models of phyletic evolution: random
 * walks and beyond. Paleobiology 32:578-601.
 */
export const randomWalk: EvolutionModel = {
  id: 'random-walk',
  label: 'unbiased random walk',
  summary: 'Brownian motion from the ancestral mean with no preferred direction: steps have mean 0 and variance step_variance per unit time.',
  citation: 'Hunt, G. (2006). Fitting and comparing models of phyletic evolution: random walks and beyond. Paleobiology 32:578-601.',
  referenceKeys: ['hunt2006'],
  plainWords: 'the trait mean wandered without a preferred direction',
  help: { heading: 'random-walk', lines: ['unbiased random walk from ancestral_mean with step_variance per time unit (K = 2)'] },
  parameters: [
    { name: 'ancestral_mean', label: 'ancestral mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'step_variance', label: 'step variance', role: 'variance', unit: { trait: 2, time: -1 }, lowerBound: 0, rate: 'step-variance' },
  ],
  process: [{ name: 'step_variance', allowZero: true, range: (lineage) => stepVarianceRange(lineage) }],
  minimumHorizons: 3,
  width: () => 1,
  parameterCount: () => 2,
  fillSpace(lineage, process, space) {
    fillWalkDynamics(lineage, process[0], space);
    space.design.fill(1);
  },
  fillSpaceDerivatives: (lineage, _process, derivatives) => fillWalkDerivatives(lineage, derivatives[0]),
  toParameters: (coefficients, process) => ({ ancestral_mean: coefficients[0], step_variance: process[0] }),
  constantCoefficients: () => Float64Array.of(1),
  fixLocation: (_name, value) => ({ index: 0, coefficient: value }),
  processFrom: (parameters) => [parameters.step_variance],
  coefficientsFrom: (parameters) => [parameters.ancestral_mean],
  meanCovariance(lineage, parameters) {
    const time = lineage.time;
    return {
      mean: new Float64Array(time.length).fill(parameters.ancestral_mean),
      covariance: buildCovariance(time.length, (i, j) => parameters.step_variance * Math.min(time[i], time[j])),
    };
  },
  expectation(parameters, time) {
    return {
      mean: Float64Array.from(time, () => parameters.ancestral_mean),
      variance: Float64Array.from(time, (t) => parameters.step_variance * t),
    };
  },
};
