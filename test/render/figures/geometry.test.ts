import { cumulativeStdNormalProbability } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { checkFitDocument } from '../../../src/data/documents.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { ageUnitLabel, horizonMarks, modelCurve, normal95, timeAxisFor } from '../../../src/render/figures/geometry.js';
import { ridgeDocument } from './documents.js';

describe('figure geometry', () => {
  it('uses the two-sided 95% normal quantile', () => {
    // simple-statistics' standard normal table: Φ(1.96) = 0.9750 (4 decimals).
    expect(cumulativeStdNormalProbability(normal95)).toBeCloseTo(0.975, 4);
  });

  it('horizon intervals are mean ± 1.96 √e_i on the age axis', () => {
    const lineage = figureLineage(ridgeDocument());
    const axis = timeAxisFor([lineage]);
    expect(axis.title).toBe('Age (Ma)');
    expect(axis.reverse).toBe(true);
    const marks = horizonMarks(lineage, axis);
    expect(marks[3].time).toBeCloseTo(8.9, 12);
    expect(marks[3].upper - marks[3].mean).toBeCloseTo(1.959963984540054 * Math.sqrt(0.008), 12);
  });

  it('random-walk envelope is a ± 1.96 √(σ² t) (closed form, MODELS.md)', () => {
    const lineage = figureLineage(ridgeDocument());
    const axis = timeAxisFor([lineage]);
    const { curve } = modelCurve(lineage, axis, 'random-walk');
    expect(curve).not.toBeNull();
    const last = curve!.time.length - 1;
    expect(curve!.time[0]).toBeCloseTo(10, 12);
    expect(curve!.time[last]).toBeCloseTo(6, 12);
    expect(curve!.upper[last] - curve!.mean[last]).toBeCloseTo(1.959963984540054 * Math.sqrt(0.05 * 4), 10);
    expect(curve!.upper[0] - curve!.lower[0]).toBeCloseTo(0, 12);
    expect(curve!.mean.every((m) => Math.abs(m - 3.12) < 1e-12)).toBe(true);
  });

  it('OU mean approaches the optimum: θ + (a − θ) e^{−αt}, variance σ²(1 − e^{−2αt}) / 2α (closed form, MODELS.md)', () => {
    const lineage = figureLineage(ridgeDocument());
    const { curve } = modelCurve(lineage, timeAxisFor([lineage]), 'ou');
    const last = curve!.time.length - 1;
    const t = 4;
    const mean = 4.6 + (3.1 - 4.6) * Math.exp(-0.35 * t);
    const variance = (0.01 * (1 - Math.exp(-2 * 0.35 * t))) / (2 * 0.35);
    expect(curve!.mean[last]).toBeCloseTo(mean, 10);
    expect(curve!.upper[last] - curve!.mean[last]).toBeCloseTo(1.959963984540054 * Math.sqrt(variance), 10);
  });

  it('strict stasis has no envelope; a model not fitted or not in the fit gives a reason, not a curve', () => {
    const lineage = figureLineage(ridgeDocument({ withOuNotCompared: true }));
    const axis = timeAxisFor([lineage]);
    expect(modelCurve(lineage, axis, 'strict-stasis').curve?.hasEnvelope).toBe(false);
    expect(modelCurve(lineage, axis, 'ou').reason).toMatch(/not fitted/);
    expect(modelCurve(lineage, axis, 'no-such-model').reason).toMatch(/not in this fit/);
  });

  it('labels ages in Ma / ka and other time kinds as elapsed or read time', () => {
    expect(ageUnitLabel('Myr')).toBe('Ma');
    expect(ageUnitLabel('kyr')).toBe('ka');
    const document = ridgeDocument();
    const elapsed = figureLineage({ ...document, position_kind: 'height' });
    expect(timeAxisFor([elapsed]).title).toBe('Time since oldest horizon (Myr)');
    expect(timeAxisFor([elapsed]).reverse).toBe(false);
  });

  it('places heights on the age model\'s ages when the document has first_age (age_i = first_age - t_i)', () => {
    const document = ridgeDocument();
    const heights = figureLineage({ ...document, position_kind: 'height', position: undefined, first_age: 9.25, data: { ...document.data, position: document.data.time.map((t) => 2 + 10 * t) } });
    const axis = timeAxisFor([heights]);
    expect(axis.title).toBe('Age (Ma)');
    expect(axis.reverse).toBe(true);
    const marks = horizonMarks(heights, axis);
    expect(marks[0].time).toBeCloseTo(9.25, 12);
    expect(marks[11].time).toBeCloseTo(9.25 - 4, 12);
  });

  it('a broken document is refused where it is read, naming the field (the figures take checked documents as they are, issue 22)', () => {
    const document = ridgeDocument();
    const saved = (lineage: object) => ({ provenance: { tool: 'stratotrend', version: '0', inputs: [], options: {} }, model_set: 'classic', lineages: [lineage], warnings: [] });
    expect(() => checkFitDocument(saved({ ...document, data: { ...document.data, mean: document.data.mean.slice(1) } }), 'fit.json')).toThrow(
      /fit\.json: lineages\[0\]\.data\.mean: expected 12 entries \(one per horizon, "horizons" is 12\), got 11/,
    );
    expect(() => checkFitDocument(saved({ ...document, data: { ...document.data, sampling_variance: [null, ...document.data.sampling_variance.slice(1)] } }), 'fit.json')).toThrow(/lineages\[0\]\.data\.sampling_variance\[0\]/);
  });

  it('reads a built or checked document as it is: its data lists are taken, not checked and copied again (issue 22)', () => {
    const document = ridgeDocument();
    const lineage = figureLineage(document);
    expect(lineage.time).toBe(document.data.time);
    expect(lineage.mean).toBe(document.data.mean);
    expect(lineage.samplingVariance).toBe(document.data.sampling_variance);
    expect(lineage.count).toBe(document.data.n);
  });
});
