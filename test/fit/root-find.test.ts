import { describe, expect, it } from 'vitest';
import { bracketedRoot, profileCrossing } from '../../src/fit/root-find.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { locationEndsBySupremum } from '../../src/fit/intervals.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { strictStasis } from '../../src/models/strict-stasis.js';

// Half the 95% quantile of chi-square(1): 1.959963984540054^2 / 2 (common practice; the quantile from any table).
const drop = 1.959963984540054 ** 2 / 2;

describe('profileCrossing: interval ends of a profile (issue 14b)', () => {
  it('normal-mean profile -(x - m)^2 / (2 se^2): ends m ± 1.959964 se exactly (closed form), in few trial values', () => {
    for (const [mean, se] of [[1, 1], [-3.5, 0.02], [1e4, 250]]) {
      let calls = 0;
      const gap = (x: number): number => {
        calls += 1;
        return drop - (x - mean) ** 2 / (2 * se * se);
      };
      // First trial from a curvature 4 times too large (the GLS standard error at fixed process values is smaller than the profile's).
      const upper = profileCrossing(gap, mean, drop, mean + Math.sqrt(2 * drop) * se * 0.5, { tolerance: 1e-12 }) as number;
      const lower = profileCrossing(gap, mean, drop, mean - Math.sqrt(2 * drop) * se * 0.5, { tolerance: 1e-12 }) as number;
      expect(Math.abs(upper - (mean + 1.959963984540054 * se))).toBeLessThan(1e-11 * Math.max(1, Math.abs(mean)));
      expect(Math.abs(lower - (mean - 1.959963984540054 * se))).toBeLessThan(1e-11 * Math.max(1, Math.abs(mean)));
      // Stepping out by doubling standard errors and Brent (the search this replaced) took 9 or more per end here.
      expect(calls).toBeLessThanOrEqual(14);
    }
  });

  it('a profile that flattens above the cut-off: open (null), also when a range end (limit) is reached', () => {
    // Gap tends to drop / 2 as x grows: never crossed.
    const gap = (x: number): number => drop / 2 + drop / 2 / (1 + x * x);
    expect(profileCrossing(gap, 0, drop, 1, { tolerance: 1e-12, maxSteps: 120 })).toBeNull();
    expect(profileCrossing(gap, 0, drop, 1, { tolerance: 1e-12, limit: 50 })).toBeNull();
  });

  it('a crossing beyond a flat stretch (not quadratic at all) is still found: gap = drop − (x/100)^8, root 100 · drop^(1/8) (closed form)', () => {
    const gap = (x: number): number => drop - (x / 100) ** 8;
    const root = profileCrossing(gap, 0, drop, 0.5, { tolerance: 1e-12 }) as number;
    expect(Math.abs(root - 100 * drop ** (1 / 8))).toBeLessThan(1e-9);
  });

  it('the limit counts as a trial: a crossing before it is found, none after it', () => {
    const gap = (x: number): number => 1 - x; // root 1 (closed form)
    expect(profileCrossing(gap, 0, 1, 0.1, { tolerance: 1e-12, limit: 3 })).toBeCloseTo(1, 12);
    expect(profileCrossing(gap, 0, 1, 0.1, { tolerance: 1e-12, limit: 0.9 })).toBeNull();
  });

  it('bracketedRoot: the cube root of 2 from x^3 − 2 on [2, 0] with the end values given (closed form, 1e-14)', () => {
    const f = (x: number): number => 2 - x ** 3;
    expect(Math.abs(bracketedRoot(f, 0, f(0), 2, f(2), 1e-15) - Math.cbrt(2))).toBeLessThan(1e-14);
  });
});

describe('locationEndsBySupremum on a normal-mean profile (closed form)', () => {
  // The GLS mean of independent normals is their inverse-variance weighted mean with variance 1 / sum(1/e), and its
  // profile is exactly quadratic, so its 95% profile interval is the normal one (common practice).
  it('strict stasis, unequal sampling variances: the weighted mean ± 1.959964 / sqrt(sum 1/e), plain and adjusted (one coefficient: no adjustment)', () => {
    const samplingVariance = [0.5, 1, 2, 0.25];
    const mean = [1, 3, 2.5, 1.75];
    const weights = samplingVariance.map((e) => 1 / e);
    const total = weights.reduce((sum, w) => sum + w, 0);
    const estimate = weights.reduce((sum, w, i) => sum + w * mean[i], 0) / total;
    const se = 1 / Math.sqrt(total);
    const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean, samplingVariance });
    const evaluator = new LikelihoodEvaluator(strictStasis, lineage);
    for (const adjusted of [false, true]) {
      const ends = locationEndsBySupremum(evaluator, 'stasis_mean', adjusted, evaluator.profile([]) - drop, [], estimate, se);
      expect(Math.abs((ends.lower as number) - (estimate - 1.959963984540054 * se))).toBeLessThan(1e-11);
      expect(Math.abs((ends.upper as number) - (estimate + 1.959963984540054 * se))).toBeLessThan(1e-11);
      expect(ends.lowerAtBound || ends.upperAtBound).toBe(false);
    }
  });
});
