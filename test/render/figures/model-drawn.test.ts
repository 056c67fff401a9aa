/**
 * What the trajectory figure draws for the model asked for:
 * - the smoothed band is the smoother of the model drawn, never the best
 *   model's (fit.json holds only the best model's; `withSmootherOf` works out
 *   another model's from its estimates, checked against the Gaussian
 *   conditional expectation computed densely with ml-matrix);
 * - ou at its alpha → 0 limit is drawn as the directional walk it equals
 *   there (MODELS.md: "ou with alpha -> 0 … tends to directional-walk when
 *   the optimum runs away with (optimum - a) * alpha -> drift"), with
 *   mean a + drift·t and variance σ²t, and the figure says so.
 */
import { inverse, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { withSmootherOf } from '../../../src/analyses/figure-files.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions } from '../../../src/render/figures/figure-options.js';
import { modelCurve, normal95, timeAxisFor } from '../../../src/render/figures/geometry.js';
import { trajectoryPlan } from '../../../src/render/figures/trajectory.js';
import { ridgeDocument } from './documents.js';
import { recordDrawnText } from './drawn-text.js';

function drawnWords(document: unknown, options: Parameters<typeof resolveFigureOptions>[0]): string {
  const resolved = resolveFigureOptions(options);
  return recordDrawnText(trajectoryPlan([figureLineage(document)], resolved, false), resolved).texts.map((item) => item.text).join(' ');
}

describe('the model drawn', () => {
  it('without a smoother of the model drawn, no band is drawn and the figure says why (never the best model\'s band)', () => {
    // The document's smoother is the best model's (random walk); the figure draws the directional walk.
    const document = ridgeDocument({ best: 'random-walk' });
    expect(document.smoothed.model).toBe('random-walk');
    const words = drawnWords(document, { model: 'directional-walk', smoothed: true });
    expect(words).not.toContain('Smoothed mean');
    expect(words).toContain('No smoothed band');
    // With the best model drawn, its band is there.
    expect(drawnWords(document, { smoothed: true })).toContain('Smoothed mean (unbiased random walk)');
  });

  it('withSmootherOf gives the random walk\'s smoother: the conditional mean E[z | x] of the latent means (dense Gaussian conditioning)', () => {
    const document = ridgeDocument({ best: 'directional-walk' });
    const smoothedDocument = withSmootherOf(document, 'random-walk') as typeof document;
    expect(smoothedDocument.smoothed.model).toBe('random-walk');
    const stepVariance = document.models.find((model) => model.id === 'random-walk')!.params.step_variance.estimate;
    const { time, mean, sampling_variance: samplingVariance } = document.data;
    const n = time.length;
    // Random walk from a at t_0 (MODELS.md): C_ij = σ² min(t_i, t_j); V = C + diag(e).
    const C = new Matrix(n, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) C.set(i, j, stepVariance * Math.min(time[i], time[j]));
    const V = C.clone();
    for (let i = 0; i < n; i++) V.set(i, i, V.get(i, i) + samplingVariance[i]);
    const Vinv = inverse(V);
    const ones = Matrix.ones(n, 1);
    const x = Matrix.columnVector(mean);
    // GLS start a = (1' V⁻¹ x) / (1' V⁻¹ 1), then E[z | x] = a + C V⁻¹ (x − a) (Gaussian conditioning, closed form).
    const a = ones.transpose().mmul(Vinv).mmul(x).get(0, 0) / ones.transpose().mmul(Vinv).mmul(ones).get(0, 0);
    const conditional = C.mmul(Vinv).mmul(x.clone().sub(ones.clone().mul(a)));
    for (let i = 0; i < n; i++) expect(smoothedDocument.smoothed.mean[i], `horizon ${i}`).toBeCloseTo(a + conditional.get(i, 0), 9);
    // The figure then draws that band, named after the model drawn.
    expect(drawnWords(smoothedDocument, { model: 'random-walk', smoothed: true })).toContain('Smoothed mean (unbiased random walk)');
    // A document already carrying the model's smoother is returned as it is.
    expect(withSmootherOf(document, 'directional-walk')).toBe(document);
  });

  it('ou at alpha = 0 is drawn as the directional walk with drift limit_drift, and the subtitle says so', () => {
    const document = ridgeDocument({ best: 'ou' });
    const ou = document.models.find((model) => model.id === 'ou')!;
    const start = 3.1;
    const drift = 0.27;
    const stepVariance = 0.02;
    const entry = (value: number) => ({ estimate: value, lower: null, upper: null, at_bound: null, lower_at_bound: false, upper_at_bound: false });
    // As fit.json writes ou at its alpha-zero limit: alpha 0, optimum null, derived limit_drift.
    (ou as Record<string, unknown>).params = { ancestral_mean: entry(start), optimum: { ...entry(0), estimate: null }, alpha: { ...entry(0), at_bound: 'alpha-zero' }, step_variance: entry(stepVariance) };
    (ou as Record<string, unknown>).derived = { limit_drift: { ...entry(drift), at_bound: 'alpha-zero' }, half_life: { ...entry(0), estimate: null } };
    const lineage = figureLineage(document);
    const axis = timeAxisFor([lineage]);
    const { curve, reason } = modelCurve(lineage, axis, 'ou');
    expect(reason).toBeNull();
    const elapsed = curve!.time.map((age) => lineage.position[0] - age);
    elapsed.forEach((t, i) => {
      // Directional walk (MODELS.md): mean a + drift t, variance σ² t.
      expect(curve!.mean[i]).toBeCloseTo(start + drift * t, 12);
      expect(curve!.upper[i] - curve!.mean[i]).toBeCloseTo(normal95 * Math.sqrt(stepVariance * t), 12);
    });
    const words = drawnWords(document, { model: 'ou' });
    expect(words).toContain('Alpha at its limit 0, drawn as the directional walk it equals there');
    expect(words).not.toContain('not fitted');
  });
});
