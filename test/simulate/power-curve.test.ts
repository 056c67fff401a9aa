import { describe, expect, it } from 'vitest';
import { pngInfo } from '../../src/render/figures/index.js';
import { renderPowerCurve } from '../../src/render/figures/power-curve.js';
import { darkestNear, decodePng, isBlank, keepChanged, scalePixel } from '../render/figures/figure-probes.js';

// The power-curve figure: drawn where the data are, blank where they are
// not (pixel probes through the chart's own recorded scales), and sized as
// the house figures (9 cm at 600 dpi = round(9 / 2.54 x 600) = 2126 px).
const grid = [0, 0.25, 0.5, 0.75, 1].map((drift) => ({ drift, drift_sd: drift / 0.5, p_lrt: drift, p_best: Math.sqrt(drift), p_weight: drift * drift }));
const input = { grid, lineage: 'Test Section / length', horizons: 20, replicates: 200, timeUnit: 'Myr', weightThreshold: 0.5, targetPower: 0.8, level: 0.05, withinSd: 0.5 };

describe('power-curve figure', () => {
  it('is a 9 cm, 600 dpi PNG with ink at every grid point of the LRT curve and none far from the curves', async () => {
    const figure = renderPowerCurve(input);
    expect(Math.round(pngInfo(figure.bytes).dpiX ?? 0)).toBe(600);
    expect(figure.width).toBe(2126);
    const pixels = await decodePng(figure.bytes);
    try {
      for (const point of grid) {
        const x = scalePixel(figure.frame, 'x', point.drift);
        const y = scalePixel(figure.frame, 'y', point.p_lrt);
        expect(darkestNear(pixels, x, y, 4)).toBeLessThan(160);
      }
      // (0.1, 0.9): every curve is at or below 0.32 there.
      expect(isBlank(pixels.at(scalePixel(figure.frame, 'x', 0.1), scalePixel(figure.frame, 'y', 0.9)))).toBe(true);
    } catch (error) {
      keepChanged('power-curve', figure.bytes);
      throw error;
    }
  });
});
