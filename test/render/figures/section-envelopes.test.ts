/**
 * The 95% envelopes of the sections-together figure: one pair of envelope
 * datasets (lower and upper bound) per section whose model has a variance
 * above 0, with bounds mean ± 1.959964 √variance (the two-sided 95% normal
 * quantile, common practice; Φ⁻¹(0.975) = 1.959963984540054 in closed form).
 * The means and variances are written here from the closed forms of
 * MODELS.md, not taken from src/models: unbiased random walk a and σ²t,
 * directional walk a + δt and σ²t (Brownian motion, Var = σ²t, common
 * practice), stasis θ and ω.
 */
import type { ChartDataset } from 'chart.js';
import { describe, expect, it } from 'vitest';
import { renderSectionsTogether } from '../../../src/render/figures/index.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions, type FigureOrientation } from '../../../src/render/figures/figure-options.js';
import { envelopeLabels, trajectoryPlan } from '../../../src/render/figures/trajectory.js';
import { ridgeDocument } from './documents.js';
import { decodePng, isBlank, keepChanged, scalePixel, svgText } from './figure-probes.js';

const z95 = 1.959963984540054;

type Document = ReturnType<typeof ridgeDocument>;

/** A copy of a document whose model `id` has the given parameter set to `value` (e.g. a step variance at 0). */
function withParameter(document: Document, id: string, name: string, value: number): Document {
  const copy = JSON.parse(JSON.stringify(document)) as Document;
  const model = copy.models.find((row) => row.id === id)!;
  (model.params as Record<string, { estimate: number }>)[name].estimate = value;
  return copy;
}

function estimates(document: Document, id: string): Record<string, number> {
  const row = document.models.find((model) => model.id === id)!;
  return Object.fromEntries(Object.entries(row.params).map(([name, entry]) => [name, entry.estimate]));
}

/** Expected trait mean and process variance at elapsed time t, from MODELS.md's closed forms. */
function closedForm(document: Document): (t: number) => { mean: number; variance: number } {
  const id = document.best_model;
  const p = estimates(document, id);
  if (id === 'random-walk') return (t) => ({ mean: p.ancestral_mean, variance: p.step_variance * t });
  if (id === 'directional-walk') return (t) => ({ mean: p.ancestral_mean + p.drift * t, variance: p.step_variance * t });
  if (id === 'stasis') return () => ({ mean: p.stasis_mean, variance: p.stasis_variance });
  throw new Error(`no closed form written for ${id}`);
}

/** Four sections: random walk, directional walk, stasis, and a directional walk whose step variance is 0 (no envelope). */
function fourSections(): Document[] {
  return [
    ridgeDocument({ section: 'Test Ridge', best: 'random-walk' }),
    ridgeDocument({ section: 'Fern Hollow', best: 'directional-walk', offset: 3, ageShift: -0.5 }),
    ridgeDocument({ section: 'Brackwater Cut', best: 'stasis', offset: -2, ageShift: 0.3 }),
    withParameter(ridgeDocument({ section: 'Quarry Flat', best: 'directional-walk', offset: 6 }), 'directional-walk', 'step_variance', 0),
  ];
}

function datasetsOf(documents: readonly Document[], orientation: FigureOrientation) {
  const lineages = documents.map((document) => figureLineage(document));
  const plan = trajectoryPlan(lineages, resolveFigureOptions({ orientation }), true);
  return plan.configuration().data.datasets as ChartDataset<'scatter', { x: number; y: number }[]>[];
}

describe('sections figure: 95% envelopes', () => {
  for (const orientation of ['stratigraphic', 'horizontal'] as const) {
    it(`${orientation}: every section with a variance above 0 has lower and upper envelope datasets at mean ∓ 1.959964 √variance`, () => {
      const documents = fourSections();
      const datasets = datasetsOf(documents, orientation);
      for (const document of documents.slice(0, 3)) {
        const labels = envelopeLabels(document.section);
        const lower = datasets.filter((dataset) => dataset.label === labels.lower);
        const upper = datasets.filter((dataset) => dataset.label === labels.upper);
        expect(lower, `${document.section} lower`).toHaveLength(1);
        expect(upper, `${document.section} upper`).toHaveLength(1);
        const form = closedForm(document);
        const oldest = document.data.position[0];
        const span = document.data.time[document.data.time.length - 1];
        for (const [dataset, sign] of [[lower[0], -1], [upper[0], 1]] as const) {
          const points = dataset.data;
          // Sampled over the whole section: from its oldest horizon (t = 0) to its youngest (t = span).
          expect(points.length).toBeGreaterThan(100);
          const times = points.map((point) => oldest - (orientation === 'stratigraphic' ? point.y : point.x));
          expect(Math.min(...times)).toBeCloseTo(0, 12);
          expect(Math.max(...times)).toBeCloseTo(span, 12);
          points.forEach((point, i) => {
            const { mean, variance } = form(times[i]);
            const drawn = orientation === 'stratigraphic' ? point.x : point.y;
            const bound = mean + sign * z95 * Math.sqrt(variance);
            if (Math.abs(drawn - bound) > 1e-9) expect.fail(`${document.section} ${dataset.label} at t = ${times[i]}: ${drawn}, closed form ${bound}`);
          });
        }
      }
      // The section whose step variance is 0 has an envelope of no width: no datasets for it, as for one lineage.
      const flat = envelopeLabels('Quarry Flat');
      expect(datasets.some((dataset) => dataset.label === flat.lower || dataset.label === flat.upper)).toBe(false);
      expect(datasets.filter((dataset) => String(dataset.label).startsWith('envelope'))).toHaveLength(6);
    });
  }

  it('shades each envelope in its section colour behind the points, and leaves paper where a section has none (PNG pixels)', async () => {
    // Blue random walk, vermilion random walk well above it, teal directional walk with σ² = 0 above both.
    const documents = [
      ridgeDocument({ section: 'Test Ridge', best: 'random-walk' }),
      ridgeDocument({ section: 'Fern Hollow', best: 'random-walk', offset: 3 }),
      withParameter(ridgeDocument({ section: 'Quarry Flat', best: 'directional-walk', offset: 6 }), 'directional-walk', 'step_variance', 0),
    ];
    for (const orientation of ['stratigraphic', 'horizontal'] as const) {
      const figure = renderSectionsTogether(documents, { dpi: 150, orientation });
      const pixels = await decodePng(figure.bytes);
      const stratigraphic = orientation === 'stratigraphic';
      const at = (age: number, value: number) => ({
        x: scalePixel(figure.frame, 'x', stratigraphic ? value : age),
        y: scalePixel(figure.frame, 'y', stratigraphic ? age : value),
      });
      // Between the horizons at 8.9 and 8.4 Ma (t = 1.35 Myr), clear of markers and interval bars.
      const age = 8.65;
      const t = documents[0].data.position[0] - age;
      const failures: string[] = [];
      documents.slice(0, 2).forEach((document, s) => {
        const p = estimates(document, 'random-walk');
        // Below the expected line (every horizon mean lies above a), 60% of the way to the lower bound.
        const point = at(age, p.ancestral_mean - 0.6 * z95 * Math.sqrt(p.step_variance * t));
        const pixel = pixels.at(point.x, point.y);
        const [r, , b] = pixel;
        // A light tint (the fill is kept at low opacity): off white, leaning to the section's colour (dark blue, vermilion).
        const tinted = Math.min(r, pixel[1], b) < 243;
        const own = s === 0 ? b > r + 8 : r > b + 8;
        if (!tinted || !own) failures.push(`${orientation}: ${document.section} envelope at (${point.x.toFixed(0)}, ${point.y.toFixed(0)}) is ${pixels.at(point.x, point.y).slice(0, 3)}`);
      });
      const q = estimates(documents[2], 'directional-walk');
      const clear = at(age, q.ancestral_mean + q.drift * t - 0.3);
      if (!isBlank(pixels.at(clear.x, clear.y))) failures.push(`${orientation}: Quarry Flat has no envelope, yet (${clear.x.toFixed(0)}, ${clear.y.toFixed(0)}) is ${pixels.at(clear.x, clear.y).slice(0, 3)}`);
      if (failures.length > 0) expect.fail(`${failures.join('; ')} (figure kept at ${keepChanged(`section-envelopes-${orientation}`, figure.bytes)})`);
    }
  });

  it('one legend entry says what the shading is, and the subtitle names the section without one (SVG text and fills)', () => {
    const documents = fourSections();
    const figure = renderSectionsTogether(documents, { format: 'svg' });
    const svg = new TextDecoder().decode(figure.bytes);
    const { text } = svgText(svg);
    expect(text.split("Shading: 95% envelope of each section's model")).toHaveLength(2);
    expect(text).toContain('No envelope for Quarry Flat (variance at 0).');
    // Envelope fills are translucent (fill-opacity below 1 on a section colour), one per section with an envelope.
    const translucent = [...svg.matchAll(/<path[^>]*fill="(#[0-9A-Fa-f]{6})"[^>]*fill-opacity="([0-9.]+)"/g)].filter((match) => Number(match[2]) < 0.2);
    expect(translucent).toHaveLength(3);
  });

  it('no legend entry for shading when no section has an envelope', () => {
    const documents = [
      withParameter(ridgeDocument({ section: 'Test Ridge', best: 'directional-walk' }), 'directional-walk', 'step_variance', 0),
      withParameter(ridgeDocument({ section: 'Fern Hollow', best: 'directional-walk', offset: 2 }), 'directional-walk', 'step_variance', 0),
    ];
    expect(datasetsOf(documents, 'stratigraphic').some((dataset) => String(dataset.label).startsWith('envelope'))).toBe(false);
    const { text } = svgText(new TextDecoder().decode(renderSectionsTogether(documents, { format: 'svg' }).bytes));
    expect(text).not.toContain('Shading');
    expect(text).toContain('No envelopes');
  });
});
