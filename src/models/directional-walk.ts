import { buildCovariance, type EvolutionModel } from './model.js';
import { fillWalkDerivatives, fillWalkDynamics, stepVarianceRange } from './walk-dynamics.js';

/**
 * General random walk with directional drift (GRW): mu_i = a + delta t_i,
 * C_ij = sigma2 min(t_i, t_j). Parameters: ancestral_mean a (trait units),
 * drift delta (trait units per time unit), step_variance sigma2 (trait^2 per time unit, >= 0).
 *
 * Hunt, G. (2006). Fitting and comparing models of phyletic evolution: random
 * walks and beyond. Paleobiology 32:578-601.
 */
export const directionalWalk: EvolutionModel = {
  id: 'directional-walk',
  label: 'directional walk (random walk with drift)',
  summary: 'Random walk whose steps have mean drift per unit time: a directional trend with random fluctuation about it.',
  citation: 'Hunt, G. (2006). Fitting and comparing models of phyletic evolution: random walks and beyond. Paleobiology 32:578-601.',
  referenceKeys: ['hunt2006'],
  help: { heading: 'directional-walk', lines: ['random walk with drift per time unit (K = 3)'] },
  caution: 'directional',
  plainWords: 'the trait mean changed with a consistent direction (a trend) on top of random wandering',
  parameters: [
    { name: 'ancestral_mean', label: 'ancestral mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: 'drift', label: 'drift', role: 'location', unit: { trait: 1, time: -1 }, lowerBound: Number.NEGATIVE_INFINITY, rate: 'drift' },
    { name: 'step_variance', label: 'step variance', role: 'variance', unit: { trait: 2, time: -1 }, lowerBound: 0, rate: 'step-variance' },
  ],
  process: [{ name: 'step_variance', allowZero: true, range: (lineage) => stepVarianceRange(lineage) }],
  minimumHorizons: 3,
  width: () => 2,
  parameterCount: () => 3,
  fillSpace(lineage, process, space) {
    fillWalkDynamics(lineage, process[0], space);
    for (let i = 0; i < space.size; i++) {
      space.design[2 * i] = 1;
      space.design[2 * i + 1] = lineage.time[i];
    }
  },
  fillSpaceDerivatives: (lineage, _process, derivatives) => fillWalkDerivatives(lineage, derivatives[0]),
  toParameters: (coefficients, process) => ({ ancestral_mean: coefficients[0], drift: coefficients[1], step_variance: process[0] }),
  constantCoefficients: () => Float64Array.of(1, 0),
  fixLocation: (name, value) => ({ index: name === 'drift' ? 1 : 0, coefficient: value }),
  processFrom: (parameters) => [parameters.step_variance],
  coefficientsFrom: (parameters) => [parameters.ancestral_mean, parameters.drift],
  meanCovariance(lineage, parameters) {
    const time = lineage.time;
    return {
      mean: Float64Array.from(time, (t) => parameters.ancestral_mean + parameters.drift * t),
      covariance: buildCovariance(time.length, (i, j) => parameters.step_variance * Math.min(time[i], time[j])),
    };
  },
  expectation(parameters, time) {
    return {
      mean: Float64Array.from(time, (t) => parameters.ancestral_mean + parameters.drift * t),
      variance: Float64Array.from(time, (t) => parameters.step_variance * t),
    };
  },
};
