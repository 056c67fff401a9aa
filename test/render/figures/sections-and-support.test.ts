import { describe, expect, it } from 'vitest';
import { renderModelSupport, renderSectionsTogether } from '../../../src/render/figures/index.js';
import { modelSupportPlan, supportRows, tableNumber } from '../../../src/render/figures/model-support.js';
import { resolveFigureOptions } from '../../../src/render/figures/figure-options.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { seriesStyles } from '../../../src/render/figures/style.js';
import { ridgeDocument } from './documents.js';
import { darkestNear, decodePng, keepChanged, luma, scalePixel, svgText } from './figure-probes.js';

/** Relative luminance of an sRGB colour (W3C WCAG 2.1, definition of relative luminance). */
function relativeLuminance(hex: string): number {
  const channel = (i: number) => {
    const c = parseInt(hex.slice(1 + 2 * i, 3 + 2 * i), 16) / 255;
    return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * channel(0) + 0.7152 * channel(1) + 0.0722 * channel(2);
}

describe('sections drawn together', () => {
  it('tells sections apart by marker shape and dash pattern, and the first four by lightness too', () => {
    const shapes = new Set(seriesStyles.map((style) => style.marker));
    const dashes = new Set(seriesStyles.map((style) => style.dash.join(',')));
    expect(shapes.size).toBe(seriesStyles.length);
    expect(dashes.size).toBe(seriesStyles.length);
    const ladder = seriesStyles.slice(0, 4).map((style) => relativeLuminance(style.color));
    for (let i = 1; i < ladder.length; i++) expect(ladder[i] - ladder[i - 1]).toBeGreaterThan(0.07);
    // Every colour keeps a contrast of at least 2.5 : 1 against white paper (WCAG contrast ratio formula).
    for (const style of seriesStyles) expect(1.05 / (relativeLuminance(style.color) + 0.05)).toBeGreaterThan(2.5);
  });

  it('puts every horizon of every section where the shared age axis says, in its own colour', async () => {
    const first = ridgeDocument({ section: 'Test Ridge', best: 'random-walk' });
    const second = ridgeDocument({ section: 'Fern Hollow', best: 'directional-walk', offset: 0.6, ageShift: -0.5 });
    const figure = renderSectionsTogether([first, second], { dpi: 300 });
    const pixels = await decodePng(figure.bytes);
    const failures: string[] = [];
    [first, second].forEach((document, s) => {
      document.data.mean.forEach((mean, i) => {
        const x = scalePixel(figure.frame, 'x', mean);
        const y = scalePixel(figure.frame, 'y', document.data.position[i]);
        const [r, , b] = pixels.at(x, y);
        // Section 1 is dark blue (blue channel above red), section 2 vermilion (red above blue).
        const inOwnColour = s === 0 ? b > r + 30 : r > b + 60;
        if (!inOwnColour || darkestNear(pixels, x, y, 1) > 170) failures.push(`section ${s + 1} horizon ${i} at (${x.toFixed(0)}, ${y.toFixed(0)}) is ${pixels.at(x, y).slice(0, 3)}`);
      });
    });
    if (failures.length > 0) expect.fail(`${failures.join('; ')} (figure kept at ${keepChanged('sections-together', figure.bytes)})`);
    // Ages line up across sections: 9.5 Ma is one height on the page for both.
    expect(scalePixel(figure.frame, 'y', 10)).toBeGreaterThan(scalePixel(figure.frame, 'y', 5.5));
  });

  it('names each section and its model in the legend (SVG text)', () => {
    const figure = renderSectionsTogether(
      [ridgeDocument({ section: 'Test Ridge' }), ridgeDocument({ section: 'Fern Hollow', best: 'stasis', ageShift: -0.5 })],
      { format: 'svg', orientation: 'horizontal' },
    );
    const { text } = svgText(new TextDecoder().decode(figure.bytes));
    expect(text).toContain('Valve width: 2 sections');
    expect(text).toContain('Test Ridge: unbiased random walk');
    expect(text).toContain('Fern Hollow: stasis');
    expect(text).toContain('Age (Ma)');
  });
});

describe('model-support figure', () => {
  it('ranks compared models by AICc and lists models not compared last', () => {
    const rows = supportRows(figureLineage(ridgeDocument({ withOuNotCompared: true })));
    expect(rows.map((row) => row.id)).toEqual(['random-walk', 'directional-walk', 'stasis', 'strict-stasis', 'ou']);
    expect(tableNumber(-2.9, 2)).toBe('−2.90');
    expect(tableNumber(-0.001, 2)).toBe('0.00');
  });

  it('draws a bar per model as long as its Akaike weight on the 0–1 scale', async () => {
    const document = ridgeDocument({ withOuNotCompared: true });
    const figure = renderModelSupport(document);
    expect(figure.width).toBe(2126);
    const pixels = await decodePng(figure.bytes);
    const rows = supportRows(figureLineage(document));
    // Row centres in the table's own units (points from its top), placed on the page by the chart's y scale.
    const centres = modelSupportPlan(figureLineage(document), resolveFigureOptions()).rowCentres;
    const failures: string[] = [];
    const right = figure.frame.plotArea.right;
    rows.forEach((row, i) => {
      const y = scalePixel(figure.frame, 'y', centres[i]);
      const empty = pixels.at(right - 12, y);
      if (luma(empty) < 200) failures.push(`row ${row.id}: the far end of the weight scale is inked`);
      if (row.weight === null || row.weight < 0.1) return;
      const middle = pixels.at(scalePixel(figure.frame, 'x', row.weight / 2), y);
      if (!(middle[2] > middle[0] + 40 && luma(middle) < 160)) failures.push(`row ${row.id}: bar middle is ${middle.slice(0, 3)}`);
      const beyond = pixels.at(scalePixel(figure.frame, 'x', row.weight) + 6, y + 18);
      if (beyond[2] > beyond[0] + 40 && luma(beyond) < 160) failures.push(`row ${row.id}: bar runs past its weight`);
    });
    if (failures.length > 0) expect.fail(`${failures.join('; ')} (figure kept at ${keepChanged('model-support', figure.bytes)})`);
  });

  it('typesets the table with its headers, true minus signs, the best model and "not compared" (SVG text)', () => {
    const figure = renderModelSupport(ridgeDocument({ withOuNotCompared: true }), { format: 'svg', width: 'double' });
    const { root, text } = svgText(new TextDecoder().decode(figure.bytes));
    expect(root.width).toBe('510pt');
    for (const label of ['Model', 'logL', 'AICc', 'ΔAICc', 'Akaike weight', 'unbiased random walk', 'directional walk', '−2.90', '0.64', 'not compared', 'Weights compare only the models listed']) {
      expect(text).toContain(label);
    }
  });
});
