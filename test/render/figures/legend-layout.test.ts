/**
 * Legend layout of the trajectory figures at narrow and ordinary widths:
 * every line of legend text, measured with the same text measure the
 * figures lay out with (`measureText`, the drawing engine's own
 * measureText), ends inside the figure's right margin, and wrapping loses
 * no text. The figure widths are the journal column widths the tool offers
 * (9 cm single, 18 cm double) and a 4 cm inset.
 */
import { describe, expect, it } from 'vitest';
import { measureText } from '../../../src/render/figures/chart-backend.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { pointsPerCm, resolveFigureOptions } from '../../../src/render/figures/figure-options.js';
import { renderSectionsTogether, renderTrajectory } from '../../../src/render/figures/index.js';
import { font, legendGap, legendKeyWidth, wrapText, type LegendLayout } from '../../../src/render/figures/marks.js';
import { trajectoryMargin, trajectoryPlan } from '../../../src/render/figures/trajectory.js';
import { typeSize } from '../../../src/render/figures/style.js';
import { ridgeDocument } from './documents.js';
import { decodePng, isBlank, keepChanged } from './figure-probes.js';

const legendMeasure = (text: string) => measureText(font(typeSize.legend), text);

/** Sections with long names, one of them a single word longer than a 4 cm figure's text column. */
function longNamedSections() {
  return [
    ridgeDocument({ section: 'Upper Marlstone Escarpment North', best: 'directional-walk' }),
    ridgeDocument({ section: 'Kettlebrook-Whinmoor-Underscar-Gully', best: 'random-walk', offset: 1, ageShift: -0.4 }),
    ridgeDocument({ section: 'Fern Hollow', best: 'stasis', offset: 2 }),
  ];
}

function planOf(documents: readonly unknown[], widthCm: number, together: boolean, smoothed = false) {
  const lineages = documents.map((document) => figureLineage(document));
  return trajectoryPlan(lineages, resolveFigureOptions({ width: widthCm, smoothed }), together);
}

/** Every legend line with where its right end falls, in points from the figure's left edge. */
function lineEnds(legend: LegendLayout): { line: string; end: number }[] {
  return legend.rows.flatMap((row) =>
    row.entries.flatMap((placed) => placed.lines.map((line) => ({ line, end: trajectoryMargin + placed.x + legendKeyWidth + legendGap + legendMeasure(line) }))),
  );
}

describe('legend layout', () => {
  const cases = [
    { name: 'sections together', documents: longNamedSections(), together: true, smoothed: false },
    { name: 'one lineage with the smoothed band', documents: [ridgeDocument({ section: 'Kettlebrook-Whinmoor-Underscar-Gully' })], together: false, smoothed: true },
  ];
  for (const { name, documents, together, smoothed } of cases) {
    for (const widthCm of [4, 9, 18]) {
      it(`${name}, ${widthCm} cm: every legend line fits inside the figure's right margin and no text is lost`, () => {
        const plan = planOf(documents, widthCm, together, smoothed);
        // The page width is widthCm in points (1 cm = 72 / 2.54 pt, the definition of the point).
        expect(plan.widthPoints).toBeCloseTo((widthCm * 72) / 2.54, 9);
        expect(pointsPerCm).toBeCloseTo(72 / 2.54, 12);
        const ends = lineEnds(plan.legend);
        for (const { line, end } of ends) {
          if (end > plan.widthPoints - trajectoryMargin + 1e-9) expect.fail(`"${line}" ends at ${end.toFixed(2)} pt, past ${(plan.widthPoints - trajectoryMargin).toFixed(2)} pt`);
        }
        // Wrapping keeps every character of every entry, in order (spaces aside).
        for (const row of plan.legend.rows) {
          for (const placed of row.entries) expect(placed.lines.join('').replace(/\s/g, '')).toBe(placed.entry.text.replace(/\s/g, ''));
        }
        // The legend's height has room for every line it draws: each row as many lines as its longest entry.
        for (const row of plan.legend.rows) expect(row.lines).toBe(Math.max(...row.entries.map((placed) => placed.lines.length)));
        const lines = plan.legend.rows.reduce((sum, row) => sum + row.lines, 0);
        expect(plan.legend.height).toBeGreaterThanOrEqual(lines * typeSize.legend * 1.2 - 1e-9);
      });
    }
  }

  it('at 4 cm the test would catch an unwrapped legend: some entry is wider than the figure on one line', () => {
    const plan = planOf(longNamedSections(), 4, true);
    const widest = Math.max(...plan.legend.rows.flatMap((row) => row.entries.map((placed) => legendKeyWidth + legendGap + legendMeasure(placed.entry.text))));
    expect(widest).toBeGreaterThan(plan.widthPoints - 2 * trajectoryMargin);
    expect(plan.legend.rows.some((row) => row.lines > 1)).toBe(true);
  });

  it('4 cm: the title and the horizontal axis title are wrapped to lines that fit (chart.js would squeeze them), 9 cm keeps them on one line', () => {
    for (const widthCm of [4, 9]) {
      for (const orientation of ['stratigraphic', 'horizontal'] as const) {
        const lineages = longNamedSections().map((document) => figureLineage(document));
        const plan = trajectoryPlan(lineages, resolveFigureOptions({ width: widthCm, orientation }), true);
        const configuration = plan.configuration() as unknown as {
          options: { plugins: { title: { text: string | string[] } }; scales: { x: { title: { text: string | string[] } } } };
        };
        const title = [configuration.options.plugins.title.text].flat();
        const axisTitle = [configuration.options.scales.x.title.text].flat();
        const room = plan.widthPoints - 2 * trajectoryMargin;
        for (const line of title) expect(measureText(font(typeSize.title, 'bold'), line), line).toBeLessThanOrEqual(room + 1e-9);
        for (const line of axisTitle) expect(measureText(font(typeSize.axisTitle), line), line).toBeLessThanOrEqual(room - 40 + 1e-9);
        // "Valve width (mean per horizon)" is longer than a 4 cm plot is wide; "Age (Ma)" is not.
        if (widthCm === 4 && orientation === 'stratigraphic') expect(axisTitle.length).toBeGreaterThan(1);
        else if (widthCm === 4) expect(axisTitle).toEqual(['Age (Ma)']);
        else expect(title.length + axisTitle.length).toBe(2);
      }
    }
  });

  it('wrapText cuts a word only when asked and only when the word alone is too wide', () => {
    const word = 'Kettlebrook-Whinmoor-Underscar-Gully';
    const width = legendMeasure(word) / 3;
    expect(wrapText(`${word} beds`, width, legendMeasure)).toEqual([word, 'beds']);
    const cut = wrapText(`${word} beds`, width, legendMeasure, { breakWords: true });
    expect(cut.join('').replace(/\s/g, '')).toBe(`${word}beds`);
    for (const line of cut) expect(legendMeasure(line)).toBeLessThanOrEqual(width + 1e-9);
    expect(wrapText('short words only', width, legendMeasure, { breakWords: true })).toEqual(wrapText('short words only', width, legendMeasure));
  });

  it('4 cm PNGs: the strip along the right edge of the legend is paper (no text drawn to the edge)', async () => {
    const single = [ridgeDocument({ section: 'Kettlebrook-Whinmoor-Underscar-Gully' })];
    const figures = [
      { name: 'legend-4cm-sections', figure: renderSectionsTogether(longNamedSections(), { width: 4, dpi: 300 }), plan: planOf(longNamedSections(), 4, true) },
      { name: 'legend-4cm-single', figure: renderTrajectory(single[0], { width: 4, dpi: 300, smoothed: true }), plan: planOf(single, 4, false, true) },
    ];
    for (const { name, figure, plan } of figures) {
      const pixels = await decodePng(figure.bytes);
      const scale = pixels.width / Math.round(plan.widthPoints);
      // The legend is drawn from 4 pt above the bottom edge upward over its height (trajectory.ts afterDraw).
      const top = Math.floor(pixels.height - (plan.legend.height + 4) * scale);
      const stripStart = Math.ceil(pixels.width - (trajectoryMargin - 1) * scale);
      const inked: string[] = [];
      for (let y = top; y < pixels.height; y++) {
        for (let x = stripStart; x < pixels.width; x++) if (!isBlank(pixels.at(x, y))) inked.push(`(${x}, ${y})`);
      }
      if (inked.length > 0) expect.fail(`${name}: ${inked.length} inked pixels in the right margin beside the legend, first ${inked.slice(0, 3).join(' ')} (figure kept at ${keepChanged(name, figure.bytes)})`);
      // And the legend itself is drawn: ink in its rows.
      let ink = 0;
      for (let y = top; y < pixels.height; y += 2) for (let x = 0; x < pixels.width; x += 2) if (!isBlank(pixels.at(x, y))) ink++;
      expect(ink).toBeGreaterThan(100);
    }
  });
});
