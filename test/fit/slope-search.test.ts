import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { maximiseProcess } from '../../src/fit/search.js';
import { slopeMaximize, warmSlopeSearch } from '../../src/fit/slope-search.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { findModel } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

// Issue 14a: the one-dimensional searches on the analytic slope, and ou's search
// with the gradient against the same search on values alone.

describe('slopeMaximize and warmSlopeSearch', () => {
  // f(x) = -cosh(x - 1.3): maximum at 1.3 (closed form: the slope -sinh(x - 1.3) is 0 only there).
  const f = (x: number) => ({ value: -Math.cosh(x - 1.3), slope: -Math.sinh(x - 1.3) });

  it('finds the closed-form maximum inside a grid cell from either side, and a range end when the slope points out', () => {
    expect(slopeMaximize(f, 1, 0, 2, 1e-12)?.at).toBeCloseTo(1.3, 11);
    expect(slopeMaximize(f, 1.6, 1, 2.2, 1e-12)?.at).toBeCloseTo(1.3, 11);
    // At the range's upper end (no cell to the right), rising: the end is the maximum on the range.
    expect(slopeMaximize(f, 1, 0.5, 1, 1e-12)?.at).toBe(1);
  });

  it('returns null when the slope does not bracket a maximum in the cell (the caller then searches on values)', () => {
    // Rising across the whole cell [0, 1] with its far end inside the range: no sign change.
    expect(slopeMaximize(f, 0.5, 0, 1, 1e-12)).toBeNull();
    expect(slopeMaximize(() => ({ value: 1, slope: Number.NaN }), 0.5, 0, 1, 1e-12)).toBeNull();
  });

  it('from a far warm start walks uphill to the maximum, or to the range end', () => {
    expect(warmSlopeSearch(f, -20, -30, 30, 1.5, 1e-12)?.at).toBeCloseTo(1.3, 11);
    expect(warmSlopeSearch(f, -20, -30, 0, 1.5, 1e-12)?.at).toBe(0);
  });
});

describe('ou: the search with the analytic gradient reaches the value-only search maximum', () => {
  const ou = findModel('ou')!;
  // Seeded invented lineages: ou with strong and weak pull, and a directional walk (alpha near its 0 limit).
  const cases: Array<[number, Record<string, number>, string]> = [
    [21, { ancestral_mean: 5, optimum: 6, alpha: 4, step_variance: 0.05 }, 'ou'],
    [22, { ancestral_mean: 5, optimum: 6, alpha: 0.3, step_variance: 0.2 }, 'ou'],
    [23, { ancestral_mean: 5, drift: 0.8, step_variance: 0.02 }, 'directional-walk'],
    [24, { stasis_mean: 5, stasis_variance: 0.02 }, 'stasis'],
  ];
  for (const [seed, parameters, generator] of cases) {
    it(`seed ${seed} (${generator}): same maximum (logL to 1e-10, dense logL at it), fewer filter passes`, () => {
      const random = createRandom(seed);
      const horizons = 20;
      const time = Float64Array.from({ length: horizons }, (_, i) => i * 0.2 + (i > 0 ? 0.1 * random.uniform() : 0));
      const samplingVariance = Float64Array.from({ length: horizons }, () => 0.005 + 0.01 * random.uniform());
      const design = lineageFromArrays({ time, mean: new Float64Array(horizons), samplingVariance });
      const lineage = withMeans(design, simulateMeans(findModel(generator)!, design, parameters, random));
      const plain = new LikelihoodEvaluator(ou, lineage);
      const byValues = maximiseProcess((process) => plain.profile(process), ou.process, lineage, { polish: true });
      const withSlopes = new LikelihoodEvaluator(ou, lineage);
      const gradient = new Float64Array(2);
      const bySlopes = maximiseProcess((process) => withSlopes.profile(process), ou.process, lineage, {
        polish: true,
        gradient: (process) => (withSlopes.profileScore(process, gradient), gradient),
      });
      expect(Math.abs(bySlopes.logLik - byValues.logLik)).toBeLessThan(1e-10 * Math.max(1, Math.abs(byValues.logLik)));
      expect(bySlopes.positions).toEqual(byValues.positions);
      // The reported logL is the dense Gaussian density at the reported estimates (ml-matrix Cholesky, engine/dense.ts).
      const estimates = ou.toParameters(withSlopes.details(bySlopes.process).coefficients, bySlopes.process, lineage);
      if (bySlopes.process[0] > 0) {
        const { mean, covariance } = ou.meanCovariance(lineage, estimates);
        expect(denseLogLik(mean, covariance, lineage.samplingVariance, lineage.mean)).toBeCloseTo(bySlopes.logLik, 8);
      }
      // Fewer filter passes (counted, not timed), score passes included.
      expect(withSlopes.evaluations + withSlopes.scoreEvaluations).toBeLessThan(plain.evaluations);
    });
  }
});
