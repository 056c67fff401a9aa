import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { fitAtConfiguration } from '../../src/fit/fit-configurations.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { modeShift, modeShiftModels } from '../../src/models/mode-shift.js';
import { bindConfiguration } from '../../src/models/model.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans } from '../../src/random/simulate-lineage.js';

const evenTimes = (size: number): number[] => Array.from({ length: size }, (_, i) => 0.5 * i);

describe('mode-shift models', () => {
  it('are the six ordered pairs of different modes, K = parameters + 1 shift position', () => {
    const lineage = lineageFromArrays({ time: evenTimes(20), mean: evenTimes(20), samplingVariance: new Array(20).fill(0.1) });
    const counts = Object.fromEntries(modeShiftModels.map((model) => [model.id, model.parameterCount(lineage)]));
    // stasis (mean, variance); first walk (ancestral mean, [drift], step variance); second walk ([drift], step variance); + 1 position.
    expect(counts).toEqual({
      'stasis-then-random-walk': 4,
      'stasis-then-directional-walk': 5,
      'random-walk-then-stasis': 5,
      'directional-walk-then-stasis': 6,
      'random-walk-then-directional-walk': 5,
      'directional-walk-then-random-walk': 5,
    });
    expect(() => modeShift('stasis', 'stasis')).toThrow();
  });

  it('continuity at the shift: a walk entering after stasis starts from the latent mean at the last stasis horizon', () => {
    // With no sampling error and zero step variance after the shift, every horizon after the shift equals the
    // latent mean of the last horizon before it (the definition), in the state-space simulator ...
    const size = 12;
    const time = evenTimes(size);
    const lineage = lineageFromArrays({ time, mean: new Array(size).fill(0), samplingVariance: new Array(size).fill(0) });
    const model = modeShift('stasis', 'random-walk');
    const parameters = { segment_1_mean: 5, segment_1_variance: 1, segment_2_step_variance: 0, shift_1_time: time[6], shift_1_previous_time: time[5] };
    const draws = simulateMeans(model, lineage, parameters, createRandom(3));
    for (let i = 6; i < size; i++) expect(draws[i]).toBe(draws[5]);
    expect(draws[5]).not.toBe(draws[4]);
    // ... and in the dense covariance: corr(z_5, z_j) = 1 for j >= 6.
    const { covariance } = model.meanCovariance(lineage, parameters);
    for (let j = 6; j < size; j++) expect(covariance[5][j]).toBe(covariance[5][5]);
    // A walk-to-walk shift keeps the expected trajectory continuous at t_p (closed form of the mean).
    const walks = modeShift('random-walk', 'directional-walk');
    const walkParameters = { ancestral_mean: 2, segment_1_step_variance: 0.1, segment_2_drift: 3, segment_2_step_variance: 0.2, shift_1_time: time[6], shift_1_previous_time: time[5] };
    const expected = walks.expectation(walkParameters, [time[5], time[5] + 1e-9, time[6]]);
    expect(Math.abs(expected.mean[1] - expected.mean[0])).toBeLessThan(1e-8);
    expect(expected.mean[2]).toBeCloseTo(2 + 3 * (time[6] - time[5]), 12);
  });

  it('recovers a clear known shift from stasis to a directional walk within ±1 horizon (seeded)', () => {
    const model = modeShift('stasis', 'directional-walk');
    const random = createRandom(77);
    for (let replicate = 0; replicate < 6; replicate++) {
      const size = 40;
      const time = evenTimes(size);
      const shift = 10 + Math.floor(random.uniform() * 20);
      const lineage = lineageFromArrays({ time, mean: new Array(size).fill(0), samplingVariance: new Array(size).fill(0.01) });
      const truth = { segment_1_mean: 10, segment_1_variance: 0.02, segment_2_drift: 2, segment_2_step_variance: 0.01, shift_1_time: time[shift], shift_1_previous_time: time[shift - 1] };
      const simulated = { ...lineage, mean: simulateMeans(model, lineage, truth, random) };
      const fit = fitModel(model, simulated, { intervals: false });
      expect(Math.abs((fit.extra?.shifts as { index: number }[])[0].index - shift)).toBeLessThanOrEqual(1);
    }
  });

  it('the search finds the maximum over every shift position (brute force), and logL is the dense likelihood at the estimates', () => {
    const random = createRandom(8);
    const size = 16;
    const time = Array.from({ length: size }, (_, i) => (i === 0 ? 0 : i + 0.6 * random.uniform()));
    const samplingVariance = time.map(() => 0.02 + 0.05 * random.uniform());
    let walk = 0;
    const mean = time.map((_, i) => (i < 8 ? 1 + 0.3 * random.normal() : (walk += 0.5 + 0.3 * random.normal()) + 1));
    const lineage = lineageFromArrays({ time, mean, samplingVariance });
    for (const model of modeShiftModels) {
      const fit = fitModel(model, lineage, { intervals: false, minimumSegment: 3 });
      let best = Number.NEGATIVE_INFINITY;
      for (const configuration of model.configurations!(lineage, { minimumSegment: 3 })) {
        const full = model.blocks
          ? fitAtConfiguration(model, lineage, configuration, { intervals: false }, fitModel)
          : fitModel(bindConfiguration(model, configuration), lineage, { intervals: false });
        best = Math.max(best, full.logLik);
      }
      expect(Math.abs(fit.logLik - best)).toBeLessThan(1e-7);
      const { mean: mu, covariance } = model.meanCovariance(lineage, fit.estimates);
      expect({ id: model.id, gap: Math.abs(denseLogLik(mu, covariance, samplingVariance, mean) - fit.logLik) < 1e-8 }).toEqual({ id: model.id, gap: true });
    }
  });

  it('walk then stasis: the block fit equals the nested search of the whole likelihood', () => {
    const random = createRandom(12);
    const size = 14;
    const time = evenTimes(size);
    const mean = time.map((t, i) => (i < 7 ? 1 + 0.4 * t + 0.2 * random.normal() : 3 + 0.3 * random.normal()));
    const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 0.02) });
    const model = modeShift('directional-walk', 'stasis');
    const blocks = fitAtConfiguration(model, lineage, { shifts: [7] }, { intervals: false }, fitModel);
    const nested = fitModel(bindConfiguration(model, { shifts: [7] }), lineage, { intervals: false });
    expect(Math.abs(blocks.logLik - nested.logLik)).toBeLessThan(1e-7);
  });
});
