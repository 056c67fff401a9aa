import { describe, expect, it } from 'vitest';
import { fitLineage, type LineageFit } from '../../src/fit/fit-lineage.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { classicModels, findModel } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';
import { trendTests } from '../../src/trend/run-trend-tests.js';
import { nullVarianceWald, sequentialPValue, trendStatistic, trendTest } from '../../src/trend/trend-test.js';

// The trend test's own models only (ou costs most and does not enter the statistic).
const testModels = classicModels.filter((model) => model.id !== 'ou');

/** A seeded lineage: uneven spacing, 8–30 specimens per horizon, within-horizon variance 1, from `model` at `parameters`. */
function seededLineage(seed: number, horizons: number, model: string, parameters: Record<string, number>): Lineage {
  const random = createRandom(seed);
  const time = [0];
  for (let i = 1; i < horizons; i++) time.push(time[i - 1] + 0.5 + random.uniform());
  const count = time.map(() => 8 + Math.floor(23 * random.uniform()));
  const design = lineageFromArrays({ time, mean: time.map(() => 0), samplingVariance: count.map((n) => 1 / n), count });
  return withMeans(design, simulateMeans(findModel(model)!, design, parameters, random));
}

describe('sequentialPValue (Besag & Clifford 1991, Biometrika 78:301, closed forms of the stopping rule)', () => {
  it('stops at the h-th exceedance with p = h / L', () => {
    // Every draw reaches the observed value: stop after h = 10 draws, p = 10/10 (closed form of the rule).
    expect(sequentialPValue(() => 5, 1, 10, 99)).toEqual({ p: 1, drawn: 10 });
    // Every other draw reaches it: the 4th exceedance is draw 8, p = 4/8.
    expect(sequentialPValue((index) => (index % 2 === 1 ? 5 : 0), 1, 4, 99)).toEqual({ p: 0.5, drawn: 8 });
  });
  it('without h exceedances in the most draws, p = (g + 1) / (most + 1)', () => {
    // None reaches: (0 + 1) / (199 + 1); two reach: (2 + 1) / (19 + 1) (closed form of the rule).
    expect(sequentialPValue(() => 0, 1, 10, 199)).toEqual({ p: 1 / 200, drawn: 199 });
    expect(sequentialPValue((index) => (index < 2 ? 9 : 0), 1, 10, 19)).toEqual({ p: 3 / 20, drawn: 19 });
  });
  it('skips draws whose statistic could not be computed', () => {
    expect(sequentialPValue((index) => (index % 2 === 0 ? null : 5), 1, 3, 99)).toEqual({ p: 1, drawn: 3 });
  });
});

describe('trendStatistic (definition in src/trend/trend-test.ts: 2 (logL_directional − max non-directional logL))', () => {
  it('takes the largest non-directional logL and may be negative', () => {
    expect(trendStatistic({ 'directional-walk': 10, 'random-walk': 8, stasis: 9, 'strict-stasis': 1 })).toBe(2);
    expect(trendStatistic({ 'directional-walk': 10, 'random-walk': 8, stasis: 12, 'strict-stasis': null })).toBe(-4);
    expect(trendStatistic({ 'directional-walk': null, 'random-walk': 8 })).toBeNull();
  });
});

describe('nullVarianceWald: closed form of a walk measured almost without sampling error', () => {
  it('W0 = (x_N − x_0)² / (T σ²_REML), σ²_REML = Σ dᵢ²/τᵢ / (N − 1) (GLS of a walk: drift = net change / span, Var = σ²/T; REML of the random walk from its increments)', () => {
    const random = createRandom(31);
    const time = [0];
    for (let i = 1; i < 12; i++) time.push(time[i - 1] + 0.5 + random.uniform());
    const mean = [10];
    for (let i = 1; i < 12; i++) mean.push(mean[i - 1] + 0.3 * Math.sqrt(time[i] - time[i - 1]) * random.normal());
    // Sampling variance 1e-10 (0 would make the first horizon's start exact and the density singular).
    const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 1e-10) });
    let sum = 0;
    for (let i = 1; i < 12; i++) sum += (mean[i] - mean[i - 1]) ** 2 / (time[i] - time[i - 1]);
    const stepVariance = sum / 11;
    const span = time[11];
    const expected = (mean[11] - mean[0]) ** 2 / (span * stepVariance);
    const result = nullVarianceWald(lineage)!;
    expect(result.statistic / expected).toBeCloseTo(1, 4);
    expect(result.drift / ((mean[11] - mean[0]) / span)).toBeCloseTo(1, 6);
  });
});

describe('trendTest on seeded lineages', () => {
  const options = { seed: 7, maxReplicates: 39, exceedances: 5, rateReplicates: 20 };
  const trending = seededLineage(11, 14, 'directional-walk', { ancestral_mean: 10, drift: 0.5, step_variance: 0.05 });
  const fit = fitLineage(trending, testModels, { intervals: false });
  const test = trendTest(fit, options);

  it('finds a strong trend, with its direction, and reports every field', () => {
    // Drift 0.5 per unit over a span near 13 against a walk sd near 0.8: far beyond chance (common practice: z well above 3).
    expect(test.p_value).toBe(1 / 40);
    expect(test.supported).toBe(true);
    expect(test.direction).toBe('increase');
    // Two random-walk generators (REML step variance, and 3 times it) of 39 replicates each.
    expect(test.replicates).toBe(78);
    expect(test.aicc_false_trend_rate).not.toBeNull();
    expect(test.rate_replicates).toBe(20);
  });

  it('gives the same p-value after shifting and rescaling the trait and changing the time unit (W0 is a ratio of a squared drift to its variance and the REML fits are equivariant: invariant by definition)', () => {
    const transformed = (traitScale: number, shift: number, timeScale: number): LineageFit => fitLineage(lineageFromArrays({
      time: Array.from(trending.time, (t) => t * timeScale),
      mean: Array.from(trending.mean, (x) => x * traitScale + shift),
      samplingVariance: Array.from(trending.samplingVariance, (e) => e * traitScale * traitScale),
      count: Array.from(trending.count),
    }), testModels, { intervals: false });
    const weak = seededLineage(12, 12, 'random-walk', { ancestral_mean: 10, step_variance: 0.05 });
    const weakFit = fitLineage(weak, testModels, { intervals: false });
    const weakTest = trendTest(weakFit, options);
    for (const [traitScale, shift, timeScale] of [[1, 1000, 1], [1000, 0, 1], [1, 0, 1000]]) {
      expect(trendTest(transformed(traitScale, shift, timeScale), options).p_value).toBe(test.p_value);
      const moved = fitLineage(lineageFromArrays({
        time: Array.from(weak.time, (t) => t * timeScale),
        mean: Array.from(weak.mean, (x) => x * traitScale + shift),
        samplingVariance: Array.from(weak.samplingVariance, (e) => e * traitScale * traitScale),
        count: Array.from(weak.count),
      }), testModels, { intervals: false });
      expect(trendTest(moved, options).p_value).toBe(weakTest.p_value);
    }
  });

  it('gives the same result on one thread and on two (per-replicate seeds)', async () => {
    const other = fitLineage(seededLineage(13, 10, 'stasis', { stasis_mean: 10, stasis_variance: 0.05 }), testModels, { intervals: false });
    const inline = await trendTests([fit, other], options, { threads: 1 });
    const pooled = await trendTests([fit, other], options, { threads: 2 });
    expect(pooled).toEqual(inline);
  });

  it('says why there is no verdict when the directional walk cannot be compared', () => {
    const short = fitLineage(seededLineage(14, 4, 'random-walk', { ancestral_mean: 10, step_variance: 0.05 }), testModels, { intervals: false });
    const none = trendTest(short, options);
    expect(none.p_value).toBeNull();
    expect(none.supported).toBe(false);
    expect(none.note).toMatch(/directional walk/);
  });
});

describe('size under the null of no directional change (binomial bound, common practice)', () => {
  // 80 unbiased walks and 80 stasis sequences of 10 horizons; a valid test rejects at most 10% of them at level 0.1
  // on average. The bound 17 of 80 is the 0.999 quantile of Binomial(80, 0.1) (scipy.stats.binom.ppf(0.999, 80, 0.1) = 17).
  const options = { seed: 3, maxReplicates: 39, exceedances: 4, rateReplicates: 0, level: 0.1 };
  for (const [model, parameters] of [['random-walk', { ancestral_mean: 10, step_variance: 0.06 }], ['stasis', { stasis_mean: 10, stasis_variance: 0.05 }]] as const) {
    it(`${model}: rejections within the binomial bound`, () => {
      let rejected = 0;
      for (let index = 0; index < 80; index++) {
        const fit = fitLineage(seededLineage(1000 + index, 10, model, { ...parameters }), testModels, { intervals: false });
        if (trendTest(fit, options).supported) rejected++;
      }
      expect(rejected).toBeLessThanOrEqual(17);
    });
  }
});

// Common practice: a test of the directional walk against the non-directional
// models needs the directional walk to be fitted; when `--models` leaves it out,
// the note says so and how to ask for it (it used to guess "too few horizons?").
describe('trend test without the directional walk', () => {
  it('says the directional walk was not asked for, and makes no test', async () => {
    const { fitLineage } = await import('../../src/fit/fit-lineage.js');
    const { findModel } = await import('../../src/models/registry.js');
    const { lineageFromArrays } = await import('../../src/lineage.js');
    const { trendTest } = await import('../../src/trend/trend-test.js');
    const time = Array.from({ length: 12 }, (_, i) => i);
    const lineage = lineageFromArrays({ time, mean: time.map((t) => 5 + 0.1 * t + (t % 2) * 0.05), samplingVariance: time.map(() => 0.01) });
    const fit = fitLineage(lineage, [findModel('stasis')!, findModel('random-walk')!], { intervals: false });
    const test = trendTest(fit, { seed: 1 });
    expect(test.p_value).toBeNull();
    expect(test.replicates).toBe(0);
    expect(test.note).toBe('no trend test: the directional walk is not among the models fitted (add directional-walk to --models to test for a trend)');
  });
});
