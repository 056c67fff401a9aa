import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitJointModel } from '../../src/joint/fit-joint.js';
import { jointDesign, jointDynamics, jointMeanCovariance, jointModel, type JointModel } from '../../src/joint/joint-models.js';
import { profileFromWhitened, whitenJoint, type JointData } from '../../src/joint/vector-filter.js';

/** Fixture made by test/fixtures/joint/make_joint_reference.py (numpy/scipy dense multivariate normal). */
const reference = JSON.parse(readFileSync(new URL('../fixtures/joint/joint-reference.json', import.meta.url), 'utf8')) as {
  groups: {
    traits: number;
    time: number[];
    values: (number | null)[][];
    sampling: number[][][];
    points: { model: string; locations: number[]; covariance: number[][]; alpha: number[] | null; logLik: number; profileLogLik: number }[];
    maxima?: { model: string; logLik: number }[];
  }[];
};

function dataOf(group: (typeof reference.groups)[number]): JointData {
  return {
    traits: group.traits,
    time: Float64Array.from(group.time),
    values: Float64Array.from(group.values.flat(), (value) => (value === null ? Number.NaN : value)),
    sampling: Float64Array.from(group.sampling.flat(2)),
  };
}

const modelOf = (id: string): JointModel => jointModel(id) as JointModel;

describe('vector Kalman filter against the dense multivariate normal (numpy/scipy fixture)', () => {
  reference.groups.forEach((group) => {
    const data = dataOf(group);
    const k = group.traits;
    group.points.forEach((point, index) => {
      it(`k = ${k}, ${point.model} #${index % 2}: logL at given parameters and the GLS profile, with missing values`, () => {
        const model = modelOf(point.model);
        const covariance = Float64Array.from(point.covariance.flat());
        const { mean } = jointMeanCovariance(model, data.time, k, point.locations, covariance, point.alpha);
        const residual = { ...data, values: Float64Array.from(data.values, (value, i) => value - mean[i]) };
        const dynamics = jointDynamics(model, data, covariance, point.alpha);
        const atGiven = profileFromWhitened(whitenJoint(residual, dynamics, [])!)!;
        // Source: scipy.stats.multivariate_normal.logpdf over the observed values (fixture).
        expect(atGiven.logLik).toBeCloseTo(point.logLik, 9);
        const profile = profileFromWhitened(whitenJoint(data, dynamics, jointDesign(model, data, point.alpha))!)!;
        // Source: dense GLS (numpy lstsq on the Cholesky-whitened design) in the fixture.
        expect(profile.logLik).toBeCloseTo(point.profileLogLik, 9);
      });
    });
  });

  it('the fitted maxima reach the dense maxima (scipy multi-start Nelder–Mead), correlated ≥ independent', () => {
    const group = reference.groups[0];
    const data = dataOf(group);
    const found = new Map<string, number>();
    for (const maximum of group.maxima ?? []) {
      const fit = fitJointModel(modelOf(maximum.model), data);
      found.set(maximum.model, fit.logLik as number);
      // Source: dense maximum from the fixture; our search must reach it (to 1e-5) and may not exceed it by more.
      expect(fit.logLik as number).toBeGreaterThan(maximum.logLik - 1e-5);
      expect(fit.logLik as number).toBeLessThan(maximum.logLik + 1e-5);
    }
    expect(found.size).toBe(6);
  });
});

describe('vector filter: edge cases', () => {
  it('a horizon with no observed value carries the state through (equals the dense walk over the observed horizons)', () => {
    const model = modelOf('correlated-random-walk');
    const data: JointData = {
      traits: 2,
      time: Float64Array.of(0, 1, 2.5, 4),
      values: Float64Array.of(0.1, 0.2, Number.NaN, Number.NaN, 0.7, 0.1, 1.1, 0.4),
      sampling: Float64Array.of(0.1, 0, 0, 0.1, 0.1, 0, 0, 0.1, 0.2, 0.05, 0.05, 0.2, 0.1, 0, 0, 0.1),
    };
    const covariance = Float64Array.of(1, 0.5, 0.5, 2);
    const withGap = profileFromWhitened(whitenJoint(data, jointDynamics(model, data, covariance, null), [])!)!;
    const dropped: JointData = {
      traits: 2,
      time: Float64Array.of(0, 2.5, 4),
      values: Float64Array.of(0.1, 0.2, 0.7, 0.1, 1.1, 0.4),
      sampling: Float64Array.of(0.1, 0, 0, 0.1, 0.2, 0.05, 0.05, 0.2, 0.1, 0, 0, 0.1),
    };
    const without = profileFromWhitened(whitenJoint(dropped, jointDynamics(model, dropped, covariance, null), [])!)!;
    // Closed form (common practice): a Brownian walk observed at a subset of times is the walk on those times.
    expect(withGap.logLik).toBeCloseTo(without.logLik, 12);
  });

  it('a walk whose first horizon has zero sampling covariance is refused (singular), not a number', () => {
    const model = modelOf('independent-random-walks');
    const data: JointData = { traits: 1, time: Float64Array.of(0, 1), values: Float64Array.of(0, 1), sampling: Float64Array.of(0, 0.1) };
    expect(whitenJoint(data, jointDynamics(model, data, Float64Array.of(1), null), [])).toBeNull();
  });
});
