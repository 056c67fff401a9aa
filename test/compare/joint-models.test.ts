import { describe, expect, it } from 'vitest';
import { offsetModel, sharedModel } from '../../src/compare/joint-models.js';
import { mergeSections } from '../../src/compare/stack.js';
import { denseLogLik } from '../../src/engine/dense.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { classicModels } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';

/** A section with random unequal spacing, starting at age `firstAge`. */
function section(random: ReturnType<typeof createRandom>, name: string, size: number, firstAge: number): Lineage {
  const time = [0];
  for (let i = 1; i < size; i++) time.push(time[i - 1] + 0.05 + random.uniform());
  return {
    ...lineageFromArrays({
      time,
      mean: time.map(() => 10 + random.normal()),
      samplingVariance: time.map(() => 0.01 + 0.2 * random.uniform()),
      section: name,
      trait: 'width',
    }),
    firstAge,
  };
}

function parametersFor(names: readonly string[], random: ReturnType<typeof createRandom>, alpha: number): Record<string, number> {
  const values: Record<string, number> = {};
  for (const name of names) {
    if (name === 'alpha') values[name] = alpha;
    else if (name.endsWith('variance')) values[name] = 10 ** (-3 + 3 * random.uniform());
    else if (name === 'drift') values[name] = random.normal();
    else if (name.startsWith('offset')) values[name] = random.normal();
    else values[name] = 10 + 2 * random.normal();
  }
  return values;
}

// Filter ≡ dense reference for the joint models: the O(N) filter over the
// stacked sections against the dense multivariate normal assembled straight
// from the definitions (block-diagonal of MODELS.md blocks for shared; the
// MODELS.md form on common time plus offsets for shared-offset), Cholesky by
// ml-matrix (a general-purpose library). Agreement to 1e-9 relative.
describe('joint models: filter against the dense reference', () => {
  const random = createRandom(404);
  const designs = Array.from({ length: 6 }, (_, d) => [
    section(random, 'Orlen Gap', 5 + d, 12.0),
    section(random, 'Marrow Cut', 4 + (d % 3), 11.2 + 0.3 * d),
    ...(d % 2 === 0 ? [section(random, 'Pell Ridge', 6, 12.5)] : []),
  ]);
  for (const base of classicModels) {
    for (const build of [sharedModel, offsetModel]) {
      it(`${base.id}, ${build === sharedModel ? 'shared' : 'shared-offset'}: filter and dense logL agree`, () => {
        let checked = 0;
        for (const sections of designs) {
          const joint = build(base, sections);
          for (const alpha of [0.05, 0.7, 4]) {
            const parameters = parametersFor(joint.model.parameters.map((spec) => spec.name), random, alpha);
            const evaluator = new LikelihoodEvaluator(joint.model, joint.lineage);
            const filtered = evaluator.atParameters(parameters);
            const { mean, covariance } = joint.model.meanCovariance(joint.lineage, parameters);
            const dense = denseLogLik(mean, covariance, joint.lineage.samplingVariance, joint.lineage.mean);
            expect(Math.abs(filtered - dense) / Math.max(1, Math.abs(dense))).toBeLessThan(1e-9);
            checked += 1;
          }
        }
        expect(checked).toBe(18);
      });
    }
  }

  // Closed form (block-diagonal covariance): under shared, the joint logL at
  // given parameters is the sum of the sections' own logL at their parameters.
  it('shared logL at given parameters is the sum of the single-section logL', () => {
    const sections = designs[0];
    for (const base of classicModels) {
      const joint = sharedModel(base, sections);
      const parameters = parametersFor(joint.model.parameters.map((spec) => spec.name), random, 0.5);
      const total = new LikelihoodEvaluator(joint.model, joint.lineage).atParameters(parameters);
      let sum = 0;
      sections.forEach((lineage, s) => { sum += new LikelihoodEvaluator(base, lineage).atParameters(joint.sectionParameters(parameters, s)); });
      expect(Math.abs(total - sum)).toBeLessThan(1e-9 * Math.max(1, Math.abs(sum)));
    }
  });

  // K counted by hand from the definitions: shared adds one ancestral mean per
  // extra section for the walks and ou; stasis shares everything;
  // shared-offset adds one offset per extra section.
  it('parameter counts', () => {
    const sections = designs[0];
    const expected: Record<string, [number, number]> = {
      'strict-stasis': [1, 3], stasis: [2, 4], 'random-walk': [4, 4], 'directional-walk': [5, 5], ou: [6, 6],
    };
    for (const base of classicModels) {
      expect([sharedModel(base, sections).model.parameterCount(sections[0]), offsetModel(base, sections).model.parameterCount(sections[0])]).toEqual(expected[base.id]);
    }
  });

  // Closed form: shared-offset with every offset 0 is the base model on the merged timeline.
  it('shared-offset with zero offsets equals the base model on the merged timeline', () => {
    const sections = designs[2];
    for (const base of classicModels) {
      const joint = offsetModel(base, sections);
      const parameters = parametersFor(joint.model.parameters.map((spec) => spec.name), random, 0.4);
      for (const spec of joint.model.parameters) if (spec.name.startsWith('offset[')) parameters[spec.name] = 0;
      const merged = mergeSections(sections).lineage;
      const { mean, covariance } = base.meanCovariance(merged, parameters);
      const dense = denseLogLik(mean, covariance, merged.samplingVariance, merged.mean);
      const filtered = new LikelihoodEvaluator(joint.model, joint.lineage).atParameters(parameters);
      expect(Math.abs(filtered - dense)).toBeLessThan(1e-9 * Math.max(1, Math.abs(dense)));
    }
  });

  // Hand-computed merge: ages 10, 9 (A) and 10, 9.5 (B) → common times 0, 0, 0.5, 1.
  it('merges sections onto common time, pooling coeval horizons when asked', () => {
    const a = { ...lineageFromArrays({ time: [0, 1], mean: [1, 2], samplingVariance: [0.1, 0.1], count: [4, 4], section: 'A' }), firstAge: 10 };
    const b = { ...lineageFromArrays({ time: [0, 0.5], mean: [3, 5], samplingVariance: [0.2, 0.2], count: [2, 2], section: 'B' }), firstAge: 10 };
    const kept = mergeSections([a, b]);
    expect(Array.from(kept.lineage.time)).toEqual([0, 0, 0.5, 1]);
    expect(kept.sectionOf).toEqual([0, 1, 1, 0]);
    const merged = mergeSections([a, b], { mergeCoeval: true });
    expect(Array.from(merged.lineage.time)).toEqual([0, 0.5, 1]);
    // n = 6; mean = (4*1 + 2*3)/6 = 5/3; within v_A = 0.4, v_B = 0.4;
    // SS = 3*0.4 + 1*0.4 + 4*(1-5/3)^2 + 2*(3-5/3)^2 = 1.6 + 16/9 + 32/9 = 1.6 + 48/9; v = SS/5.
    expect(merged.lineage.mean[0]).toBeCloseTo(5 / 3, 12);
    expect(merged.lineage.withinVariance[0]).toBeCloseTo((1.6 + 48 / 9) / 5, 12);
    expect(merged.lineage.samplingVariance[0]).toBeCloseTo((1.6 + 48 / 9) / 30, 12);
  });
});

// ou at alpha = 0 is the directional walk with drift (optimum − a)·alpha, the
// finite limit coefficient reported as `limit_drift` (MODELS.md, ou; a closed
// form of the model). Under "shared" that coefficient is a column shared by
// every section, which in the joint design sits after each section's own
// starting value — reading the base model's column index there gave the
// second section's starting value instead of the drift.
describe('joint models: ou limit_drift under "shared"', () => {
  it('equals the shared directional walk drift when alpha is at 0', async () => {
    const { fitModel } = await import('../../src/fit/fit-model.js');
    const ou = classicModels.find((model) => model.id === 'ou')!;
    const walk = classicModels.find((model) => model.id === 'directional-walk')!;
    const make = (name: string, start: number, size: number): Lineage => {
      const time = Array.from({ length: size }, (_, i) => i * 0.7 + (i % 3) * 0.1);
      // Straight, parallel means: any alpha > 0 would bend them, so ou is best at alpha = 0.
      return { ...lineageFromArrays({ time, mean: time.map((t) => start + 0.8 * t), samplingVariance: time.map(() => 0.04), section: name, trait: 'width' }), firstAge: 10 };
    };
    const sections = [make('Orlen Gap', 20, 9), make('Marrow Cut', 20.3, 8)];
    const ouFit = fitModel(sharedModel(ou, sections).model, sharedModel(ou, sections).lineage, { intervals: false });
    const walkFit = fitModel(sharedModel(walk, sections).model, sharedModel(walk, sections).lineage, { intervals: false });
    expect(ouFit.parameters.alpha.estimate).toBe(0);
    expect(ouFit.logLik).toBeCloseTo(walkFit.logLik, 8);
    expect(ouFit.derived.limit_drift.estimate!).toBeCloseTo(walkFit.parameters.drift.estimate!, 6);
  });
});
