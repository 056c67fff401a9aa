import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { createRandom, type RandomSource } from '../../src/random/random.js';

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

/**
 * A seeded lineage of `size` horizons for gradient checks: gaps 0.2–1.7,
 * sampling variances 0.02–0.12, means that drift toward 2 with noise (an
 * approach to an optimum, so ou's alpha is interior).
 */
export function approachingLineage(size: number, seed: number): Lineage {
  const random = createRandom(seed);
  const time = [0];
  for (let i = 1; i < size; i++) time.push(time[i - 1] + 0.2 + random.uniform() * 1.5);
  const samplingVariance = time.map(() => 0.02 + 0.1 * random.uniform());
  let level = 1;
  const mean = time.map((t, i) => {
    if (i > 0) level += 0.6 * (2 - level) * (t - time[i - 1]) * 0.3 + 0.3 * random.normal();
    return level + Math.sqrt(samplingVariance[i]) * random.normal();
  });
  return lineageFromArrays({ time, mean, samplingVariance });
}

/**
 * Golden-section search for the maximum of a unimodal `f` on [low, high]
 * (Kiefer 1953; common practice), `iterations` steps: where it is and the
 * larger of the two last values. Test references use it instead of the
 * fitter's own searches.
 */
export function goldenSection(f: (x: number) => number, low: number, high: number, iterations = 60): { at: number; value: number } {
  const ratio = (Math.sqrt(5) - 1) / 2;
  let c = high - ratio * (high - low);
  let d = low + ratio * (high - low);
  let fc = f(c);
  let fd = f(d);
  for (let k = 0; k < iterations; k++) {
    if (fc > fd) {
      high = d;
      d = c;
      fd = fc;
      c = high - ratio * (high - low);
      fc = f(c);
    } else {
      low = c;
      c = d;
      fc = fd;
      d = low + ratio * (high - low);
      fd = f(d);
    }
  }
  return { at: 0.5 * (low + high), value: Math.max(fc, fd) };
}
