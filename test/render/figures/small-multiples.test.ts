/**
 * The sections figure with many sections: from `smallMultiplesFrom` (7)
 * sections on, one panel per section on shared axes. Thirty invented
 * sections at 9 and 18 cm: every panel inside the page and clear of the
 * others, every section's name drawn over its own panel, every string inside
 * the margins and clear of the others (measured as drawn, drawn-text.ts),
 * and ink at every horizon mean of every panel (pixel probes mapped through
 * the panel's box and the shared axis limits the plan reports).
 */
import { describe, expect, it } from 'vitest';
import { drawFigure } from '../../../src/render/figures/chart-backend.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions } from '../../../src/render/figures/figure-options.js';
import { renderSectionsTogether } from '../../../src/render/figures/index.js';
import { smallMultiplesFrom, smallMultiplesPlan } from '../../../src/render/figures/small-multiples.js';
import { ridgeDocument } from './documents.js';
import { recordDrawnText, textProblems } from './drawn-text.js';
import { darkestNear, decodePng, keepChanged } from './figure-probes.js';

const letters = 'ABCDEFGHIJKLMNOPQRSTUVWXYZ';
function manySections(count: number) {
  return Array.from({ length: count }, (_, s) =>
    ridgeDocument({ section: `Invented Gully ${letters[s % 26]}${s >= 26 ? s : ''}`, best: s % 3 === 0 ? 'stasis' : 'random-walk', offset: 0.08 * s, ageShift: -0.05 * (s % 5) }),
  );
}

describe('sections figure with many sections: small multiples', () => {
  for (const widthCm of [9, 18]) {
    it(`30 sections at ${widthCm} cm: one panel each, inside the page, clear of each other, named, no string past the margins or on another`, () => {
      const documents = manySections(30);
      const lineages = documents.map((document) => figureLineage(document));
      const resolved = resolveFigureOptions({ width: widthCm });
      const plan = smallMultiplesPlan(lineages, resolved);
      expect(plan.panels).toHaveLength(30);
      const drawn = recordDrawnText(plan, resolved);
      const problems = textProblems(drawn, 5.5);
      expect(problems, problems.join('\n')).toEqual([]);
      plan.panels.forEach((panel, i) => {
        expect(panel.left).toBeGreaterThanOrEqual(6);
        expect(panel.right).toBeLessThanOrEqual(drawn.width - 6 + 1e-9);
        expect(panel.bottom).toBeLessThanOrEqual(drawn.height);
        for (const other of plan.panels.slice(i + 1)) {
          const apart = other.left >= panel.right || other.right <= panel.left || other.top >= panel.bottom || other.bottom <= panel.top;
          expect(apart, `${panel.section} and ${other.section}`).toBe(true);
        }
        // The section's name is drawn just above its own panel (its head), within the panel's width.
        const head = drawn.texts.filter((text) => text.bottom <= panel.top && text.top >= panel.top - 45 && text.left >= panel.left - 0.01 && text.right <= panel.right + 0.01);
        expect(head.map((text) => text.text).join(' ').replace(/\s+/g, '')).toContain(panel.section.replace(/\s+/g, ''));
      });
    });
  }

  it('30 sections at 9 cm: ink at every horizon mean of every panel', async () => {
    const documents = manySections(30);
    const lineages = documents.map((document) => figureLineage(document));
    const resolved = resolveFigureOptions({ width: 9, dpi: 300 });
    const plan = smallMultiplesPlan(lineages, resolved);
    const figure = drawFigure(plan, resolved);
    const pixels = await decodePng(figure.bytes);
    const scale = pixels.width / Math.round(plan.widthPoints);
    const failures: string[] = [];
    documents.forEach((document, s) => {
      const panel = plan.panels[s];
      document.data.mean.forEach((mean, i) => {
        const age = document.data.position[i];
        // Stratigraphic: trait across, age up the page with the oldest (largest) at the bottom.
        const x = panel.left + ((mean - plan.limits.x.min) / (plan.limits.x.max - plan.limits.x.min)) * (panel.right - panel.left);
        const share = (age - plan.limits.y.min) / (plan.limits.y.max - plan.limits.y.min);
        const y = panel.bottom - (1 - share) * (panel.bottom - panel.top);
        if (darkestNear(pixels, Math.round(x * scale), Math.round(y * scale), 2) > 120) failures.push(`${panel.section} horizon ${i}`);
      });
    });
    if (failures.length > 0) keepChanged('small-multiples-30', figure.bytes);
    expect(failures).toEqual([]);
  });

  it(`draws one plot up to ${smallMultiplesFrom - 1} sections and panels from ${smallMultiplesFrom} on`, () => {
    const title = (count: number) => new TextDecoder().decode(renderSectionsTogether(manySections(count), { format: 'svg' }).bytes);
    expect(title(smallMultiplesFrom - 1)).not.toContain('one panel each');
    expect(title(smallMultiplesFrom)).toContain('one panel each');
  });
});
