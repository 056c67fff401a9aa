import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { allocateStateSpace } from '../../src/engine/state-space.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { extensionModels } from '../../src/models/extensions.js';
import { bindConfiguration, type EvolutionModel } from '../../src/models/model.js';
import { createRandom } from '../../src/random/random.js';
import { randomTestLineage } from '../support/random-lineage.js';

// Issue 14: a shift model bound to one position resumes its filter after the
// rows before the shift, kept per value of the first process axis
// (src/fit/prefix-filter.ts). References: the plain filter of
// engine/kalman-filter.ts, which must give the same sums bit for bit, and the
// dense multivariate normal of each model's written-out mean and covariance
// (ml-matrix Cholesky, engine/dense.ts), to 1e-9 relative.

const prefixModels = extensionModels.filter((model) => model.prefixAxes !== undefined && !model.blocks);
const random = createRandom(1414);
const lineages = Array.from({ length: 6 }, (_, design) => randomTestLineage(random, design, 16));

describe('models that share the rows before the shift', () => {
  it('are the four mode shifts whose second mode is a walk', () => {
    // Read off mode-shift.ts: a walk after the shift continues from the first segment's state, so those
    // fits are not separable blocks and search every position in full.
    expect(prefixModels.map((model) => model.id).sort()).toEqual([
      'directional-walk-then-random-walk',
      'random-walk-then-directional-walk',
      'stasis-then-directional-walk',
      'stasis-then-random-walk',
    ]);
  });

  for (const model of prefixModels) {
    it(`${model.id}: rows before the shift do not depend on the shift or on the later axes`, () => {
      const axes = model.prefixAxes as number;
      for (const lineage of lineages) {
        const size = lineage.mean.length;
        const width = model.width(lineage);
        const fill = (process: number[]): ReturnType<typeof allocateStateSpace> => {
          const space = allocateStateSpace(size, width, lineage.samplingVariance);
          model.fillSpace(lineage, process, space);
          return space;
        };
        for (let shift = 1; shift < size; shift++) {
          const searched = model.process.map(() => 10 ** (-3 + 3 * random.uniform()));
          const other = searched.map((value, k) => (k < axes ? value : 10 ** (-3 + 3 * random.uniform())));
          const here = fill([...searched, shift]);
          const later = fill([...other, size]);
          for (let i = 0; i < shift; i++) {
            if (i > 0) expect(later.transition[i]).toBe(here.transition[i]);
            expect(later.processVariance[i]).toBe(here.processVariance[i]);
            for (let j = 0; j < width; j++) expect(later.design[i * width + j]).toBe(here.design[i * width + j]);
          }
        }
      }
    });

    it(`${model.id}: the resumed filter gives the plain filter's logL bit for bit, and the dense logL`, () => {
      let resumed = 0;
      for (const lineage of lineages) {
        const size = lineage.mean.length;
        for (const shift of [3, Math.floor(size / 2), size - 3]) {
          const bound = bindConfiguration(model, { shifts: [shift] });
          const plainModel: EvolutionModel = { ...bound, sharedPrefix: undefined };
          const withPrefix = new LikelihoodEvaluator(bound, lineage);
          const plain = new LikelihoodEvaluator(plainModel, lineage);
          expect(withPrefix.prefix).not.toBeNull();
          expect(plain.prefix).toBeNull();
          // The search's pattern: the first axis held while the second varies, then a new first value;
          // a zero variance and a repeated first value after others.
          // (Exact repeats of both values are answered by the evaluator's cache and never reach the filter.)
          const firsts = [0.02, 0.5, 0, 0.02];
          for (const [index, firstValue] of firsts.entries()) {
            for (const secondValue of index < 3 ? [0, 0.001, 0.3, 4] : [0.0017, 0.51, 6.8, 0.09]) {
              const process = [firstValue, secondValue];
              expect(withPrefix.profile(process)).toBe(plain.profile(process));
              const parameters = { ...model.toParameters(withPrefix.details(process).coefficients, [...process, shift], lineage) };
              const { mean, covariance } = model.meanCovariance(lineage, parameters);
              const dense = denseLogLik(mean, covariance, lineage.samplingVariance, lineage.mean);
              const filtered = withPrefix.atParameters(parameters);
              expect(Math.abs(filtered - dense) / Math.max(1, Math.abs(dense))).toBeLessThan(1e-9);
            }
          }
          resumed += withPrefix.prefix?.resumed ?? 0;
        }
      }
      // Per bound model: 4 first values (3 distinct) × 4 second values, the first pass of each distinct first value runs in full.
      expect(resumed).toBe(lineages.length * 3 * (16 - 3));
    });
  }
});
