import { describe, expect, it } from 'vitest';
import { renderModelSupport, renderTrajectory } from '../../../src/render/figures/index.js';
import { ridgeDocument } from './documents.js';
import { readPdf, svgText } from './figure-probes.js';

const labels = ['Test Ridge / valve width', 'Age (Ma)', 'Valve width (mean per horizon)', 'Horizon mean with 95% sampling interval', 'Expected trajectory, unbiased random walk', '95% envelope of the model'];

describe('vector output', () => {
  it('SVG parses, is sized in points for one journal column, and keeps its labels as text', () => {
    const figure = renderTrajectory(ridgeDocument(), { format: 'svg' });
    expect(figure.mime).toBe('image/svg+xml');
    const { root, text } = svgText(new TextDecoder().decode(figure.bytes));
    // 9 cm = 9 / 2.54 × 72 = 255.1 pt → 255 pt (closed form).
    expect(root.width).toBe('255pt');
    expect(root.viewBox).toBe(`0 0 255 ${figure.height}`);
    for (const label of labels) expect(text).toContain(label);
  });

  it('PDF parses, has one page of the figure size and carries its labels (decoded through ToUnicode)', () => {
    const figure = renderTrajectory(ridgeDocument(), { format: 'pdf', orientation: 'horizontal', smoothed: true });
    expect(figure.mime).toBe('application/pdf');
    const pdf = readPdf(figure.bytes);
    expect(pdf.mediaBox).toEqual([0, 0, 255, figure.height]);
    for (const label of labels) expect(pdf.text).toContain(label);
    expect(pdf.text).toContain('Smoothed mean (unbiased random walk) with 95% band');
    const support = readPdf(renderModelSupport(ridgeDocument(), { format: 'pdf' }).bytes);
    expect(support.text).toContain('Akaike weight');
    expect(support.text).toContain('ΔAICc');
  });

  it('SVG is deterministic', () => {
    const a = renderTrajectory(ridgeDocument(), { format: 'svg', smoothed: true });
    const b = renderTrajectory(ridgeDocument(), { format: 'svg', smoothed: true });
    expect(Buffer.from(a.bytes).equals(Buffer.from(b.bytes))).toBe(true);
  });
});
