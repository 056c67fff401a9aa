import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compareSections } from '../../src/compare/compare-sections.js';
import { offsetModel } from '../../src/compare/joint-models.js';
import { mergeSections } from '../../src/compare/stack.js';
import { likelihoodRatioTest } from '../../src/compare/likelihood-ratio.js';
import { chiSquareSurvival } from '../../src/statistics/chi-square.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { classicModels } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

type Random = ReturnType<typeof createRandom>;

const reference = JSON.parse(readFileSync(new URL('../fixtures/compare/chi-square-survival.json', import.meta.url), 'utf8')) as {
  chi2_sf: { df: number; x: number; survival: number }[];
  erfc: { x: number; erfc_sqrt_half_x: number }[];
};

/** A simulated section: `size` horizons evenly spaced over `span`, first horizon at age `firstAge`. */
function simulatedSection(random: Random, name: string, size: number, span: number, firstAge: number, parameters: Record<string, number>): Lineage {
  const time = Array.from({ length: size }, (_, i) => (span * i) / (size - 1));
  const design = { ...lineageFromArrays({ time, mean: time.map(() => 0), samplingVariance: time.map(() => 0.01), count: time.map(() => 20), section: name, trait: 'width' }), firstAge };
  return withMeans(design, simulateMeans(directionalWalk, design, parameters, random));
}

describe('compare: separate, shared and shared-offset', () => {
  const random = createRandom(2026);
  const common = { ancestral_mean: 5, drift: 0.8, step_variance: 0.02 };
  const sections = [
    simulatedSection(random, 'Orlen Gap', 14, 4, 12, common),
    simulatedSection(random, 'Marrow Cut', 12, 3.5, 11.5, { ...common, ancestral_mean: 5.3 }),
  ];
  const comparison = compareSections(sections, classicModels, { intervals: false });

  // Definition (the issue): separate = sum of single-section fits, exactly.
  it('separate logL and K are the sums of the single-section fits (to 1e-9)', () => {
    for (const base of classicModels) {
      const separate = comparison.hypotheses.find((h) => h.model === base.id && h.id === 'separate')!;
      const singles = sections.map((section) => fitModel(base, section, { intervals: false }));
      expect(Math.abs(separate.logLik - (singles[0].logLik + singles[1].logLik))).toBeLessThan(1e-9);
      expect(separate.k).toBe(singles[0].k + singles[1].k);
      expect(separate.horizons).toBe(26);
    }
  });

  // Nesting (shared is separate with equality constraints), so its maximum cannot be higher.
  it('shared logL never exceeds separate', () => {
    for (const base of classicModels) {
      const shared = comparison.hypotheses.find((h) => h.model === base.id && h.id === 'shared')!;
      const separate = comparison.hypotheses.find((h) => h.model === base.id && h.id === 'separate')!;
      expect(shared.logLik).toBeLessThanOrEqual(separate.logLik + 1e-7);
    }
  });

  // Burnham & Anderson (2002): Akaike weights over the compared set sum to 1.
  it('weights sum to 1 over every hypothesis and family', () => {
    const total = comparison.hypotheses.reduce((sum, h) => sum + (h.weight ?? 0), 0);
    expect(Math.abs(total - 1)).toBeLessThan(1e-12);
    expect(comparison.hypotheses.length).toBe(14);
  });

  // Seeded simulation: one parameter set for both sections, so a shared hypothesis should win.
  it('sections simulated from one parameter set favour a shared hypothesis', () => {
    let sharedWins = 0;
    const simulations = 6;
    const local = createRandom(77);
    for (let r = 0; r < simulations; r++) {
      const pair = [
        simulatedSection(local, 'Orlen Gap', 16, 4, 12, common),
        simulatedSection(local, 'Marrow Cut', 16, 4, 12, { ...common, ancestral_mean: 4.6 }),
      ];
      const result = compareSections(pair, [directionalWalk], { intervals: false });
      const weightOf = (id: string) => result.hypotheses.filter((h) => h.id === id).reduce((sum, h) => sum + (h.weight ?? 0), 0);
      if (weightOf('shared') + weightOf('shared-offset') > weightOf('separate')) sharedWins += 1;
    }
    expect(sharedWins).toBeGreaterThanOrEqual(5);
  });

  // Seeded simulation from the shared-offset model itself (one path, offset +0.5 for the
  // second section, step variance 0.4 so the shared wiggles show): shared-offset should be best and recover the offset within its 95% interval.
  it('one lineage seen with an offset favours shared-offset and recovers the offset', () => {
    const local = createRandom(79);
    const design = [
      simulatedSection(local, 'Orlen Gap', 15, 4, 12, common),
      simulatedSection(local, 'Marrow Cut', 12, 3.3, 11.6, common),
    ];
    const joint = offsetModel(directionalWalk, design);
    const truth = { ...common, step_variance: 0.4, 'offset[Marrow Cut]': 0.5 };
    let recovered = 0;
    for (let r = 0; r < 4; r++) {
      const means = simulateMeans(joint.model, joint.lineage, truth, local);
      // Put the simulated means back into the sections (merged rows -> section rows).
      const sections = design.map((section) => ({ ...section, mean: new Float64Array(section.mean.length) }));
      const counters = [0, 0];
      const merged = mergeSections(design);
      merged.sectionOf.forEach((s, i) => { sections[s].mean[counters[s]++] = means[i]; });
      const result = compareSections(sections, [directionalWalk], { intervals: true });
      expect(result.best).toEqual({ id: 'shared-offset', model: 'directional-walk' });
      const offset = result.hypotheses.find((h) => h.id === 'shared-offset')!.parameters['offset[Marrow Cut]'];
      if (offset.lower! <= 0.5 && 0.5 <= offset.upper!) recovered += 1;
    }
    expect(recovered).toBeGreaterThanOrEqual(3);
  });

  // Seeded simulation: drifts of +1 and -1 per Myr with little noise; separate should win clearly.
  it('sections with clearly different drifts favour separate', () => {
    const local = createRandom(78);
    for (let r = 0; r < 4; r++) {
      const pair = [
        simulatedSection(local, 'Orlen Gap', 16, 4, 12, { ...common, drift: 1 }),
        simulatedSection(local, 'Marrow Cut', 16, 4, 12, { ...common, drift: -1 }),
      ];
      const result = compareSections(pair, [directionalWalk], { intervals: false });
      const separate = result.hypotheses.find((h) => h.id === 'separate')!;
      expect(separate.weight!).toBeGreaterThan(0.95);
      expect(result.tests[0].pValue!).toBeLessThan(0.001);
    }
  });
});

describe('chi-square p-values of the likelihood-ratio test', () => {
  // Closed form chi-square(1) survival = erfc(sqrt(x / 2)), erfc evaluated by
  // scipy.special.erfc (fixture made by test/fixtures/compare/make_chi_square.py).
  it('df = 1 matches erfc(sqrt(x/2)) from scipy', () => {
    for (const point of reference.erfc) {
      expect(Math.abs(chiSquareSurvival(point.x, 1) - point.erfc_sqrt_half_x)).toBeLessThan(1e-13);
    }
  });
  // scipy.stats.chi2.sf over several df (same fixture); absolute 1e-13 since 1 - cdf loses relative precision in far tails.
  it('matches scipy.stats.chi2.sf for df 1 to 12', () => {
    for (const point of reference.chi2_sf) {
      expect(Math.abs(chiSquareSurvival(point.x, point.df) - point.survival)).toBeLessThan(1e-13);
    }
  });
  it('df = 2 matches exp(-x/2)', () => {
    for (const x of [0.1, 1, 2.5, 7, 20]) expect(Math.abs(chiSquareSurvival(x, 2) - Math.exp(-x / 2))).toBeLessThan(1e-13);
  });
  // Closed form for df = 4: survival = exp(-x/2) (1 + x/2).
  it('df = 4 matches exp(-x/2)(1 + x/2), and the test statistic is 2 (logL_full - logL_restricted)', () => {
    const test = likelihoodRatioTest(-20, 3, -17.5, 7);
    expect(test.statistic).toBe(5);
    expect(test.degreesOfFreedom).toBe(4);
    expect(Math.abs(test.pValue! - Math.exp(-2.5) * (1 + 2.5))).toBeLessThan(1e-13);
  });
});
