/**
 * Power-curve layout: a point at the end of both axes (largest drift,
 * probability 1) is drawn whole, not cut at the plot's edge, and every
 * legend entry has a line of its own (its text's box lies wholly below the
 * previous entry's), inside the margins. Invented grid: p_lrt = d,
 * p_best = √d, p_weight = d², all 1 at d = 1.
 */
import { describe, expect, it } from 'vitest';
import { powerCurvePlan, renderPowerCurve } from '../../../src/render/figures/power-curve.js';
import { decodePng, isBlank, keepChanged } from './figure-probes.js';
import { recordDrawnText, textProblems } from './drawn-text.js';

const grid = [0, 0.25, 0.5, 0.75, 1].map((drift) => ({ drift, drift_sd: drift / 0.5, p_lrt: drift, p_best: Math.sqrt(drift), p_weight: drift * drift }));
const input = { grid, lineage: 'Test Section / length', horizons: 20, replicates: 200, timeUnit: 'Myr', weightThreshold: 0.5, targetPower: 0.8, level: 0.05, withinSd: 0.5 };

describe('power-curve layout', () => {
  it('draws the last point whole: ink just right of the plot area at probability 1', async () => {
    const figure = renderPowerCurve(input, { dpi: 300 });
    const pixels = await decodePng(figure.bytes);
    const scale = 300 / 72;
    const { right, top } = figure.frame.plotArea;
    // The marker's radius is 2.4 pt: 1.2 pt right of the plot's edge lies inside it. Nothing else is drawn there (no right-hand axis).
    const probe = pixels.at(Math.round(right + 1.2 * scale), Math.round(top));
    try {
      expect(isBlank(probe)).toBe(false);
    } catch (error) {
      keepChanged('power-curve-last-point', figure.bytes);
      throw error;
    }
  });

  it('puts each legend entry on a line of its own, inside the margins', () => {
    const { plan, resolved } = powerCurvePlan(input);
    const drawn = recordDrawnText(plan, resolved);
    // The last drift tick label is centred on the axis end and may reach into the 6 pt margin, never past 3 pt of the edge.
    expect(textProblems(drawn, 3)).toEqual([]);
    const labels = ['Bootstrap likelihood-ratio test at 5%', 'Directional walk best by AICc', 'Akaike weight > 0.5'];
    const boxes = labels.map((label) => drawn.texts.find((text) => text.text === label));
    for (const [i, box] of boxes.entries()) expect(box, labels[i]).toBeDefined();
    for (let i = 1; i < boxes.length; i++) expect(boxes[i]!.top).toBeGreaterThanOrEqual(boxes[i - 1]!.bottom);
  });
});
