import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { classicModels } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';

// Filter ≡ dense reference: the O(N) filter and the dense multivariate
// normal built straight from the MODELS.md mean/covariance table (Cholesky by
// ml-matrix, a general-purpose library) must agree to 1e-9 relative.
describe('Kalman filter against the dense multivariate-normal reference', () => {
  const random = createRandom(7);
  const designs = Array.from({ length: 40 }, (_, design) => {
    const size = 4 + Math.floor(random.uniform() * 40);
    const time = [0];
    for (let i = 1; i < size; i++) time.push(time[i - 1] + (design % 3 === 0 ? 1 : 0.01 + 3 * random.uniform() ** 2));
    const mean = time.map(() => 10 + random.normal());
    const samplingVariance = time.map(() => (design % 5 === 0 ? 1e-6 : 0.001 + random.uniform() * 0.3));
    return lineageFromArrays({ time, mean, samplingVariance });
  });
  const parameterDraws = (id: string, span: number, shortest: number): Record<string, number>[] => {
    const variance = () => 10 ** (-4 + 4 * random.uniform());
    const location = () => 10 + 2 * random.normal();
    switch (id) {
      case 'strict-stasis': return [{ stasis_mean: location() }];
      case 'stasis': return [{ stasis_mean: location(), stasis_variance: variance() }, { stasis_mean: location(), stasis_variance: 0 }];
      case 'random-walk': return [{ ancestral_mean: location(), step_variance: variance() }, { ancestral_mean: location(), step_variance: 0 }];
      case 'directional-walk': return [{ ancestral_mean: location(), drift: random.normal(), step_variance: variance() }];
      default: return [1e-4 / span, 0.3 / span, 3 / span, 5 / shortest, 30 / shortest].map((alpha) => ({
        ancestral_mean: location(), optimum: location(), alpha, step_variance: variance(),
      }));
    }
  };
  for (const model of classicModels) {
    it(`${model.id}: filter and dense logL agree to 1e-9 relative over random designs`, () => {
      let checked = 0;
      for (const lineage of designs) {
        if (lineage.mean.length < model.minimumHorizons) continue;
        const time = lineage.time;
        let shortest = Infinity;
        for (let i = 1; i < time.length; i++) shortest = Math.min(shortest, time[i] - time[i - 1]);
        for (const parameters of parameterDraws(model.id, time[time.length - 1], shortest)) {
          const evaluator = new LikelihoodEvaluator(model, lineage);
          const filtered = evaluator.atParameters(parameters);
          const { mean, covariance } = model.meanCovariance(lineage, parameters);
          const dense = denseLogLik(mean, covariance, lineage.samplingVariance, lineage.mean);
          expect(Math.abs(filtered - dense) / Math.max(1, Math.abs(dense))).toBeLessThan(1e-9);
          checked += 1;
        }
      }
      expect(checked).toBeGreaterThan(30);
    });
  }
});
