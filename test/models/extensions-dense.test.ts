import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import type { Lineage } from '../../src/lineage.js';
import { extensionModels } from '../../src/models/extensions.js';
import type { EvolutionModel } from '../../src/models/model.js';
import { createRandom, type RandomSource } from '../../src/random/random.js';
import { randomTestLineage } from '../support/random-lineage.js';

// Filter ≡ dense reference for every model beyond the classic five: the O(N)
// filter on each model's state-space form and the dense multivariate normal
// built straight from its written-out mean and covariance (Cholesky by
// ml-matrix, a general-purpose library) must agree to 1e-9 relative, at
// random parameters, shift positions, unequal spacing and sampling variances.

function randomParameters(model: EvolutionModel, lineage: Lineage, random: RandomSource): Record<string, number> {
  const parameters: Record<string, number> = {};
  for (const spec of model.parameters) {
    if (spec.role === 'location') parameters[spec.name] = spec.unit.time === -1 ? random.normal() : 10 + 2 * random.normal();
    else if (spec.role === 'rate') {
      // A rate (alpha, rate_change) is never exactly 0 here: the dense forms divide by it (its limit 0 is checked by each model's own tests).
      const negative = spec.lowerBound < 0 && random.uniform() < 0.5;
      parameters[spec.name] = (negative ? -1 : 1) * 10 ** (-3 + 3 * random.uniform());
    } else parameters[spec.name] = random.uniform() < 0.15 ? 0 : 10 ** (-4 + 4 * random.uniform());
  }
  const shiftCount = model.id.startsWith('punctuated-2') ? 2 : model.configurations ? 1 : 0;
  const size = lineage.time.length;
  let earliest = 2;
  for (let k = 0; k < shiftCount; k++) {
    const latest = size - 2 * (shiftCount - k);
    const shift = earliest + Math.floor(random.uniform() * (latest - earliest + 1));
    parameters[`shift_${k + 1}_time`] = lineage.time[shift];
    parameters[`shift_${k + 1}_previous_time`] = lineage.time[shift - 1];
    earliest = shift + 2;
  }
  return parameters;
}

describe('extension models: filter against the dense multivariate-normal reference', () => {
  const random = createRandom(11);
  const designs = Array.from({ length: 25 }, (_, design) => randomTestLineage(random, design, 30));
  for (const model of extensionModels) {
    it(`${model.id}: filter and dense logL agree to 1e-9 relative`, () => {
      let checked = 0;
      for (const lineage of designs) {
        for (let draw = 0; draw < 3; draw++) {
          const parameters = randomParameters(model, lineage, random);
          const filtered = new LikelihoodEvaluator(model, lineage).atParameters(parameters);
          const { mean, covariance } = model.meanCovariance(lineage, parameters);
          const dense = denseLogLik(mean, covariance, lineage.samplingVariance, lineage.mean);
          expect(Number.isFinite(dense)).toBe(true);
          expect(Math.abs(filtered - dense) / Math.max(1, Math.abs(dense))).toBeLessThan(1e-9);
          checked += 1;
        }
      }
      expect(checked).toBe(75);
    });
  }
});
