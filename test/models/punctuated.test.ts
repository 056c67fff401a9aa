import { describe, expect, it } from 'vitest';
import { denseLogLik } from '../../src/engine/dense.js';
import { fitAtConfiguration } from '../../src/fit/fit-configurations.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { bindConfiguration, defaultMinimumSegment } from '../../src/models/model.js';
import { punctuatedOne, punctuatedTwo } from '../../src/models/punctuated.js';
import { punctuatedOneSeparate, punctuatedTwoSeparate } from '../../src/models/punctuated-separate.js';
import { shiftPlacements } from '../../src/models/punctuated-shifts.js';
import { createRandom } from '../../src/random/random.js';

const evenTimes = (size: number): number[] => Array.from({ length: size }, (_, i) => 0.25 * i);

describe('punctuated models', () => {
  it('K counts means, variances and one per shift position (as documented in the model files)', () => {
    const lineage = lineageFromArrays({ time: evenTimes(30), mean: evenTimes(30).map((t) => t), samplingVariance: new Array(30).fill(0.1) });
    // 1 shift shared: 2 means + 1 variance + 1 position; separate: 2 + 2 + 1; 2 shifts shared: 3 + 1 + 2; separate: 3 + 3 + 2.
    expect(punctuatedOne.parameterCount(lineage)).toBe(4);
    expect(punctuatedOneSeparate.parameterCount(lineage)).toBe(5);
    expect(punctuatedTwo.parameterCount(lineage)).toBe(6);
    expect(punctuatedTwoSeparate.parameterCount(lineage)).toBe(8);
    expect(fitModel(punctuatedTwo, lineage, { intervals: false }).k).toBe(6);
  });

  it('lists every admissible shift placement (counts by stars and bars)', () => {
    // One shift in N horizons with segments >= L: N - 2L + 1 places; two shifts: C(N - 3L + 2, 2) (combinatorics, closed form).
    for (const [size, minimum] of [[30, 5], [17, 3], [12, 4], [9, 5]] as const) {
      expect(shiftPlacements(size, 1, minimum).length).toBe(Math.max(0, size - 2 * minimum + 1));
      const free = size - 3 * minimum + 2;
      expect(shiftPlacements(size, 2, minimum).length).toBe(free >= 2 ? (free * (free - 1)) / 2 : 0);
    }
    for (const configuration of shiftPlacements(17, 2, 3)) {
      const [first, second] = configuration.shifts;
      expect(first).toBeGreaterThanOrEqual(3);
      expect(second - first).toBeGreaterThanOrEqual(3);
      expect(17 - second).toBeGreaterThanOrEqual(3);
    }
    expect(defaultMinimumSegment).toBe(5);
  });

  it('the 1-shift search recovers a clear known shift within ±1 horizon (seeded simulations)', () => {
    // Clear case: a jump of 2 trait units against a total within-segment sd of sqrt(0.1 + 0.02) = 0.35 (about 6 sd).
    const random = createRandom(2024);
    for (let replicate = 0; replicate < 12; replicate++) {
      const size = 40;
      const shift = 8 + Math.floor(random.uniform() * 25);
      const time = evenTimes(size);
      const mean = time.map((_, i) => (i < shift ? 10 : 12) + Math.sqrt(0.1) * random.normal() + Math.sqrt(0.02) * random.normal());
      const lineage = lineageFromArrays({ time, mean, samplingVariance: new Array(size).fill(0.02) });
      for (const model of [punctuatedOne, punctuatedOneSeparate]) {
        const fit = fitModel(model, lineage, { intervals: false });
        const found = (fit.extra?.shifts as { index: number }[])[0].index;
        expect(Math.abs(found - shift)).toBeLessThanOrEqual(1);
      }
    }
  });

  it('the screened search finds the same maximum as fitting every configuration in full (brute force)', () => {
    const random = createRandom(5);
    const size = 21;
    const time = Array.from({ length: size }, (_, i) => (i === 0 ? 0 : i + 0.5 * random.uniform()));
    const mean = time.map((_, i) => (i < 7 ? 1 : i < 14 ? 1.8 : 1.2) + 0.4 * random.normal());
    const samplingVariance = time.map(() => 0.01 + 0.1 * random.uniform());
    const lineage = lineageFromArrays({ time, mean, samplingVariance });
    for (const model of [punctuatedOne, punctuatedTwo, punctuatedOneSeparate, punctuatedTwoSeparate]) {
      const fit = fitModel(model, lineage, { intervals: false, minimumSegment: 3 });
      let best = Number.NEGATIVE_INFINITY;
      for (const configuration of model.configurations!(lineage, { minimumSegment: 3 })) {
        // Separate variances: segment by segment (blocks); checked against the nested search below.
        const full = model.blocks
          ? fitAtConfiguration(model, lineage, configuration, { intervals: false }, fitModel)
          : fitModel(bindConfiguration(model, configuration), lineage, { intervals: false });
        best = Math.max(best, full.logLik);
      }
      expect(Math.abs(fit.logLik - best)).toBeLessThan(1e-7);
      // The reported logL is the dense likelihood at the reported estimates (ml-matrix reference).
      const { mean: mu, covariance } = model.meanCovariance(lineage, fit.estimates);
      expect(Math.abs(denseLogLik(mu, covariance, samplingVariance, mean) - fit.logLik)).toBeLessThan(1e-8);
    }
  });

  it('separate variances: the segment-by-segment fit equals the nested search of the whole likelihood', () => {
    const random = createRandom(6);
    const size = 16;
    const time = evenTimes(size);
    const mean = time.map((_, i) => (i < 9 ? 3 : 4) + (i < 9 ? 0.2 : 0.6) * random.normal());
    const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 0.01 + 0.05 * random.uniform()) });
    const configuration = { shifts: [9] };
    const blocks = fitAtConfiguration(punctuatedOneSeparate, lineage, configuration, { intervals: true }, fitModel);
    const nested = fitModel(bindConfiguration(punctuatedOneSeparate, configuration), lineage, { intervals: true });
    expect(Math.abs(blocks.logLik - nested.logLik)).toBeLessThan(1e-7);
    for (const name of ['segment_1_mean', 'segment_2_variance']) {
      const tolerance = 1e-4 * Math.max(1, Math.abs(nested.parameters[name].estimate ?? 0));
      expect(Math.abs((blocks.parameters[name].estimate ?? NaN) - (nested.parameters[name].estimate ?? NaN))).toBeLessThan(tolerance);
      expect(Math.abs((blocks.parameters[name].upper ?? NaN) - (nested.parameters[name].upper ?? NaN))).toBeLessThan(1e-3 * Math.max(1, Math.abs(nested.parameters[name].upper ?? 0)));
    }
  });

  it('reports shifts as 0-based index of the first horizon of the new segment, with its age', () => {
    const size = 20;
    const time = evenTimes(size);
    const random = createRandom(9);
    const mean = time.map((_, i) => (i < 12 ? 5 : 8) + 0.1 * random.normal());
    const lineage = { ...lineageFromArrays({ time, mean, samplingVariance: new Array(size).fill(0.01) }), positionKind: 'age' as const, position: Float64Array.from(time, (t) => 30 - t) };
    const fit = fitModel(punctuatedOne, lineage);
    expect(fit.extra?.shifts).toEqual([{ index: 12, age: 30 - time[12] }]);
    expect(fit.estimates.shift_1_time).toBe(time[12]);
    // Heights placed by an age model (issue 19): the shift carries its age (first age - t) and its height as read.
    const byHeight = { ...lineage, positionKind: 'height' as const, position: Float64Array.from(time, (t) => 2 * t), firstAge: 30 };
    expect(fitModel(punctuatedOne, byHeight, { intervals: false }).extra?.shifts).toEqual([{ index: 12, age: 30 - time[12], height: 2 * time[12] }]);
    // The shift times also go with the parameters (JSON params), without an interval, so figures can redraw the model.
    expect(fit.parameters.shift_1_time).toMatchObject({ estimate: time[12], lower: null, upper: null });
    expect(fit.parameters.shift_1_previous_time.estimate).toBe(time[11]);
    expect(fit.parameters.segment_1_mean.lower).not.toBeNull();
  });

  it('too few horizons for the minimum segment length: not fitted, with the reason', () => {
    const lineage = lineageFromArrays({ time: evenTimes(9), mean: evenTimes(9), samplingVariance: new Array(9).fill(0.1) });
    const fit = fitModel(punctuatedTwo, lineage);
    expect(fit.converged).toBe(false);
    expect(fit.message).toMatch(/no admissible shift position/);
  });
});
