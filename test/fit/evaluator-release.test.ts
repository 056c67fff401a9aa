import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { findModel } from '../../src/models/registry.js';

// A released evaluator hands its filter cache's storage to the next one of
// the same shape (issue 14). The next one must start empty: the same process
// values on another lineage give that lineage's likelihood. Reference: the
// dense multivariate normal of MODELS.md's mean and covariance (ml-matrix
// Cholesky, engine/dense.ts), to 1e-9 relative.
describe('released filter caches', () => {
  const ou = findModel('ou')!;
  const first = lineageFromArrays({ time: [0, 1, 2.5, 3, 4.2, 5], mean: [1, 1.4, 2.2, 2.1, 2.9, 3.3], samplingVariance: [0.05, 0.04, 0.06, 0.05, 0.05, 0.04] });
  const second = lineageFromArrays({ time: [0, 0.5, 1.5, 2, 3.5, 4], mean: [4, 3.1, 3.3, 2.2, 2.5, 1.9], samplingVariance: [0.02, 0.03, 0.02, 0.04, 0.03, 0.02] });
  const parameters = { ancestral_mean: 2, optimum: 3, alpha: 0.6, step_variance: 0.3 };

  it('a new evaluator on storage released by another answers for its own lineage', () => {
    const used = new LikelihoodEvaluator(ou, first);
    for (let k = 0; k < 300; k++) used.profile([0.1 + 0.01 * k, 0.3]);
    used.atParameters(parameters);
    used.release();
    const next = new LikelihoodEvaluator(ou, second);
    // Its first pass takes the released storage; the second asks for process values the first evaluator had kept.
    next.profile([0.25, 0.3]);
    const value = next.atParameters(parameters);
    const { mean, covariance } = ou.meanCovariance(second, parameters);
    const dense = denseLogLik(mean, covariance, second.samplingVariance, second.mean);
    expect(Math.abs(value - dense) / Math.abs(dense)).toBeLessThan(1e-9);
    // The released evaluator still works (from an empty cache).
    const again = used.atParameters(parameters);
    const reference = ou.meanCovariance(first, parameters);
    const denseFirst = denseLogLik(reference.mean, reference.covariance, first.samplingVariance, first.mean);
    expect(Math.abs(again - denseFirst) / Math.abs(denseFirst)).toBeLessThan(1e-9);
  });
});
