import { describe, expect, it } from 'vitest';
import { chiSquareSurvival } from '../../src/statistics/chi-square.js';
import { erfc as chebyshevErfc } from '../../src/fit/intervals-integrated.js';

// erfc by its Maclaurin series, erf(z) = 2/sqrt(pi) sum (-1)^n z^(2n+1) / (n! (2n+1))
// (Abramowitz & Stegun 1964, 7.1.5), written here independently of the code
// under test. For z <= 3 the alternating terms stay below e^9, so the sum
// keeps about 12 significant digits of erf.
function seriesErfc(z: number): number {
  let term = z;
  let sum = z;
  for (let n = 1; n < 200; n++) {
    term *= (-z * z) / n;
    sum += term / (2 * n + 1);
  }
  return 1 - (2 / Math.sqrt(Math.PI)) * sum;
}

describe('chi-square upper tail from the stdlib distributions library', () => {
  // Closed form: a chi-square(1) variable is Z^2, so P(X >= x) = P(|Z| >= sqrt x) = erfc(sqrt(x / 2)).
  for (const x of [0.01, 0.5, 1, 2.7055, 3.841458820694124, 6.6349, 10]) {
    it(`1 degree of freedom at ${x}: erfc(sqrt(x/2))`, () => {
      expect(chiSquareSurvival(x, 1)).toBeCloseTo(seriesErfc(Math.sqrt(x / 2)), 10);
    });
  }
  // Closed form: chi-square(2) is exponential with mean 2, so P(X >= x) = exp(-x/2).
  for (const x of [0.1, 1, 5.991464547107979, 20]) {
    it(`2 degrees of freedom at ${x}: exp(-x/2)`, () => {
      expect(chiSquareSurvival(x, 2)).toBeCloseTo(Math.exp(-x / 2), 12);
    });
  }
  it('the 95% quantile of chi-square(1), 1.959963984540054^2, has upper tail 0.05', () => {
    expect(chiSquareSurvival(1.959963984540054 ** 2, 1)).toBeCloseTo(0.05, 12);
  });
  it('the Chebyshev erfc used by the integrated intervals agrees with the series to its stated 1.2e-7 (Press et al. 2007, 6.2)', () => {
    for (const z of [0, 0.3, 1, 1.5, 2.2, 3]) expect(Math.abs(chebyshevErfc(z) / seriesErfc(z) - 1)).toBeLessThan(1.2e-7);
  });
});
