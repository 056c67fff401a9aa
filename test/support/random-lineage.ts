import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import type { RandomSource } from '../../src/random/random.js';

/**
 * A seeded random lineage for filter-against-dense checks: 8 to 8 + `spread`
 * horizons, evenly spaced for every third `design` and otherwise unevenly
 * (gaps 0.01–3.01, many short), means near 10, sampling variances
 * 0.001–0.301, and a covariate.
 */
export function randomTestLineage(random: RandomSource, design: number, spread: number): Lineage {
  const size = 8 + Math.floor(random.uniform() * spread);
  const time = [0];
  for (let i = 1; i < size; i++) time.push(time[i - 1] + (design % 3 === 0 ? 1 : 0.01 + 3 * random.uniform() ** 2));
  const mean = time.map(() => 10 + random.normal());
  const samplingVariance = time.map(() => 0.001 + random.uniform() * 0.3);
  const covariate = time.map(() => 5 * random.normal());
  return lineageFromArrays({ time, mean, samplingVariance, covariate });
}
