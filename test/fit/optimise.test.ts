import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { brentMaximize, findRoot, gridMaximize, nelderMead } from '../../src/fit/optimise.js';

// NIST Statistical Reference Datasets, nonlinear regression, Misra1a
// (y = b1 (1 - exp(-b2 x)), 14 observations, "lower" difficulty). Certified
// values: b1 = 2.3894212918E+02, b2 = 5.5015643181E-04, residual sum of
// squares 1.2455138894E-01. Data copied into test/fixtures/nist/misra1a.csv.
const rows = readFileSync(new URL('../fixtures/nist/misra1a.csv', import.meta.url), 'utf8')
  .trim().split('\n').slice(1).map((line) => line.split(',').map(Number));
const residualSumOfSquares = ([b1, b2]: number[]): number =>
  rows.reduce((sum, [x, y]) => sum + (y - b1 * (1 - Math.exp(-b2 * x))) ** 2, 0);

describe('optimisers on certified and closed-form problems', () => {
  for (const start of [[500, 1e-4], [250, 5e-4]]) {
    it(`Nelder–Mead reaches the NIST Misra1a certified solution from start ${start.join(', ')}`, () => {
      // Search b2 on a log scale so the simplex sees a well-scaled problem; the
      // optimiser itself is unchanged.
      const result = nelderMead(([b1, logB2]) => residualSumOfSquares([b1, Math.exp(logB2)]), [start[0], Math.log(start[1])], {
        maxEvaluations: 20000, tolerance: 1e-15, restarts: 4,
      });
      const [b1, logB2] = result.at;
      expect(Math.abs(b1 / 2.3894212918e2 - 1)).toBeLessThan(1e-6);
      expect(Math.abs(Math.exp(logB2) / 5.5015643181e-4 - 1)).toBeLessThan(1e-6);
      expect(Math.abs(result.value / 1.2455138894e-1 - 1)).toBeLessThan(1e-8);
    });
  }

  it('Brent maximisation finds the vertex of a parabola (closed form)', () => {
    expect(brentMaximize((x) => 1 - (x - 2.25) ** 2, 0, 10).at).toBeCloseTo(2.25, 8);
  });

  it('grid maximisation finds a maximum at the interval end (a bound)', () => {
    const found = gridMaximize((x) => x, -3, 5, 10);
    expect(found.at).toBe(5);
    expect(found.value).toBe(5);
  });

  it('Brent root finder returns sqrt(2) (closed form) and NaN without a sign change', () => {
    expect(Math.abs(findRoot((x) => x * x - 2, 0, 2) - Math.SQRT2)).toBeLessThan(1e-11);
    expect(findRoot((x) => x * x + 1, -1, 1)).toBeNaN();
  });
});
