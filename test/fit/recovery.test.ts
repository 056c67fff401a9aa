import { describe, expect, it } from 'vitest';
import { fitModel } from '../../src/fit/fit-model.js';
import { fitLineage } from '../../src/fit/fit-lineage.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { ornsteinUhlenbeck } from '../../src/models/ou.js';
import { classicModels } from '../../src/models/registry.js';
import { stasis } from '../../src/models/stasis.js';
import type { EvolutionModel } from '../../src/models/model.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

// Recovery of known parameters on long simulated sequences (common practice
// for checking an ML fitter). Tolerance: the truth must lie within 3.3
// "standard errors", taking the SE as the 95% profile half-width / 1.96; for
// a consistent estimator this fails with probability about 1e-3 per check.
function design(size: number, span: number, seed: number) {
  const random = createRandom(seed);
  const time = [0];
  for (let i = 1; i < size; i++) time.push(time[i - 1] + (span / size) * (0.3 + 1.4 * random.uniform()));
  const samplingVariance = time.map(() => 0.02 + 0.04 * random.uniform());
  return lineageFromArrays({ time, mean: time.map(() => 0), samplingVariance });
}

function expectRecovered(model: EvolutionModel, truth: Record<string, number>, size: number, seed: number): void {
  const base = design(size, 50, seed);
  const lineage = withMeans(base, simulateMeans(model, base, truth, createRandom(seed + 1)));
  const fit = fitModel(model, lineage);
  for (const [name, value] of Object.entries(truth)) {
    const estimate = fit.parameters[name];
    expect(estimate.estimate, name).not.toBeNull();
    const halfWidth = ((estimate.upper ?? Infinity) - (estimate.lower ?? -Infinity)) / 2;
    expect(Math.abs((estimate.estimate as number) - value), name).toBeLessThan((3.3 * halfWidth) / 1.96);
    expect(estimate.lower ?? -Infinity, name).toBeLessThanOrEqual(estimate.estimate as number);
    expect(estimate.upper ?? Infinity, name).toBeGreaterThanOrEqual(estimate.estimate as number);
  }
}

describe('recovery of known parameters on long simulated sequences', () => {
  it('directional walk, 400 horizons', () => {
    expectRecovered(directionalWalk, { ancestral_mean: 2, drift: 0.08, step_variance: 0.01 }, 400, 11);
  });
  it('stasis, 400 horizons', () => {
    expectRecovered(stasis, { stasis_mean: -1.5, stasis_variance: 0.3 }, 400, 12);
  });
  it('Ornstein–Uhlenbeck, 300 horizons', () => {
    expectRecovered(ornsteinUhlenbeck, { ancestral_mean: 0, optimum: 4, alpha: 0.4, step_variance: 0.05 }, 300, 13);
  });
  it('on clear directional sequences a directional model wins, and ou (which nests the directional walk as alpha -> 0) never has a lower logL', () => {
    for (const seed of [21, 31, 41, 51]) {
      const base = design(200, 50, seed);
      const lineage = withMeans(base, simulateMeans(directionalWalk, base, { ancestral_mean: 0, drift: 0.2, step_variance: 0.005 }, createRandom(seed + 1)));
      const fit = fitLineage(lineage, classicModels, { intervals: false });
      const logLik = (id: string) => fit.models.find((model) => model.id === id)?.logLik as number;
      expect(['directional-walk', 'ou']).toContain(fit.best);
      expect(logLik('directional-walk')).toBeGreaterThan(logLik('random-walk') + 10);
      // Nesting (MODELS.md: ou tends to directional-walk as alpha -> 0 with (optimum - a) alpha -> drift).
      expect(logLik('ou')).toBeGreaterThanOrEqual(logLik('directional-walk') - 1e-6);
      // Nesting: directional-walk contains random-walk (drift = 0); stasis contains strict stasis (variance 0).
      expect(logLik('directional-walk')).toBeGreaterThanOrEqual(logLik('random-walk'));
      expect(logLik('stasis')).toBeGreaterThanOrEqual(logLik('strict-stasis'));
      const weights = fit.models.map((model) => model.weight ?? 0);
      expect(weights.reduce((sum, value) => sum + value, 0)).toBeCloseTo(1, 12);
    }
  });
});
