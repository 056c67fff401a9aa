import { describe, expect, it } from 'vitest';
import { fitModel } from '../../src/fit/fit-model.js';
import { classicModels, findModel } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';
import { randomTestLineage } from '../support/random-lineage.js';

// Issue 14: fitModel standardises a lineage once for every model fitted to it (one scaled copy per lineage
// object, so the caches kept per time array serve all of them). Reference: the same fit made on a fresh copy
// of the lineage (its own standardisation, as before the change), which must be identical bit for bit, in
// whatever order the models are fitted.
describe('one standardised lineage shared by the models fitted to it', () => {
  const models = [...classicModels, findModel('accelerating-walk')!, findModel('stasis-then-random-walk')!];
  it('gives every model the fit it gets on a lineage of its own', () => {
    const random = createRandom(2214);
    for (let design = 0; design < 3; design++) {
      const lineage = randomTestLineage(random, design, 8);
      const shared = models.map((model) => fitModel(model, lineage, { intervals: false }));
      const reversed = [...models].reverse().map((model) => fitModel(model, lineage, { intervals: false })).reverse();
      const alone = models.map((model) => fitModel(model, { ...lineage }, { intervals: false }));
      expect(shared).toEqual(alone);
      expect(reversed).toEqual(alone);
    }
  });
});
