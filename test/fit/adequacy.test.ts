import { probit } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { adequacyStatistics, bootstrapPValue, checkAdequacy } from '../../src/fit/adequacy.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { punctuatedOne } from '../../src/models/punctuated.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { stasis } from '../../src/models/stasis.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

const design = (size: number) =>
  lineageFromArrays({ time: Array.from({ length: size }, (_, i) => 0.2 * i), mean: new Array(size).fill(0), samplingVariance: new Array(size).fill(0.05) });

describe('adequacy statistics', () => {
  it('hand-worked values: alternating signs, a straight line, normal scores', () => {
    // r = (1, -1, 1, -1): mean 0, sum r^2 = 4, sum r_i r_{i-1} = -3, so lag-1 autocorrelation -0.75; 4 runs (closed form).
    const alternating = adequacyStatistics([1, -1, 1, -1], [0, 1, 2, 3]);
    expect(alternating.autocorrelation).toBeCloseTo(-0.75, 14);
    expect(alternating.runs).toBe(4);
    expect(alternating.spreadTrend).toBe(0); // |r| constant: no trend
    // |r| = t exactly: correlation 1.
    expect(adequacyStatistics([1, -2, 3, -4], [1, 2, 3, 4]).spreadTrend).toBeCloseTo(1, 14);
    // Errors equal to their own Blom scores: W' = 1 exactly (closed form of the Shapiro–Francia statistic).
    const scores = Array.from({ length: 15 }, (_, i) => probit((i + 1 - 0.375) / 15.25));
    expect(adequacyStatistics(scores, scores.map((_, i) => i)).normality).toBeCloseTo(1, 12);
  });

  it('bootstrap p-values count the observed value among the draws (Davison & Hinkley 1997)', () => {
    const draws = [1, 2, 3, 4, 5, 6, 7, 8, 9];
    // Observed 10 above every draw: upper tail (1 + 0) / 10, two-sided 0.2; lower tail (1 + 9) / 10 = 1.
    expect(bootstrapPValue(10, draws, 'two-sided')).toBeCloseTo(0.2, 14);
    expect(bootstrapPValue(10, draws, 'lower')).toBe(1);
    expect(bootstrapPValue(0, draws, 'lower')).toBeCloseTo(0.1, 14);
    expect(bootstrapPValue(5, draws, 'two-sided')).toBe(1);
  });
});

describe('adequacy checks', () => {
  it('accept data simulated from the fitted model at roughly the nominal 5% rate', () => {
    // 40 seeded data sets from stasis, each fitted by stasis and checked with 99 bootstrap draws.
    // Under a correct model each check rejects with probability about 0.05, so its rejection count is
    // about Binomial(40, 0.05): P(X >= 7) = 0.0034 (scipy.stats.binom.sf(6, 40, 0.05)), hence <= 6 per check.
    // Over the 160 check results P(no rejection at all) would be 0.95^160 = 0.0003 if independent, hence >= 1.
    const random = createRandom(41);
    const lineage = design(30);
    const rejections = { autocorrelation: 0, runs: 0, spreadTrend: 0, normality: 0 };
    for (let replicate = 0; replicate < 40; replicate++) {
      const data = withMeans(lineage, simulateMeans(stasis, lineage, { stasis_mean: 3, stasis_variance: 0.2 }, random));
      const fit = fitModel(stasis, data, { intervals: false });
      const result = checkAdequacy(stasis, fit, data, { draws: 99, seed: replicate + 1 });
      for (const check of result.checks) if (!check.adequate) rejections[check.name] += 1;
    }
    for (const count of Object.values(rejections)) expect(count).toBeLessThanOrEqual(6);
    expect(Object.values(rejections).reduce((sum, count) => sum + count, 0)).toBeGreaterThanOrEqual(1);
  });

  it('reject clearly misspecified data: stasis fitted to a random walk fails the autocorrelation and runs checks', () => {
    // Random-walk data with step variance 5 per time unit against sampling variance 0.05: the stasis residuals
    // follow the walk, so lag-1 autocorrelation is near 1 where stasis simulations give near 0. If each check's power
    // were only 0.99, failing it in 2 or more of 10 data sets would have probability 1 - 0.99^10 - 10 * 0.99^9 * 0.01 = 0.004,
    // so we require at least 9 of 10.
    const random = createRandom(42);
    const lineage = design(30);
    let autocorrelation = 0;
    let runs = 0;
    for (let replicate = 0; replicate < 10; replicate++) {
      const data = withMeans(lineage, simulateMeans(randomWalk, lineage, { ancestral_mean: 3, step_variance: 5 }, random));
      const result = checkAdequacy(stasis, fitModel(stasis, data, { intervals: false }), data, { draws: 99, seed: 7 });
      if (!result.checks.find((check) => check.name === 'autocorrelation')!.adequate) autocorrelation += 1;
      if (!result.checks.find((check) => check.name === 'runs')!.adequate) runs += 1;
      expect(result.adequate).toBe(false);
    }
    expect(autocorrelation).toBeGreaterThanOrEqual(9);
    expect(runs).toBeGreaterThanOrEqual(9);
  });

  it('never passes by default: a model that cannot be simulated from is reported as not checked', () => {
    const lineage = design(12);
    const data = withMeans(lineage, Float64Array.from(lineage.time, (_, i) => 1 + 0.1 * Math.sin(i)));
    const fit = fitModel(stasis, data, { intervals: false });
    const broken = { ...fit, estimates: { stasis_mean: Number.NaN, stasis_variance: 0.1 } };
    const result = checkAdequacy(stasis, broken, data, { draws: 19, seed: 1 });
    expect(result.adequate).toBe(false);
    expect(result.checks.every((check) => Number.isNaN(check.pValue) && !check.adequate)).toBe(true);
    expect(result.note).toMatch(/^Not checked/);
  });

  it('is seeded (same seed, same p-values) and refits shift models at their fitted shift positions', () => {
    const random = createRandom(43);
    const lineage = design(24);
    const data = withMeans(lineage, Float64Array.from(lineage.time, (_, i) => (i < 12 ? 1 : 3) + 0.3 * random.normal()));
    const fit = fitModel(punctuatedOne, data, { intervals: false });
    const first = checkAdequacy(punctuatedOne, fit, data, { draws: 19, seed: 5 });
    const again = checkAdequacy(punctuatedOne, fit, data, { draws: 19, seed: 5 });
    expect(again.checks.map((check) => check.pValue)).toEqual(first.checks.map((check) => check.pValue));
    expect(first.failedDraws).toBe(0);
    expect(first.note).toMatch(/fitted shift positions/);
  });
});
