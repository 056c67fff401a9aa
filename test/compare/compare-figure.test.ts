/**
 * compare's sections figure draws the winning hypothesis: when "shared" or
 * "shared-offset" wins, each section's curve is the winning model under that
 * hypothesis (its estimates from the joint fit), not the section's separate
 * fit. Checked against the random walk's closed forms (MODELS.md: mean a,
 * variance σ² t from the start of the process): under shared, each section
 * starts from its own a_s with the shared σ²; under shared-offset, one walk
 * runs from the oldest horizon of all sections, so section s (joining T0_s
 * later) has mean a + offset_s and variance σ² (T0_s + t). The lineages and
 * estimates are invented; the comparison is assembled by hand so the winner
 * is known.
 */
import { describe, expect, it } from 'vitest';
import { hypothesisCaption, sectionDocuments } from '../../src/analyses/compare-run.js';
import type { HypothesisFit, TraitComparison } from '../../src/compare/compare-sections.js';
import { offsetModel, sharedModel } from '../../src/compare/joint-models.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { figureLineage } from '../../src/render/figures/figure-input.js';
import { modelCurve, normal95, timeAxisFor } from '../../src/render/figures/geometry.js';

function section(name: string, firstAge: number, means: number[]): Lineage {
  const time = means.map((_, i) => 0.5 * i);
  return { ...lineageFromArrays({ time, mean: means, samplingVariance: means.map(() => 0.004), section: name, trait: 'whorl width' }), firstAge };
}

const sections = [section('North Cut', 10, [3.0, 3.1, 3.3, 3.2, 3.4, 3.5]), section('South Cut', 9, [3.6, 3.5, 3.7, 3.9, 3.8, 4.0])];

function comparisonWith(hypothesis: HypothesisFit): TraitComparison {
  return { trait: 'whorl width', sections, horizons: 12, hypotheses: [hypothesis], best: { id: hypothesis.id, model: hypothesis.model }, tests: [] };
}

function hypothesisFit(id: 'shared' | 'shared-offset', estimates: Record<string, number>): HypothesisFit {
  const joint = id === 'shared' ? sharedModel(randomWalk, sections) : offsetModel(randomWalk, sections);
  return { id, model: 'random-walk', label: randomWalk.label, k: 3, horizons: 12, logLik: 1, aicc: 1, deltaAicc: 0, weight: 1, converged: true, message: null, parameters: {}, estimates, flags: [], sectionFits: null, joint, fit: null };
}

function curvesOf(comparison: TraitComparison) {
  const documents = sectionDocuments(comparison, [randomWalk]);
  const lineages = documents.map((document) => figureLineage(document));
  const axis = timeAxisFor(lineages);
  return lineages.map((lineage) => ({ lineage, curve: modelCurve(lineage, axis, 'random-walk').curve! }));
}

describe('compare figure: the winning hypothesis', () => {
  it('shared: each section from its own start with the shared step variance', () => {
    const stepVariance = 0.03;
    const starts = { 'North Cut': 3.05, 'South Cut': 3.62 };
    const comparison = comparisonWith(hypothesisFit('shared', { 'ancestral_mean[North Cut]': starts['North Cut'], 'ancestral_mean[South Cut]': starts['South Cut'], step_variance: stepVariance }));
    curvesOf(comparison).forEach(({ lineage, curve }, s) => {
      const start = Object.values(starts)[s];
      curve.time.forEach((age, i) => {
        const t = lineage.position[0] - age;
        expect(curve.mean[i]).toBeCloseTo(start, 12);
        expect(curve.upper[i] - curve.mean[i]).toBeCloseTo(normal95 * Math.sqrt(stepVariance * t), 12);
      });
    });
    expect(hypothesisCaption(comparison, 'unbiased random walk')).toContain('one process shared by all sections');
  });

  it('shared-offset: one walk from the oldest horizon, each section shifted by its offset', () => {
    const stepVariance = 0.02;
    const comparison = comparisonWith(hypothesisFit('shared-offset', { ancestral_mean: 3.1, step_variance: stepVariance, 'offset[South Cut]': 0.4 }));
    const offsets = [0, 0.4];
    // North Cut's first horizon is the oldest (10 Ma); South Cut joins at 9 Ma, 1 Myr later.
    const joins = [0, 1];
    curvesOf(comparison).forEach(({ lineage, curve }, s) => {
      curve.time.forEach((age, i) => {
        const t = lineage.position[0] - age;
        expect(curve.mean[i]).toBeCloseTo(3.1 + offsets[s], 12);
        expect(curve.upper[i] - curve.mean[i]).toBeCloseTo(normal95 * Math.sqrt(stepVariance * (joins[s] + t)), 12);
      });
    });
    expect(hypothesisCaption(comparison, 'unbiased random walk')).toContain('shifted by its own offset');
  });
});
