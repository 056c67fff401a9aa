import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { fitModel, type ModelFit } from '../../src/fit/fit-model.js';
import { lineageRates } from '../../src/fit/rates.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { acceleratingWalk } from '../../src/models/accelerating-walk.js';
import type { EvolutionModel } from '../../src/models/model.js';
import { movingOptimum } from '../../src/models/moving-optimum.js';
import { optimumShift } from '../../src/models/optimum-shift.js';
import { ornsteinUhlenbeck } from '../../src/models/ou.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { findModel } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

// The three models of issue 16 (accelerating-walk, moving-optimum,
// optimum-shift): the filter against a dense multivariate-normal reference
// computed outside the project, nesting in the models they contain, recovery
// on long simulated series, and invariance to shifting and rescaling.

interface Fixture {
  designs: { design: number; time: number[]; mean: number[]; samplingVariance: number[] }[];
  evaluations: { design: number; model: string; parameters: Record<string, number>; logLik: number }[];
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/landscape/landscape-dense.json', import.meta.url), 'utf8')) as Fixture;
const designs = fixture.designs.map((design) => lineageFromArrays({ time: design.time, mean: design.mean, samplingVariance: design.samplingVariance }));
const models: Record<string, EvolutionModel> = { 'accelerating-walk': acceleratingWalk, 'moving-optimum': movingOptimum, 'optimum-shift': optimumShift };

describe('issue-16 models: filter against the dense reference', () => {
  it('matches the numpy/scipy dense logL (test/fixtures/landscape/make_landscape_dense.py) to 1e-9 relative at every fixture point', () => {
    expect(fixture.evaluations.length).toBe(30);
    for (const evaluation of fixture.evaluations) {
      const lineage = designs[evaluation.design];
      const filtered = new LikelihoodEvaluator(models[evaluation.model], lineage).atParameters(evaluation.parameters);
      // Source: dense Cholesky of V = C + diag(e) with mean and C written from the issue-16 definitions (numpy/scipy).
      expect(Math.abs(filtered - evaluation.logLik) / Math.max(1, Math.abs(evaluation.logLik))).toBeLessThan(1e-9);
    }
  });

  it('each model\'s own dense form (meanCovariance) gives the same numbers as the script (1e-9 relative)', async () => {
    const { denseLogLik } = await import('../../src/engine/dense.js');
    for (const evaluation of fixture.evaluations) {
      const lineage = designs[evaluation.design];
      const { mean, covariance } = models[evaluation.model].meanCovariance(lineage, evaluation.parameters);
      const dense = denseLogLik(mean, covariance, lineage.samplingVariance, lineage.mean);
      expect(Math.abs(dense - evaluation.logLik) / Math.max(1, Math.abs(evaluation.logLik))).toBeLessThan(1e-9);
    }
  });
});

describe('nesting at given parameters (by the definitions: r = 0, b = 0 and equal optima remove the extra parameter)', () => {
  const lineage = designs[1];
  const at = (model: EvolutionModel, parameters: Record<string, number>): number => new LikelihoodEvaluator(model, lineage).atParameters(parameters);
  it('accelerating-walk at rate_change = 0 is random-walk (1e-12 relative)', () => {
    const walk = at(randomWalk, { ancestral_mean: 10.1, step_variance: 0.2 });
    expect(Math.abs(at(acceleratingWalk, { ancestral_mean: 10.1, step_variance: 0.2, rate_change: 0 }) - walk)).toBeLessThan(1e-12 * Math.abs(walk));
    // and continuous into it: r = 1e-9 per time unit differs by far less than the fit's tolerance.
    expect(Math.abs(at(acceleratingWalk, { ancestral_mean: 10.1, step_variance: 0.2, rate_change: 1e-9 }) - walk)).toBeLessThan(1e-6);
  });
  it('moving-optimum at optimum_drift = 0 is ou (1e-12 relative)', () => {
    const parameters = { ancestral_mean: 9.8, optimum: 10.6, alpha: 0.7, step_variance: 0.1 };
    const ou = at(ornsteinUhlenbeck, parameters);
    expect(Math.abs(at(movingOptimum, { ...parameters, optimum_drift: 0 }) - ou)).toBeLessThan(1e-12 * Math.abs(ou));
  });
  it('optimum-shift with equal optima is ou, wherever the shift (1e-12 relative)', () => {
    const parameters = { ancestral_mean: 9.8, optimum: 10.6, alpha: 0.7, step_variance: 0.1 };
    const ou = at(ornsteinUhlenbeck, parameters);
    for (const shift of [3, 9, 16]) {
      const shifted = at(optimumShift, {
        ancestral_mean: 9.8, optimum_before: 10.6, optimum_after: 10.6, alpha: 0.7, step_variance: 0.1,
        shift_1_time: lineage.time[shift], shift_1_previous_time: lineage.time[shift - 1],
      });
      expect(Math.abs(shifted - ou)).toBeLessThan(1e-12 * Math.abs(ou));
    }
  });
});

/** A seeded lineage drawn from `model` on an even design of `size` horizons, 0.1 apart, sampling variance 0.01. */
function simulated(model: EvolutionModel, parameters: Record<string, number>, size: number, seed: number): Lineage {
  const design = lineageFromArrays({
    time: Array.from({ length: size }, (_, i) => i * 0.1),
    mean: new Array<number>(size).fill(0),
    samplingVariance: new Array<number>(size).fill(0.01),
  });
  const withShift = parameters.shift_index === undefined ? parameters : {
    ...parameters, shift_1_time: design.time[parameters.shift_index], shift_1_previous_time: design.time[parameters.shift_index - 1],
  };
  return withMeans(design, simulateMeans(model, design, withShift, createRandom(seed)));
}

describe('fitted logL at least the nested model\'s (short seeded series)', () => {
  const pairs: [EvolutionModel, EvolutionModel][] = [[acceleratingWalk, randomWalk], [movingOptimum, ornsteinUhlenbeck], [optimumShift, ornsteinUhlenbeck]];
  for (const [model, nested] of pairs) {
    it(`${model.id} ≥ ${nested.id} (to 1e-7: the search's tolerance)`, () => {
      for (const seed of [1, 2]) {
        const lineage = simulated(ornsteinUhlenbeck, { ancestral_mean: 0, optimum: 1, alpha: 2, step_variance: 0.3 }, 18, seed);
        const full = fitModel(model, lineage, { intervals: false });
        const reduced = fitModel(nested, lineage, { intervals: false });
        expect(full.converged && reduced.converged).toBe(true);
        expect(full.logLik).toBeGreaterThanOrEqual(reduced.logLik - 1e-7);
      }
    });
  }
});

describe('recovery on long simulated series (seeded; tolerances about three standard errors, from the spread of the fits)', () => {
  let accelerating: ModelFit;
  let decelerating: ModelFit;
  let moving: ModelFit;
  let shifted: ModelFit;
  beforeAll(() => {
    accelerating = fitModel(acceleratingWalk, simulated(acceleratingWalk, { ancestral_mean: 5, step_variance: 0.2, rate_change: 0.15 }, 300, 7), { intervals: false });
    decelerating = fitModel(acceleratingWalk, simulated(acceleratingWalk, { ancestral_mean: 5, step_variance: 2, rate_change: -0.15 }, 300, 8), { intervals: false });
    moving = fitModel(movingOptimum, simulated(movingOptimum, { ancestral_mean: 0, optimum: 2, optimum_drift: 0.5, alpha: 3, step_variance: 0.2 }, 250, 9), { intervals: false });
    shifted = fitModel(optimumShift, simulated(optimumShift, { ancestral_mean: 0, optimum_before: 2, optimum_after: -1, alpha: 3, step_variance: 0.2, shift_index: 60 }, 120, 10), { intervals: false });
  });
  it('accelerating-walk: rate_change of either sign, and the label follows its sign', () => {
    expect(accelerating.estimates.rate_change).toBeGreaterThan(0.15 - 0.05);
    expect(accelerating.estimates.rate_change).toBeLessThan(0.15 + 0.05);
    expect(accelerating.label).toMatch(/^accelerating walk/);
    expect(decelerating.estimates.rate_change).toBeGreaterThan(-0.15 - 0.05);
    expect(decelerating.estimates.rate_change).toBeLessThan(-0.15 + 0.05);
    expect(decelerating.label).toMatch(/^decelerating walk/);
    expect(accelerating.estimates.step_variance / 0.2).toBeGreaterThan(0.5);
    expect(accelerating.estimates.step_variance / 0.2).toBeLessThan(2);
  });
  it('moving-optimum: the optimum\'s drift, alpha and half_life', () => {
    expect(Math.abs(moving.estimates.optimum_drift - 0.5)).toBeLessThan(0.1);
    expect(moving.estimates.alpha).toBeGreaterThan(1.5);
    expect(moving.estimates.alpha).toBeLessThan(6);
    expect(moving.derived.half_life.estimate).toBeCloseTo(Math.LN2 / moving.estimates.alpha, 12);
  });
  it('optimum-shift: the shift position, both optima, and shifts/shift_search like the other shift models', () => {
    const shifts = shifted.extra?.shifts as { index: number }[];
    expect(Math.abs(shifts[0].index - 60)).toBeLessThanOrEqual(3);
    expect(Math.abs(shifted.estimates.optimum_before - 2)).toBeLessThan(0.4);
    expect(Math.abs(shifted.estimates.optimum_after + 1)).toBeLessThan(0.4);
    expect(shifted.extra?.shift_search).toBeDefined();
    expect(shifted.k).toBe(6);
  });
});

describe('invariance to shifting the trait and rescaling time (common practice: the models are location and time-scale families)', () => {
  const base = simulated(movingOptimum, { ancestral_mean: 0, optimum: 1, optimum_drift: 0.4, alpha: 1.5, step_variance: 0.3 }, 30, 21);
  const moved: Lineage = { ...base, mean: Float64Array.from(base.mean, (value) => value + 100) };
  const stretched: Lineage = { ...base, time: Float64Array.from(base.time, (value) => value * 1000) };
  for (const model of [acceleratingWalk, movingOptimum, optimumShift]) {
    it(`${model.id}: logL unchanged, locations move with the trait, rates scale with 1/time`, () => {
      const fit = fitModel(model, base, { intervals: false });
      const shiftedFit = fitModel(model, moved, { intervals: false });
      const stretchedFit = fitModel(model, stretched, { intervals: false });
      expect(Math.abs(shiftedFit.logLik - fit.logLik)).toBeLessThan(1e-6);
      expect(Math.abs(stretchedFit.logLik - fit.logLik)).toBeLessThan(1e-6);
      for (const spec of model.parameters) {
        const value = fit.estimates[spec.name];
        if (!Number.isFinite(value)) continue;
        const slack = 1e-4 * Math.max(1, Math.abs(value));
        const expectedShifted = spec.role === 'location' && spec.unit.time === 0 ? value + 100 : value;
        expect(Math.abs(shiftedFit.estimates[spec.name] - expectedShifted)).toBeLessThan(slack + 1e-4 * 100 * Number(spec.role === 'location' && spec.unit.time === 0));
        const expectedStretched = value * 1000 ** spec.unit.time;
        expect(Math.abs(stretchedFit.estimates[spec.name] - expectedStretched)).toBeLessThan(1e-4 * Math.max(1e-3, Math.abs(expectedStretched)));
      }
    });
  }
});

describe('moving-optimum at its alpha-zero limit (closed form: a walk with mean a + c1 t + c2 t^2 / 2)', () => {
  it('on exactly quadratic means 1 + 0.2 t + 0.8 t^2 it reports alpha 0, null optima, limit_drift 0.2 and limit_acceleration 1.6 (1e-6)', () => {
    const time = Array.from({ length: 30 }, (_, i) => i * 0.1);
    const lineage = lineageFromArrays({ time, mean: time.map((t) => 1 + 0.2 * t + 0.8 * t * t), samplingVariance: time.map(() => 0.0036) });
    const fit = fitModel(movingOptimum, lineage, { intervals: false });
    expect(fit.parameters.alpha.estimate).toBe(0);
    expect(fit.parameters.alpha.atBound).toBe('alpha-zero');
    expect(fit.parameters.optimum.estimate).toBeNull();
    expect(fit.parameters.optimum_drift.estimate).toBeNull();
    expect(Math.abs(fit.derived.limit_drift.estimate! - 0.2)).toBeLessThan(1e-6);
    expect(Math.abs(fit.derived.limit_acceleration.estimate! - 1.6)).toBeLessThan(1e-6);
  });
});

describe('rate_change, searched through variance_growth: its profile interval in its own units', () => {
  it('the profile log-likelihood at each end of the 95% interval is the maximum − χ²₁(0.95)/2 (definition of the profile interval; 1e-6)', async () => {
    const { profileFunction } = await import('../../src/fit/intervals.js');
    const lineage = simulated(acceleratingWalk, { ancestral_mean: 1, step_variance: 0.5, rate_change: -0.4 }, 30, 31);
    const fit = fitModel(acceleratingWalk, lineage, { intervalMethod: 'profile' });
    const interval = fit.parameters.rate_change;
    expect(interval.lower).not.toBeNull();
    expect(interval.upper).not.toBeNull();
    expect(interval.lower!).toBeLessThan(interval.estimate!);
    expect(interval.upper!).toBeGreaterThan(interval.estimate!);
    const profile = profileFunction(new LikelihoodEvaluator(acceleratingWalk, lineage), 'rate_change', false, 24);
    // 1.920729410347062 = χ²₁(0.95)/2 (scipy.stats.chi2.ppf(0.95, 1) / 2).
    for (const end of [interval.lower!, interval.upper!]) expect(Math.abs(profile(end) - (fit.logLik - 1.920729410347062))).toBeLessThan(1e-6);
  });
});

describe('what the models say about themselves (issue 22)', () => {
  it('the optimum\'s drift is not a rate of the lineage in --rates (a name pattern ending in "drift" took it for one)', () => {
    const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5], mean: [1, 1.2, 1.1, 1.5, 1.7, 1.6], samplingVariance: [0.01, 0.01, 0.01, 0.01, 0.01, 0.01] });
    const fit = fitModel(movingOptimum, lineage, { intervals: false });
    expect(Number.isFinite(fit.parameters.optimum_drift.estimate)).toBe(true);
    const rates = lineageRates(lineage, [fit], null);
    expect(rates.model.map((rate) => rate.parameter)).toEqual(['step_variance']);
  });
  it('every new model is found by id, in the extended set, with a help entry and catalogue references', async () => {
    const { modelSets } = await import('../../src/models/registry.js');
    const { findReference, modelReferenceKeys } = await import('../../src/render/report/references.js');
    const extended = modelSets.extended().map((model) => model.id);
    for (const id of ['accelerating-walk', 'moving-optimum', 'optimum-shift']) {
      expect(extended).toContain(id);
      expect(findModel(id)?.help?.heading).toBe(id);
      for (const key of modelReferenceKeys(id)) expect(findReference(key).key).toBe(key);
    }
  });
});
