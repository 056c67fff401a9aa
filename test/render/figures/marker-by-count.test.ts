/**
 * `markerByCount`: marker area proportional to a horizon's specimen count n
 * (radius r0 √(n / median n), held within 0.5–2 r0; r0 = 2.3 pt, the house
 * marker radius in style.ts). Measured on the drawn PNG: the height of the
 * ink run through a marker's centre is its diameter (the sampling interval
 * runs across, along the trait axis), so the ratio of two markers' runs is
 * the ratio of their radii.
 */
import { describe, expect, it } from 'vitest';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions } from '../../../src/render/figures/figure-options.js';
import { renderTrajectory } from '../../../src/render/figures/index.js';
import { trajectoryPlan } from '../../../src/render/figures/trajectory.js';
import { markerRadius } from '../../../src/render/figures/style.js';
import { smallMultiplesPlan } from '../../../src/render/figures/small-multiples.js';
import { ridgeDocument } from './documents.js';
import { recordDrawnText } from './drawn-text.js';
import { decodePng, keepChanged, luma, scalePixel, type Pixels } from './figure-probes.js';

function inkRun(pixels: Pixels, x: number, y: number): number {
  const dark = (yy: number) => luma(pixels.at(x, yy)) < 140;
  let up = y;
  while (dark(up - 1)) up--;
  let down = y;
  while (dark(down + 1)) down++;
  return down - up + 1;
}

describe('marker area by n', () => {
  it('draws a horizon of n = 80 with twice the radius of the median (n = 20) and n = 5 at half (√(n / 20))', async () => {
    const document = ridgeDocument();
    const n = document.data.n.map((_, i) => (i === 3 ? 80 : i === 8 ? 5 : 20));
    (document.data as Record<string, unknown>).n = n;
    const dpi = 600;
    const figure = renderTrajectory(document, { dpi, markerByCount: true, model: 'strict-stasis' });
    const pixels = await decodePng(figure.bytes);
    const run = (i: number) => inkRun(pixels, scalePixel(figure.frame, 'x', document.data.mean[i]), scalePixel(figure.frame, 'y', document.data.position[i]));
    const pointsToPixels = (figure.width / Math.round((9 * 72) / 2.54));
    try {
      // A filled marker's ink ends 0.3 pt inside its edge (its white halo, marks.ts), so 2 r ∝ run + 0.6 pt:
      // n = 80 at 2 r0 and n = 5 at r0 / 2 against the median n = 20 at r0 (within 5%, antialiasing).
      const radius = (i: number) => run(i) + 0.6 * pointsToPixels;
      expect(radius(3) / radius(0)).toBeCloseTo(2, 0);
      expect(Math.abs(radius(3) / radius(0) - 2)).toBeLessThan(0.1);
      expect(Math.abs(radius(8) / radius(0) - 0.5)).toBeLessThan(0.05);
      // And the median marker is the house size (r0 = 2.3 pt, up to the circle's own proportion: within 15%).
      expect(Math.abs(radius(0) / (2 * markerRadius * pointsToPixels) - 1)).toBeLessThan(0.15);
    } catch (error) {
      keepChanged('marker-by-count', figure.bytes);
      throw error;
    }
    // Off by default: every marker the same.
    const plain = renderTrajectory(document, { dpi, model: 'strict-stasis' });
    const plainPixels = await decodePng(plain.bytes);
    const plainRun = (i: number) => inkRun(plainPixels, scalePixel(plain.frame, 'x', document.data.mean[i]), scalePixel(plain.frame, 'y', document.data.position[i]));
    expect(Math.abs(plainRun(3) - plainRun(8))).toBeLessThan(3);
  });

  it('says so in the legend, with the median n', () => {
    const lineage = figureLineage(ridgeDocument());
    const plan = trajectoryPlan([lineage], resolveFigureOptions({ markerByCount: true }), false);
    const texts = plan.legend.rows.flatMap((row) => row.entries.map((placed) => placed.entry.text));
    expect(texts.some((text) => text.startsWith('Marker area proportional to n (this size: median n = 20;'))).toBe(true);
  });

  it('small multiples (7 sections) say so in the subtitle, and only when asked', () => {
    const documents = Array.from({ length: 7 }, (_, s) => ridgeDocument({ section: `Invented Gully ${s + 1}`, offset: 0.1 * s }));
    const lineages = documents.map((document) => figureLineage(document));
    const words = (markerByCount: boolean) => {
      const resolved = resolveFigureOptions({ markerByCount });
      return recordDrawnText(smallMultiplesPlan(lineages, resolved), resolved).texts.map((text) => text.text).join(' ');
    };
    expect(words(true)).toContain('Marker area proportional to n');
    expect(words(false)).not.toContain('Marker area');
  });
});
