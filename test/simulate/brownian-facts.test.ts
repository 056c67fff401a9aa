import { describe, expect, it } from 'vitest';
import { lineageFromArrays } from '../../src/lineage.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans } from '../../src/random/simulate-lineage.js';

// Brownian-motion facts (common practice; textbook property): E[z(t)] = z(0),
// Var[z(t)] = sigma2 t, increments independent. Checked on R = 4000 seeded
// replicates. Tolerances are 4 standard errors: the mean's SE is
// sqrt(sigma2 t / R); the sample variance's relative SE is sqrt(2 / (R - 1))
// (chi-square with R - 1 df); a correlation's SE is about 1 / sqrt(R).
// A 4-SE band is exceeded with probability about 6e-5 per check.
describe('simulated random walks obey the Brownian-motion facts', () => {
  const replicates = 4000;
  const stepVariance = 0.5;
  const time = [0, 1, 2.5, 6];
  const design = lineageFromArrays({ time, mean: time.map(() => 0), samplingVariance: time.map(() => 0) });
  const random = createRandom(99);
  const draws = Array.from({ length: replicates }, () => simulateMeans(randomWalk, design, { ancestral_mean: 3, step_variance: stepVariance }, random));

  it('starts exactly at the ancestral mean (no variance at t_0)', () => {
    for (const draw of draws) expect(draw[0]).toBe(3);
  });

  for (const index of [1, 2, 3]) {
    it(`at t = ${time[index]}: mean unchanged and variance sigma2 t`, () => {
      const values = draws.map((draw) => draw[index]);
      const mean = values.reduce((sum, value) => sum + value, 0) / replicates;
      const variance = values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (replicates - 1);
      const expected = stepVariance * time[index];
      expect(Math.abs(mean - 3)).toBeLessThan(4 * Math.sqrt(expected / replicates));
      expect(Math.abs(variance / expected - 1)).toBeLessThan(4 * Math.sqrt(2 / (replicates - 1)));
    });
  }

  it('successive increments are uncorrelated', () => {
    const first = draws.map((draw) => draw[1] - draw[0]);
    const second = draws.map((draw) => draw[3] - draw[2]);
    const average = (values: number[]) => values.reduce((sum, value) => sum + value, 0) / values.length;
    const [m1, m2] = [average(first), average(second)];
    let covariance = 0;
    let v1 = 0;
    let v2 = 0;
    for (let k = 0; k < replicates; k++) {
      covariance += (first[k] - m1) * (second[k] - m2);
      v1 += (first[k] - m1) ** 2;
      v2 += (second[k] - m2) ** 2;
    }
    expect(Math.abs(covariance / Math.sqrt(v1 * v2))).toBeLessThan(4 / Math.sqrt(replicates));
  });
});
