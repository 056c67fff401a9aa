import { describe, expect, it } from 'vitest';
import { fitLineage } from '../../src/fit/fit-lineage.js';
import { fitJointModel, fitJointModels } from '../../src/joint/fit-joint.js';
import { jointModel, jointModels, type JointModel } from '../../src/joint/joint-models.js';
import { simulateJoint } from '../../src/joint/simulate-joint.js';
import type { JointData } from '../../src/joint/vector-filter.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { findModel } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';
import type { EvolutionModel } from '../../src/models/model.js';

const modelOf = (id: string): JointModel => jointModel(id) as JointModel;

/** A k-trait design: uneven times, `missing` (horizon, trait) pairs, sampling covariances (diagonal unless `correlatedSampling`). */
function design(k: number, horizons: number, seed: number, missing: [number, number][], correlatedSampling = false): JointData {
  const random = createRandom(seed);
  const time = [0];
  for (let i = 1; i < horizons; i++) time.push(time[i - 1] + 0.5 + random.uniform());
  const values = new Float64Array(horizons * k);
  for (const [i, j] of missing) values[i * k + j] = Number.NaN;
  const sampling = new Float64Array(horizons * k * k);
  for (let i = 0; i < horizons; i++) {
    for (let j = 0; j < k; j++) sampling[i * k * k + j * k + j] = 0.02 + 0.05 * random.uniform();
    if (correlatedSampling) {
      for (let j = 0; j < k; j++) for (let l = 0; l < j; l++) {
        const value = 0.5 * Math.sqrt(sampling[i * k * k + j * k + j] * sampling[i * k * k + l * k + l]);
        sampling[i * k * k + j * k + l] = value;
        sampling[i * k * k + l * k + j] = value;
      }
    }
  }
  return { traits: k, time: Float64Array.from(time), values, sampling };
}

/** One trait of a group as a single-trait lineage (its observed horizons only). */
function traitLineage(data: JointData, j: number) {
  const k = data.traits;
  const time: number[] = [];
  const mean: number[] = [];
  const samplingVariance: number[] = [];
  for (let i = 0; i < data.time.length; i++) {
    const value = data.values[i * k + j];
    if (Number.isNaN(value)) continue;
    time.push(data.time[i]);
    mean.push(value);
    samplingVariance.push(data.sampling[i * k * k + j * k + j]);
  }
  return lineageFromArrays({ time, mean, samplingVariance });
}

describe('independent joint models = sum of the single-trait fits of `fit` (an identity)', () => {
  // Missing values inside the series, none at the common first horizon (t is then the same in both fits).
  const shape = design(2, 16, 3, [[4, 1], [9, 0], [12, 1]]);
  const cases: [string, string, Float64Array, number[] | null, number[]][] = [
    ['independent-random-walks', 'random-walk', Float64Array.of(0.3, 0, 0, 0.1), null, [1, 4]],
    ['independent-directional-walks', 'directional-walk', Float64Array.of(0.2, 0, 0, 0.1), null, [1, 0.4, 4, -0.3]],
    ['independent-stasis', 'stasis', Float64Array.of(0.3, 0, 0, 0.1), null, [1, 4]],
    ['independent-ou', 'ou', Float64Array.of(0.3, 0, 0, 0.2), [0.8, 1.5], [0, 2, 4, 2]],
  ];
  cases.forEach(([jointId, singleId, covariance, alpha, locations], index) => {
    it(`${jointId} = ${singleId} on each trait`, () => {
      const model = modelOf(jointId);
      const data = simulateJoint(model, shape, { locations, covariance, alpha }, createRandom(40 + index));
      const joint = fitJointModel(model, data);
      const single = findModel(singleId) as EvolutionModel;
      const sum = [0, 1].reduce((total, j) => total + (fitLineage(traitLineage(data, j), [single], { intervals: false }).models[0].logLik as number), 0);
      // Identity (the joint density factorises when R, Sigma and every E_i are diagonal); both maxima to about 1e-7.
      expect(joint.logLik as number).toBeCloseTo(sum, 5);
    });
  });
});

describe('nesting, recovery and invariances', () => {
  const shape = design(2, 18, 7, [[5, 0], [11, 1]], true);
  const truth = { locations: [2, 5], covariance: Float64Array.of(0.4, 0.3, 0.3, 0.5), alpha: null };
  const data = simulateJoint(modelOf('correlated-random-walk'), shape, truth, createRandom(11));
  const walksAndStasis = jointModels.filter((model) => model.process !== 'ou');
  const fits = fitJointModels(walksAndStasis, data).models;

  it('each correlated model reaches at least the logL of its independent counterpart (R diagonal is a special case)', () => {
    for (const [independent, correlated] of [['independent-random-walks', 'correlated-random-walk'], ['independent-directional-walks', 'correlated-directional-walk'], ['independent-stasis', 'correlated-stasis']]) {
      const low = fits.find((fit) => fit.id === independent)!.logLik as number;
      const high = fits.find((fit) => fit.id === correlated)!.logLik as number;
      // Nesting (common practice): the maximum over a larger set is at least the maximum over the subset.
      expect(high).toBeGreaterThanOrEqual(low - 1e-9);
    }
  });

  it('AICc with N = observed values and Akaike weights summing to 1', () => {
    const observed = 18 * 2 - 2;
    const walk = fits.find((fit) => fit.id === 'correlated-random-walk')!;
    // Hurvich & Tsai (1989): AICc = -2 logL + 2K + 2K(K+1)/(N-K-1); K = k + k(k+1)/2 = 5 (issue 17's table).
    expect(walk.k).toBe(5);
    expect(walk.aicc as number).toBeCloseTo(-2 * (walk.logLik as number) + 10 + 60 / (observed - 6), 10);
    // Burnham & Anderson (2002): weights sum to 1.
    expect(fits.reduce((sum, fit) => sum + (fit.weight ?? 0), 0)).toBeCloseTo(1, 12);
  });

  it('swapping the traits permutes the estimates and keeps logL', () => {
    const k = 2;
    const swapped: JointData = {
      traits: k,
      time: data.time,
      values: Float64Array.from(data.values, (_, index) => data.values[Math.floor(index / k) * k + (1 - (index % k))]),
      sampling: Float64Array.from(data.sampling, (_, index) => {
        const i = Math.floor(index / 4);
        const j = Math.floor((index % 4) / 2);
        const l = index % 2;
        return data.sampling[i * 4 + (1 - j) * 2 + (1 - l)];
      }),
    };
    const model = modelOf('correlated-directional-walk');
    const original = fitJointModel(model, data);
    const permuted = fitJointModel(model, swapped);
    // Invariance (common practice): relabelling the traits changes no likelihood.
    expect(permuted.logLik as number).toBeCloseTo(original.logLik as number, 6);
    expect(permuted.parameters!.drift![0]).toBeCloseTo(original.parameters!.drift![1], 3);
    expect(permuted.parameters!.step_covariance![0][1]).toBeCloseTo(original.parameters!.step_covariance![1][0], 3);
  });

  it('adding a constant to a trait shifts its ancestral mean and nothing else', () => {
    const shifted = { ...data, values: Float64Array.from(data.values, (value, index) => value + (index % 2 === 1 ? 1000 : 0)) };
    const model = modelOf('correlated-random-walk');
    const original = fitJointModel(model, data);
    const moved = fitJointModel(model, shifted);
    // Invariance (common practice): the models' means span a constant per trait, so a shift is absorbed by it.
    expect(moved.logLik as number).toBeCloseTo(original.logLik as number, 6);
    expect(moved.parameters!.ancestral_mean![1] - 1000).toBeCloseTo(original.parameters!.ancestral_mean![1], 5);
    expect(moved.parameters!.step_correlation![0][1] as number).toBeCloseTo(original.parameters!.step_correlation![0][1] as number, 4);
  });
});

describe('recovery of the step covariance on a long simulated series', () => {
  it('correlated-random-walk, 300 horizons: R and the evolutionary correlation close to the truth', () => {
    const shape = design(2, 300, 21, []);
    const truth = { locations: [0, 0], covariance: Float64Array.of(1, 0.6 * Math.SQRT2, 0.6 * Math.SQRT2, 2), alpha: null };
    const data = simulateJoint(modelOf('correlated-random-walk'), shape, truth, createRandom(5));
    const fit = fitJointModel(modelOf('correlated-random-walk'), data);
    const [[r11, r12], [, r22]] = fit.parameters!.step_covariance!;
    // Consistency of the ML estimate (common practice); tolerances about 3 standard errors at 300 steps (sd of a variance estimate ≈ R sqrt(2/300) ≈ 8%).
    expect(r11).toBeGreaterThan(0.75);
    expect(r11).toBeLessThan(1.25);
    expect(r22).toBeGreaterThan(1.5);
    expect(r22).toBeLessThan(2.5);
    expect(r12 / Math.sqrt(r11 * r22)).toBeGreaterThan(0.45);
    expect(r12 / Math.sqrt(r11 * r22)).toBeLessThan(0.75);
  });
});
