import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitJointModel } from '../../src/joint/fit-joint.js';
import { jointModel, type JointModel } from '../../src/joint/joint-models.js';

/** Fixture made by test/fixtures/joint/make_joint_reference.py: dense scipy profile likelihood, brentq at max − chi2_1(0.95)/2. */
const reference = JSON.parse(readFileSync(new URL('../fixtures/joint/joint-reference.json', import.meta.url), 'utf8'));
const group = reference.groups[2];
const expected = group.intervals as {
  logLik: number; step_variance_1: number; step_correlation: number; step_correlation_interval: [number, number]; step_variance_1_interval: [number, number];
};

describe('joint profile-likelihood intervals against the dense scipy profile', () => {
  const data = {
    traits: 2,
    time: Float64Array.from(group.time as number[]),
    values: Float64Array.from((group.values as number[][]).flat()),
    sampling: Float64Array.from((group.sampling as number[][][]).flat(2)),
  };
  const fit = fitJointModel(jointModel('correlated-random-walk') as JointModel, data, { intervals: true });

  it('the maximum and the estimates', () => {
    // Source: scipy Nelder–Mead on the dense likelihood (fixture).
    expect(fit.logLik as number).toBeCloseTo(expected.logLik, 6);
    expect(fit.parameters!.step_covariance![0][0]).toBeCloseTo(expected.step_variance_1, 4);
    expect(fit.parameters!.step_correlation![0][1] as number).toBeCloseTo(expected.step_correlation, 4);
  });

  it('the evolutionary correlation interval and the first step variance interval', () => {
    const correlation = fit.intervals!.step_correlation![0][1]!;
    // Source: scipy brentq on the dense profile (fixture); both profiles are maximised numerically, so 1e-4.
    expect(correlation.lower as number).toBeCloseTo(expected.step_correlation_interval[0], 4);
    expect(correlation.upper as number).toBeCloseTo(expected.step_correlation_interval[1], 4);
    const variance = fit.intervals!.step_covariance![0][0]!;
    expect(variance.lower as number).toBeCloseTo(expected.step_variance_1_interval[0], 4);
    expect(variance.upper as number).toBeCloseTo(expected.step_variance_1_interval[1], 4);
    expect(fit.intervals!.step_correlation![1][0]).toEqual(correlation);
  });

  it('location intervals contain their estimates', () => {
    // Sanity (common practice): a profile interval contains the maximum-likelihood estimate.
    fit.intervals!.ancestral_mean!.forEach((interval, j) => {
      expect(interval.lower as number).toBeLessThan(fit.parameters!.ancestral_mean![j]);
      expect(interval.upper as number).toBeGreaterThan(fit.parameters!.ancestral_mean![j]);
    });
  });
});

describe('three traits: every correlation interval is found with its pair put first', () => {
  it('each interval contains its estimate and is the same for (j, l) and (l, j)', async () => {
    const { simulateJoint } = await import('../../src/joint/simulate-joint.js');
    const { createRandom } = await import('../../src/random/random.js');
    const horizons = 20;
    const k = 3;
    const time = Float64Array.from({ length: horizons }, (_, i) => i);
    const sampling = new Float64Array(horizons * k * k);
    for (let i = 0; i < horizons; i++) for (let j = 0; j < k; j++) sampling[i * k * k + j * k + j] = 0.05;
    const model = jointModel('correlated-random-walk') as JointModel;
    const truth = { locations: [0, 0, 0], covariance: Float64Array.of(1, 0.6, 0.3, 0.6, 1, -0.2, 0.3, -0.2, 1), alpha: null };
    const data = simulateJoint(model, { traits: k, time, values: new Float64Array(horizons * k), sampling }, truth, createRandom(9));
    const fit = fitJointModel(model, data, { intervals: true });
    const correlation = fit.parameters!.step_correlation!;
    for (const [j, l] of [[0, 1], [0, 2], [1, 2]]) {
      const interval = fit.intervals!.step_correlation![j][l]!;
      // A profile interval contains the maximum-likelihood estimate (common practice).
      expect(interval.lower as number).toBeLessThan(correlation[j][l] as number);
      expect(interval.upper as number).toBeGreaterThan(correlation[j][l] as number);
      expect(fit.intervals!.step_correlation![l][j]).toEqual(interval);
    }
  });
});
