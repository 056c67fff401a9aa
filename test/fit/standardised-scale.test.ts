import { describe, expect, it } from 'vitest';
import { fitModel, type ModelFit } from '../../src/fit/fit-model.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import type { EvolutionModel } from '../../src/models/model.js';
import { classicModels, findModel } from '../../src/models/registry.js';
import '../../src/models/extensions.js';
import { createRandom } from '../../src/random/random.js';

// Issues 23 and 25: the fit must not depend on the units. Closed form (change of variables, common practice):
// with the trait multiplied by c and time by d, a parameter of unit trait^p time^q is multiplied by c^p d^q,
// shift positions are unchanged and logL drops by N ln c (the Jacobian of the trait's scale).

function base(): Lineage {
  const random = createRandom(2523);
  const time = [0];
  for (let i = 1; i < 20; i++) time.push(time[i - 1] + 0.3 + random.uniform());
  let walk = 0;
  const mean = time.map((_, i) => {
    walk += i ? 0.3 * random.normal() + 0.1 : 0;
    return 5 + walk + (i > 10 ? 1 : 0) + 0.3 * random.normal();
  });
  return lineageFromArrays({ time, mean, samplingVariance: time.map(() => 0.05) });
}

const rescaled = (lineage: Lineage, trait: number, time: number): Lineage =>
  lineageFromArrays({
    time: Array.from(lineage.time, (t) => t * time),
    mean: Array.from(lineage.mean, (x) => x * trait),
    samplingVariance: Array.from(lineage.samplingVariance, (e) => e * trait * trait),
  });

function expectConverted(model: EvolutionModel, original: ModelFit, changed: ModelFit, trait: number, time: number): void {
  const size = original.horizons;
  expect(Math.abs(original.logLik - size * Math.log(trait) - changed.logLik) / Math.max(1, Math.abs(changed.logLik)), 'logL').toBeLessThan(1e-8);
  expect((changed.extra?.shifts as { index: number }[] | undefined)?.map((shift) => shift.index)).toEqual(
    (original.extra?.shifts as { index: number }[] | undefined)?.map((shift) => shift.index),
  );
  for (const [name, estimate] of Object.entries(original.parameters)) {
    const unit = model.parameters.find((spec) => spec.name === name)?.unit ?? { trait: 0, time: 1 }; // shift times
    const factor = trait ** unit.trait * time ** unit.time;
    const other = changed.parameters[name];
    const width = Math.abs((estimate.upper ?? estimate.estimate ?? 0) - (estimate.lower ?? estimate.estimate ?? 0)) * factor;
    for (const key of ['estimate', 'lower', 'upper'] as const) {
      const value = estimate[key];
      const converted = other[key];
      if (value === null || converted === null) {
        expect(converted, `${model.id} ${name} ${key}`).toBe(value);
        continue;
      }
      // 1e-8 relative to the value or to the interval's width, whichever is larger (the README's promise).
      const scale = Math.max(Math.abs(value * factor), width, Number.MIN_VALUE);
      expect(Math.abs(value * factor - converted) / scale, `${model.id} ${name} ${key}`).toBeLessThan(1e-8);
    }
    expect(other.atBound, `${model.id} ${name} at bound`).toBe(estimate.atBound);
  }
}

describe('estimates and interval ends in converted units (default interval method)', () => {
  const lineage = base();
  const models = [...classicModels, findModel('random-walk-then-directional-walk'), findModel('directional-walk-then-random-walk')] as EvolutionModel[];
  const fits = new Map(models.map((model) => [model.id, fitModel(model, lineage)]));
  const cases = [
    { label: 'trait × 1e-6 (mm² → m²), ages in ka instead of Ma', trait: 1e-6, time: 1e3 },
    { label: 'trait × 1e6', trait: 1e6, time: 1 },
    { label: 'times of order 1e15 (accepted, ≥ 1e14)', trait: 1, time: 1e15 },
    { label: 'times of order 1e-16 (accepted, ≤ 1e-15)', trait: 1, time: 1e-16 },
  ];
  for (const { label, trait, time } of cases) {
    it(label, () => {
      const changed = rescaled(lineage, trait, time);
      for (const model of models) {
        const fit = fitModel(model, changed);
        expect(fit.converged, model.id).toBe(true);
        expectConverted(model, fits.get(model.id) as ModelFit, fit, trait, time);
      }
    });
  }
});

describe('profile and adjusted interval ends in converted units (issue 25: root-finder tolerances were absolute)', () => {
  const lineage = base();
  for (const intervalMethod of ['profile', 'adjusted'] as const) {
    it(`${intervalMethod}: trait × 1e-6 with ages in ka, and trait × 1e6`, () => {
      for (const model of classicModels) {
        const original = fitModel(model, lineage, { intervalMethod });
        for (const [trait, time] of [[1e-6, 1e3], [1e6, 1]]) {
          expectConverted(model, original, fitModel(model, rescaled(lineage, trait, time), { intervalMethod }), trait, time);
        }
      }
    });
  }
});
