import { describe, expect, it } from 'vitest';
import { findModel } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';
import { meansSimulator, simulateMeans } from '../../src/random/simulate-lineage.js';
import { randomTestLineage } from '../support/random-lineage.js';

// Issue 14: the replicate loops fill a generator's state space once and draw every replicate from it
// (meansSimulator). Reference: simulateMeans, which fills it for each draw; from the same seed the draws must be
// the same bit for bit (seeded outputs of power, bootstrap and simulate stay byte-identical), and each call must
// return a new array (caches are kept per means array).
describe('meansSimulator', () => {
  const cases: Array<[string, Record<string, number>]> = [
    ['directional-walk', { ancestral_mean: 5, drift: 0.3, step_variance: 0.02 }],
    ['ou', { ancestral_mean: 5, optimum: 7, alpha: 0.8, step_variance: 0.05 }],
    ['stasis', { stasis_mean: 2, stasis_variance: 0.01 }],
  ];
  it('draws what simulateMeans draws from the same seed, in a new array each time', () => {
    const lineage = randomTestLineage(createRandom(5), 1, 12);
    for (const [id, parameters] of cases) {
      const model = findModel(id)!;
      const draw = meansSimulator(model, lineage, parameters);
      const prepared = createRandom(31);
      const fresh = createRandom(31);
      const seen: Float64Array[] = [];
      for (let replicate = 0; replicate < 5; replicate++) {
        const means = draw(prepared);
        expect(Array.from(means)).toEqual(Array.from(simulateMeans(model, lineage, parameters, fresh)));
        expect(seen.includes(means)).toBe(false);
        seen.push(means);
      }
    }
  });
});
