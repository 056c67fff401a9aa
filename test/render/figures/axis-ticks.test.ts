/**
 * Axis ticks of the trajectory figures, read back from the chart.js scales
 * after the chart is drawn (the values chart.js actually labels, not what the
 * configuration asked for), checked against the closed form of a round axis
 * (common practice for axis labelling): the step between ticks is 1, 2 or
 * 5 × 10^k and every tick is an integer multiple of that step.
 */
import { describe, expect, it } from 'vitest';
import { recordDrawnTicks, roundAxisFailures, type DrawnScale } from './drawn-ticks.js';
import { fitLineage } from '../../../src/fit/fit-lineage.js';
import { lineageFromArrays } from '../../../src/lineage.js';
import { classicModels } from '../../../src/models/registry.js';
import { lineageDocument } from '../../../src/render/fit-document.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions, type FigureOptions } from '../../../src/render/figures/figure-options.js';
import { tickStep, trajectoryPlan } from '../../../src/render/figures/trajectory.js';
import { ridgeDocument } from './documents.js';


/** Draw the trajectory figure of each document and record every scale's ticks as chart.js laid them out. */
function drawnTicks(documents: readonly unknown[], options: FigureOptions): Record<string, DrawnScale> {
  const resolved = resolveFigureOptions(options);
  const lineages = documents.map((document) => figureLineage(document));
  const plan = trajectoryPlan(lineages, resolved, lineages.length > 1);
  return recordDrawnTicks(plan, resolved);
}


/**
 * A real fit (fitLineage + lineageDocument, the fit.json contract) of an
 * invented lineage: ten horizons near 4 with one horizon's mean at 1e6, the
 * case in which chart.js replaced the round step by (max − min) / count and
 * labelled the axis at values such as −536,282.0.
 */
function outlierDocument(): unknown {
  const time = [0, 0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5];
  const mean = [4.1, 4.3, 3.9, 4.2, 1e6, 4.0, 4.4, 4.1, 4.2, 4.0];
  const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 0.25 / 12), count: time.map(() => 12), section: 'Korrin Bluff', trait: 'valve width' });
  const fit = fitLineage(lineage, classicModels, { intervals: false });
  return JSON.parse(JSON.stringify(lineageDocument(fit)));
}

describe('trajectory figure axis ticks (closed form: integer multiples of a 1, 2 or 5 × 10^k step)', () => {
  const outlier = outlierDocument();

  it('one extreme outlier, horizontal orientation: the trait axis is labelled at round values', () => {
    const scales = drawnTicks([outlier], { orientation: 'horizontal', dpi: 72 });
    expect(Object.keys(scales).sort()).toEqual(['x', 'y']);
    expect(scales.y.horizontal).toBe(false);
    expect(roundAxisFailures(scales.y)).toEqual([]);
    expect(roundAxisFailures(scales.x)).toEqual([]);
    // The outlier's axis spans about a million: the step is at least 1e5 (closed form: at most 11 ticks over > 1e6).
    expect(scales.y.max - scales.y.min).toBeGreaterThan(1e6);
    expect(scales.y.values[1] - scales.y.values[0]).toBeGreaterThanOrEqual(1e5);
  });

  it('one extreme outlier, stratigraphic orientation: round values, and the labels fit between the ticks', () => {
    const scales = drawnTicks([outlier], { dpi: 72 });
    expect(scales.x.horizontal).toBe(true);
    expect(roundAxisFailures(scales.x)).toEqual([]);
    expect(roundAxisFailures(scales.y)).toEqual([]);
    // No label overlaps its neighbour: tick spacing exceeds the widest label (chart.js's measure).
    expect(scales.x.spacing).toBeGreaterThan(scales.x.widestLabel);
  });

  it('ordinary data (values near 3–4 Ma and 3–4 trait units), both orientations and three widths', () => {
    for (const orientation of ['stratigraphic', 'horizontal'] as const) {
      for (const width of [4, 9, 18]) {
        const scales = drawnTicks([ridgeDocument()], { orientation, width, dpi: 72 });
        for (const [id, scale] of Object.entries(scales)) {
          expect(roundAxisFailures(scale), `${orientation} ${width} cm, axis ${id}`).toEqual([]);
          expect(scale.spacing, `${orientation} ${width} cm, axis ${id}`).toBeGreaterThan(scale.widestLabel);
          // At 4 cm three labels of the trait axis ("3.0", "3.5", …) would collide, so two ticks (3 and 4) are the honest answer there.
          expect(scale.values.length, `${orientation} ${width} cm, axis ${id}`).toBeGreaterThanOrEqual(width === 4 ? 2 : 3);
        }
      }
    }
  });

  it('large ages and a shifted trait (ages near 1.2 million years, trait near 5,000): round values on both axes', () => {
    const large = ridgeDocument({ ageShift: 1_200_000, offset: 5000 });
    for (const orientation of ['stratigraphic', 'horizontal'] as const) {
      const scales = drawnTicks([large], { orientation, dpi: 72 });
      for (const [id, scale] of Object.entries(scales)) expect(roundAxisFailures(scale), `${orientation}, axis ${id}`).toEqual([]);
    }
  });

  it('several sections on one time axis', () => {
    const scales = drawnTicks([ridgeDocument(), ridgeDocument({ section: 'Fern Hollow', best: 'stasis', ageShift: 1.3, offset: 0.4 })], { dpi: 72 });
    for (const [id, scale] of Object.entries(scales)) expect(roundAxisFailures(scale), `axis ${id}`).toEqual([]);
  });
});

describe('tickStep', () => {
  it('is always 1, 2 or 5 × 10^k and gives at least 3 ticks (closed form over spans from 1e-6 to 1e9)', () => {
    for (let e = -6; e <= 9; e += 0.37) {
      const span = 10 ** e;
      for (const target of [4, 5, 7]) {
        const step = tickStep(span, target);
        const mantissa = step / 10 ** Math.floor(Math.log10(step));
        expect([1, 2, 5].some((round) => Math.abs(mantissa - round) < 1e-9), `span ${span}, step ${step}`).toBe(true);
        expect(Math.floor(span / step + 1e-9) + 1).toBeGreaterThanOrEqual(3);
      }
    }
  });
});
