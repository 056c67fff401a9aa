import { describe, expect, it } from 'vitest';
import { fitModel } from '../../src/fit/fit-model.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { covariateStasis } from '../../src/models/covariate-stasis.js';
import { covariateWalk } from '../../src/models/covariate-walk.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { stasis } from '../../src/models/stasis.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans } from '../../src/random/simulate-lineage.js';

describe('covariate tracking', () => {
  const design = (size: number, seed: number) => {
    const random = createRandom(seed);
    const time = Array.from({ length: size }, (_, i) => 0.1 * i);
    let level = 0;
    const covariate = time.map(() => (level += random.normal()));
    return { random, lineage: lineageFromArrays({ time, mean: new Array(size).fill(0), samplingVariance: time.map(() => 0.02 + 0.02 * random.uniform()), covariate }) };
  };

  it('recovers a known slope: the 95% profile interval covers it in at least 16 of 20 seeded replicates, for both variants', () => {
    // Binomial reasoning: with nominal 95% coverage, the number covering in 20 is Binomial(20, 0.95);
    // P(X <= 15) = 0.0026 (scipy.stats.binom.cdf(15, 20, 0.95)), so requiring >= 16 fails a correct method rarely.
    for (const [model, truth] of [
      [covariateStasis, { covariate_intercept: 4, covariate_slope: 0.5, stasis_variance: 0.05 }],
      [covariateWalk, { ancestral_mean: 4, covariate_slope: 0.5, step_variance: 0.2 }],
    ] as const) {
      let covered = 0;
      let closeEstimates = 0;
      for (let replicate = 0; replicate < 20; replicate++) {
        const { random, lineage } = design(50, 100 + replicate);
        const simulated = { ...lineage, mean: simulateMeans(model, lineage, truth, random) };
        const slope = fitModel(model, simulated).parameters.covariate_slope;
        if ((slope.lower ?? Infinity) <= 0.5 && 0.5 <= (slope.upper ?? -Infinity)) covered += 1;
        if (Math.abs((slope.estimate ?? NaN) - 0.5) < 0.1) closeEstimates += 1;
      }
      expect(covered).toBeGreaterThanOrEqual(16);
      expect(closeEstimates).toBeGreaterThanOrEqual(18);
    }
  });

  it('with a constant covariate reduces exactly to stasis (and the walk variant to the random walk)', () => {
    const { random, lineage } = design(25, 3);
    const constant = { ...lineage, covariate: new Float64Array(25).fill(7.5), mean: Float64Array.from(lineage.time, () => 3 + 0.3 * random.normal()) };
    const tracked = fitModel(covariateStasis, constant);
    const plain = fitModel(stasis, constant);
    expect(tracked.logLik).toBe(plain.logLik);
    expect(tracked.parameters.covariate_slope.estimate).toBeNull();
    expect(tracked.parameters.covariate_intercept.estimate).toBe(plain.parameters.stasis_mean.estimate);
    expect(tracked.k).toBe(3);
    expect(fitModel(covariateWalk, constant).logLik).toBe(fitModel(randomWalk, constant).logLik);
  });

  it('is not fitted without a covariate, or with one missing at some horizon', () => {
    const { lineage } = design(10, 4);
    expect(fitModel(covariateStasis, { ...lineage, covariate: null }).message).toMatch(/no covariate/);
    const gap = Float64Array.from(lineage.covariate!);
    gap[4] = Number.NaN;
    expect(fitModel(covariateWalk, { ...lineage, covariate: gap }).message).toMatch(/missing at the horizon of input line 6/);
  });
});
