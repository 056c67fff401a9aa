import { describe, expect, it } from 'vitest';
import { fitModel } from '../../src/fit/fit-model.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { ornsteinUhlenbeck } from '../../src/models/ou.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { stasis } from '../../src/models/stasis.js';
import { strictStasis } from '../../src/models/strict-stasis.js';
import { createRandom } from '../../src/random/random.js';

const random = createRandom(2026);
const time = [0, 0.4, 1.0, 1.3, 2.2, 2.5, 3.9, 4.1, 5.6, 6.0, 7.4, 8.0];
const mean = time.map((t) => 3 + 0.5 * t + 0.3 * random.normal());

describe('closed-form maximum-likelihood estimates', () => {
  it('stasis with zero sampling error: stasis_mean = sample mean, stasis_variance = mean squared deviation (divisor N) — closed form of the normal MLE', () => {
    const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 0) });
    const fit = fitModel(stasis, lineage);
    const average = mean.reduce((sum, value) => sum + value, 0) / mean.length;
    const variance = mean.reduce((sum, value) => sum + (value - average) ** 2, 0) / mean.length;
    expect(fit.parameters.stasis_mean.estimate).toBeCloseTo(average, 10);
    // To 1e-10: the estimate is polished to the root of the gradient (src/fit/polish.ts), not left where a value-only search stopped.
    expect(Math.abs((fit.parameters.stasis_variance.estimate as number) / variance - 1)).toBeLessThan(1e-10);
    const closedLogLik = -0.5 * mean.length * (Math.log(2 * Math.PI * variance) + 1);
    expect(fit.logLik).toBeCloseTo(closedLogLik, 9);
  });

  it('strict stasis: stasis_mean is the inverse-variance weighted mean (closed form of GLS)', () => {
    const samplingVariance = time.map((_, i) => 0.01 + 0.02 * (i % 4));
    const lineage = lineageFromArrays({ time, mean, samplingVariance });
    const fit = fitModel(strictStasis, lineage);
    const weights = samplingVariance.map((value) => 1 / value);
    const weighted = mean.reduce((sum, value, i) => sum + weights[i] * value, 0) / weights.reduce((sum, value) => sum + value, 0);
    expect(fit.parameters.stasis_mean.estimate).toBeCloseTo(weighted, 10);
    // Interval: weighted mean ± 1.959964 / sqrt(sum of weights) (the profile is exactly quadratic).
    const half = Math.sqrt(3.841458820694124) / Math.sqrt(weights.reduce((sum, value) => sum + value, 0));
    expect(fit.parameters.stasis_mean.lower).toBeCloseTo(weighted - half, 8);
    expect(fit.parameters.stasis_mean.upper).toBeCloseTo(weighted + half, 8);
  });

  it('directional walk as sampling error vanishes (e = 1e-12): drift → (x_m - x_0)/t_m, step variance → mean of (Δx - drift τ)²/τ (closed form of the increments MLE)', () => {
    const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 1e-12) });
    const fit = fitModel(directionalWalk, lineage);
    const m = time.length - 1;
    const drift = (mean[m] - mean[0]) / time[m];
    let sum = 0;
    for (let i = 1; i <= m; i++) {
      const tau = time[i] - time[i - 1];
      sum += (mean[i] - mean[i - 1] - drift * tau) ** 2 / tau;
    }
    expect(fit.parameters.drift.estimate).toBeCloseTo(drift, 6);
    expect(Math.abs((fit.parameters.step_variance.estimate as number) / (sum / m) - 1)).toBeLessThan(1e-5);
    expect(fit.parameters.ancestral_mean.estimate).toBeCloseTo(mean[0], 5);
  });

  it('with sampling variance exactly 0 at the first horizon the walks are reported as not fitted (singular covariance), never as a number', () => {
    const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 0) });
    for (const model of [randomWalk, directionalWalk]) {
      const fit = fitModel(model, lineage);
      expect(fit.converged).toBe(false);
      expect(fit.message).toMatch(/singular/);
    }
  });

  it('a step variance whose maximum is at the bound 0 is reported as exactly 0 and flagged', () => {
    // A perfectly straight trend with large sampling error: no room for random steps.
    const straight = time.map((t) => 1 + 0.2 * t);
    const lineage = lineageFromArrays({ time, mean: straight, samplingVariance: time.map(() => 0.5) });
    const fit = fitModel(directionalWalk, lineage);
    expect(fit.parameters.step_variance.estimate).toBe(0);
    expect(fit.parameters.step_variance.atBound).toBe('zero');
    expect(fit.parameters.step_variance.lower).toBe(0);
    expect(fit.parameters.step_variance.lowerAtBound).toBe(true);
    expect(fit.flags.join(' ')).toMatch(/step_variance at its bound 0/);
  });

  it('ou on uncorrelated data: the supremum is the alpha → ∞ limit, equal to stasis on the later horizons with the first horizon fitted exactly (closed form from the model definitions in MODELS.md)', () => {
    // At alpha -> ∞ the first horizon (t = 0) keeps mean a and no process variance, and every later
    // horizon is independent N(theta, sigma2 / (2 alpha) + e_i): so logL = -0.5 ln(2 pi e_1) + stasis logL of
    // horizons 2..N. Alternating means leave no positive autocorrelation for a finite alpha to explain,
    // and the ridge alpha, sigma2 -> ∞ (sigma2 / 2 alpha fixed) is flat to rounding: the limit is reported
    // (search.ts preferEnds), not an arbitrary point of the ridge.
    const times = [0, 0.7, 1.1, 1.9, 2.4, 3.3, 3.8, 4.6, 5.5, 6.1, 6.9, 7.6, 8.4, 9.0];
    const alternating = times.map((_, i) => 5 + (i % 2 === 0 ? 0.3 : -0.3) + 0.05 * random.normal());
    const samplingVariance = times.map((_, i) => 0.01 + 0.005 * (i % 3));
    const lineage = lineageFromArrays({ time: times, mean: alternating, samplingVariance });
    const fit = fitModel(ornsteinUhlenbeck, lineage, { intervals: false });
    expect(fit.flags).toContain('alpha at the alpha-infinite limit');
    const later = lineageFromArrays({ time: times.slice(1).map((t) => t - times[1]), mean: alternating.slice(1), samplingVariance: samplingVariance.slice(1) });
    const stasisLater = fitModel(stasis, later, { intervals: false });
    const closed = -0.5 * Math.log(2 * Math.PI * samplingVariance[0]) + stasisLater.logLik;
    expect(Math.abs(fit.logLik - closed)).toBeLessThan(1e-9);
    // The stationary variance sigma2 / (2 alpha) is the later horizons' stasis variance.
    const stationary = fit.estimates.step_variance / (2 * fit.estimates.alpha);
    expect(Math.abs(stationary / stasisLater.estimates.stasis_variance - 1)).toBeLessThan(1e-8);
  });

  it('ou optimum: open on the side of the trend when the directional walk (its alpha → 0 limit, optimum → ∞) is within the cut-off, finite when it is not', () => {
    // As optimum → ∞ with (optimum − a)·alpha fixed, ou tends to the directional walk (MODELS.md), so the
    // profile of the optimum tends to the directional walk's maximum; when that stays within 1.92 of
    // ou's maximum the 95% profile interval cannot close on that side. Checked for every interval method.
    const times = Array.from({ length: 16 }, (_, i) => 0.6 * i + 0.2 * (i % 3));
    const error = times.map(() => 0.01);
    const straight = lineageFromArrays({ time: times, mean: times.map((t, i) => 3 + 0.4 * t + 0.08 * Math.sin(2.1 * i)), samplingVariance: error });
    const bending = lineageFromArrays({ time: times, mean: times.map((t, i) => 8 - 5 * Math.exp(-0.8 * t) + 0.03 * Math.sin(2.1 * i)), samplingVariance: error });
    for (const intervalMethod of ['profile', 'adjusted'] as const) {
      const walk = fitModel(directionalWalk, straight, { intervals: false });
      const near = fitModel(ornsteinUhlenbeck, straight, { intervalMethod });
      expect(near.logLik - walk.logLik).toBeLessThan(1.92);
      expect(walk.estimates.drift).toBeGreaterThan(0);
      expect(near.parameters.optimum.upper).toBeNull();
      expect(near.parameters.optimum.upperAtBound).toBe(true);
      const far = fitModel(ornsteinUhlenbeck, bending, { intervalMethod });
      expect(far.logLik - fitModel(directionalWalk, bending, { intervals: false }).logLik).toBeGreaterThan(10);
      expect(far.parameters.optimum.upper).not.toBeNull();
      expect(far.parameters.optimum.lower as number).toBeLessThan(far.estimates.optimum);
      expect(far.parameters.optimum.upper as number).toBeGreaterThan(far.estimates.optimum);
    }
  });
});
