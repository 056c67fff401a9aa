import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { maximiseProcess } from '../../src/fit/search.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { classicModels, findModel } from '../../src/models/registry.js';
import type { EvolutionModel } from '../../src/models/model.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

// The speed-ups of issue 7 must not change numbers: the evaluator's kept filter
// passes must equal fresh ones bit for bit, and the warm-started search must
// reach the nested search's maximum. Data: seeded simulations (invented).
function simulated(model: EvolutionModel, seed: number, horizons = 25) {
  const random = createRandom(seed);
  const time = Float64Array.from({ length: horizons }, (_, i) => i * 0.1 + (i > 0 ? 0.05 * random.uniform() : 0));
  const samplingVariance = Float64Array.from({ length: horizons }, () => 0.004 + 0.004 * random.uniform());
  const design = lineageFromArrays({ time, mean: new Float64Array(horizons), samplingVariance });
  const parameters: Record<string, number> = { stasis_mean: 5, stasis_variance: 0.01, ancestral_mean: 5, step_variance: 0.05, drift: 0.3, optimum: 6, alpha: 4 };
  return withMeans(design, simulateMeans(model, design, parameters, random));
}

describe('evaluator cache of filter passes', () => {
  it('answers a repeated process value with exactly the sums of a fresh pass, and the logL equals the dense form', () => {
    for (const model of classicModels) {
      const lineage = simulated(model, 11);
      const cached = new LikelihoodEvaluator(model, lineage);
      const probes = model.process.map((axis) => axis.range(lineage, [1])).map(([lower, upper]) => Math.sqrt(lower * upper));
      const other = probes.map((value) => value * 3);
      cached.whiten(probes);
      cached.whiten(other);
      const passes = cached.evaluations;
      const again = { ...cached.whiten(probes) };
      const copy = { ...again, triangle: Float64Array.from(again.triangle), projected: Float64Array.from(again.projected) };
      if (model.process.length > 0) expect(cached.evaluations).toBe(passes);
      const fresh = new LikelihoodEvaluator(model, lineage).whiten(probes);
      // Every field, including any added later, must match.
      for (const key of Object.keys(fresh) as (keyof typeof fresh)[]) expect(copy[key]).toEqual(fresh[key]);
      // And the likelihood is the exact Gaussian density (dense reference with ml-matrix Cholesky).
      const parameters = model.toParameters(cached.details(probes).coefficients, probes, lineage);
      const { mean, covariance } = model.meanCovariance(lineage, parameters);
      expect(cached.atParameters(parameters)).toBeCloseTo(denseLogLik(mean, covariance, lineage.samplingVariance, lineage.mean), 8);
    }
  });
});

describe('warm-started search', () => {
  it('reaches the maximum of the nested search, with location parameters held fixed (as profile intervals do)', () => {
    for (const id of ['ou', 'directional-walk', 'random-walk']) {
      const model = findModel(id) as EvolutionModel;
      for (const seed of [3, 4, 5]) {
        const lineage = simulated(model, seed);
        const evaluator = new LikelihoodEvaluator(model, lineage);
        const best = maximiseProcess((process) => evaluator.profile(process), model.process, lineage);
        const name = model.parameters.find((parameter) => parameter.role === 'location')!.name;
        const estimate = model.toParameters(evaluator.details(best.process).coefficients, best.process, lineage)[name];
        let previous = best.process;
        for (const offset of [0.02, 0.05, 0.1, -0.03, -0.08]) {
          const evaluate = (process: number[]) => evaluator.profileWithLocation(name, estimate + offset, process);
          const nested = maximiseProcess(evaluate, model.process, lineage, { points: 12 });
          const warm = maximiseProcess(evaluate, model.process, lineage, { points: 12, start: previous });
          previous = warm.process;
          // Never lower than the nested search beyond rounding (1e-7 in logL).
          expect(warm.logLik).toBeGreaterThanOrEqual(nested.logLik - 1e-7);
          expect(warm.logLik).toBeLessThanOrEqual(best.logLik + 1e-9);
        }
      }
    }
  });
});
