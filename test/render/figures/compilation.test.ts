import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { summariseCompilation } from '../../../src/compare/compilation.js';
import type { LineageFit } from '../../../src/fit/fit-lineage.js';
import { dotOffset, renderCompilation } from '../../../src/render/figures/compilation.js';

const require = createRequire(import.meta.url);
// @napi-rs/canvas (installed as "canvas") decodes the PNG so pixels can be checked.
const canvas = require('canvas') as { createCanvas(w: number, h: number): { getContext(kind: '2d'): { drawImage(image: unknown, x: number, y: number): void; getImageData(x: number, y: number, w: number, h: number): { data: Uint8ClampedArray } } } ; loadImage(data: Buffer): Promise<{ width: number; height: number }> };

function fit(weights: Record<string, number>): LineageFit {
  const ids = Object.keys(weights);
  const best = ids.reduce((a, b) => (weights[b] > weights[a] ? b : a));
  return { lineage: { section: 's', trait: 't', timeUnit: { label: 'Myr', years: 1e6 } }, best, smoothed: null, models: ids.map((id) => ({ id, label: id, weight: weights[id], parameters: {} })) } as unknown as LineageFit;
}

describe('renderCompilation', () => {
  it('spreads dots evenly (golden-ratio sequence stays in [-0.5, 0.5))', () => {
    for (let k = 0; k < 200; k++) {
      expect(dotOffset(k)).toBeGreaterThanOrEqual(-0.5);
      expect(dotOffset(k)).toBeLessThan(0.5);
    }
  });

  it('draws each lineage’s weight where it belongs and leaves empty places blank', async () => {
    // Every lineage gives "first" weight 0.9 and "second" 0.1: dots must sit near x = 0.9 in row 0 and x = 0.1 in row 1.
    const summary = summariseCompilation(Array.from({ length: 40 }, () => fit({ first: 0.9, second: 0.1 })));
    const figure = renderCompilation(summary, { format: 'png', dpi: 200 });
    expect(figure.mime).toBe('image/png');
    const image = await canvas.loadImage(Buffer.from(figure.bytes));
    const surface = canvas.createCanvas(image.width, image.height);
    const context = surface.getContext('2d');
    context.drawImage(image, 0, 0);
    const x = figure.frame.scales.x;
    const y = figure.frame.scales.y;
    const pixelX = (value: number) => x.pixelAtMin + ((value - x.min) / (x.max - x.min)) * (x.pixelAtMax - x.pixelAtMin);
    const pixelY = (value: number) => y.pixelAtMin + ((value - y.min) / (y.max - y.min)) * (y.pixelAtMax - y.pixelAtMin);
    // Darkest pixel (lowest r+g+b) in a small box: dots are dark blue, the row track is light grey.
    const darkest = (cx: number, cy: number, half: number): number => {
      const box = context.getImageData(Math.round(cx - half), Math.round(cy - half), 2 * half, 2 * half).data;
      let lowest = 765;
      for (let i = 0; i < box.length; i += 4) lowest = Math.min(lowest, box[i] + box[i + 1] + box[i + 2]);
      return lowest;
    };
    const half = Math.round(0.012 * (x.pixelAtMax - x.pixelAtMin));
    expect(darkest(pixelX(0.9), pixelY(0), half)).toBeLessThan(450);
    expect(darkest(pixelX(0.1), pixelY(1), half)).toBeLessThan(450);
    // No lineage has weight 0.6 in row 0 or 0.35 in row 1 (away from quartile bars and median ticks): blank track there.
    expect(darkest(pixelX(0.6), pixelY(0), half)).toBeGreaterThan(650);
    expect(darkest(pixelX(0.35), pixelY(1), half)).toBeGreaterThan(650);
  });
});
