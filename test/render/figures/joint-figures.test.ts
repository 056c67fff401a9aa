import { describe, expect, it } from 'vitest';
import { renderJointPanels, renderJointTrajectory, type JointFigureGroup } from '../../../src/render/figures/joint.js';
import { darkestNear, decodePng, isBlank, keepChanged, scalePixel } from './figure-probes.js';

/** A hand-made joint.json group: 5 horizons, width missing at the third, well-separated means. */
const group: JointFigureGroup = {
  section: 'Test Wash',
  traits: ['length', 'width'],
  trait_units: ['mm', 'mm'],
  time_unit: 'Myr',
  series: {
    axis: 'age',
    position: [10, 9, 8, 7, 6],
    mean: [[10, 5], [12, 6], [14, null], [16, 9], [18, 7]],
    sampling_covariance: [0.04, 0.09, 0.04, 0.04, 0.04].map((e) => [[e, 0.5 * e], [0.5 * e, e]]),
  },
};

describe('joint figures: marks where the scales put them (pixel probes)', () => {
  it('trajectory: every complete horizon has a mark; the 95% ellipse passes through its extreme point', async () => {
    const figure = renderJointTrajectory(group, 0, 1, { dpi: 150 });
    const pixels = await decodePng(figure.bytes);
    const at = (x: number, y: number) => ({ x: scalePixel(figure.frame, 'x', x), y: scalePixel(figure.frame, 'y', y) });
    try {
      for (const [x, y] of [[10, 5], [12, 6], [16, 9], [18, 7]]) {
        const point = at(x, y);
        // The oldest mark is the lightest of the age ramp (rgb 170, 196, 226): not blank paper.
        expect(isBlank(pixels.at(point.x, point.y))).toBe(false);
      }
      // The ellipse of horizon 1 reaches x = 10 + sqrt(5.991 × 0.04) (chi^2_2(0.95), closed form) at y = 5 + 0.5 × 0.4894 (the regression of y on x).
      const reach = Math.sqrt(5.991464547107979 * 0.04);
      const edge = at(10 + reach, 5 + 0.5 * reach);
      expect(isBlank(pixels.at(edge.x, edge.y))).toBe(false);
      // Far from every mark: the corner of the data box near (18, 5) holds nothing.
      const empty = at(17.5, 5);
      expect(isBlank(pixels.at(empty.x, empty.y))).toBe(true);
    } catch (error) {
      keepChanged('joint-trajectory', figure.bytes);
      throw error;
    }
  });

  it('panels: one mark per observed value in its own panel on the shared age axis, none for the missing width', async () => {
    const figure = renderJointPanels(group, { dpi: 150 });
    const pixels = await decodePng(figure.bytes);
    const pixel = (scale: string, value: number): number => {
      const s = figure.frame.scales[scale];
      return s.pixelAtMin + ((value - s.min) / (s.max - s.min)) * (s.pixelAtMax - s.pixelAtMin);
    };
    try {
      // Older at the bottom (stratigraphic order, common practice).
      expect(pixel('y', 10)).toBeGreaterThan(pixel('y', 6));
      group.series.mean.forEach((row, i) => {
        row.forEach((value, j) => {
          if (value === null) return;
          expect(darkestNear(pixels, pixel(`x${j}`, value), pixel('y', group.series.position[i]))).toBeLessThan(160);
        });
      });
      // The panels do not overlap: the width panel lies right of the length panel.
      expect(Math.min(figure.frame.scales.x1.pixelAtMin, figure.frame.scales.x1.pixelAtMax)).toBeGreaterThan(Math.max(figure.frame.scales.x0.pixelAtMin, figure.frame.scales.x0.pixelAtMax) - 1);
    } catch (error) {
      keepChanged('joint-panels', figure.bytes);
      throw error;
    }
  });
});
