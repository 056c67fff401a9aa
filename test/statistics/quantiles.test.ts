import { describe, expect, it } from 'vitest';
import { orderQuantile, quantileOfSorted } from '../../src/statistics/quantiles.js';

// Definition 7 of Hyndman & Fan (1996, The American Statistician 50:361-365),
// written here from the paper: h = (n - 1) p, x_(floor h) + (h - floor h) (x_(floor h + 1) - x_(floor h)).
// This is the arithmetic of the hand-written helpers the library replaced, so
// equality (toBe, not toBeCloseTo) shows the outputs did not move.
function definitionSeven(sorted: readonly number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const below = Math.floor(h);
  const above = Math.min(sorted.length - 1, below + 1);
  return sorted[below] + (h - below) * (sorted[above] - sorted[below]);
}

describe('type-7 quantile (simple-statistics quantileSorted)', () => {
  it('numpy.quantile([1, 2, 3, 4], [0.25, 0.5, 0.975]) = 1.75, 2.5, 3.925 (numpy default "linear"; values from memory, closed form)', () => {
    expect(quantileOfSorted([1, 2, 3, 4], 0.25)).toBe(1.75);
    expect(quantileOfSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantileOfSorted([1, 2, 3, 4], 0.975)).toBeCloseTo(3.925, 14);
  });

  it('equals definition 7 bit for bit on uneven data at the probabilities the tool prints', () => {
    let state = 12345;
    const next = () => ((state = (state * 1103515245 + 12345) % 2 ** 31) / 2 ** 31) * 10 - 3;
    for (const size of [1, 2, 3, 7, 40, 101]) {
      const sorted = Array.from({ length: size }, next).sort((a, b) => a - b);
      for (const p of [0, 0.025, 0.05, 0.25, 0.5, 0.75, 0.95, 0.975, 1]) expect(quantileOfSorted(sorted, p)).toBe(definitionSeven(sorted, p));
    }
  });
});

describe('bootstrap order statistic', () => {
  it('the ceil(level (B + 1))-th smallest (Davison & Hinkley 1997, section 4.2)', () => {
    const draws = Array.from({ length: 19 }, (_, i) => i + 1);
    expect(orderQuantile(draws, 0.95)).toBe(19); // ceil(0.95 × 20) = 19
    expect(orderQuantile(draws, 0.5)).toBe(10); // ceil(0.5 × 20) = 10
    expect(orderQuantile([4, 5, 6], 0.99)).toBe(6); // capped at the largest
  });
});
