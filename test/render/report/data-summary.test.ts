import { describe, expect, it } from 'vitest';
import { median, sampleVariance } from 'simple-statistics';
import { summariseData } from '../../../src/render/report/data-summary.js';
import type { LineageView } from '../../../src/render/report/document-view.js';

function lineage(data: { time: number[]; mean: number[]; sampling: number[]; n: number[]; extrapolated?: boolean[] }): LineageView {
  return {
    section: 'A', trait: 'x', horizons: data.time.length, time_unit: 'Myr', position_kind: 'time', transform: 'none', sampling_variance: 'per-horizon', best_model: null, models: [],
    data: {
      time: data.time, position: data.time, mean: data.mean, n: data.n, within_variance: data.sampling.map((value, i) => value * data.n[i]),
      sampling_variance: data.sampling, extrapolated: data.extrapolated ?? data.time.map(() => false), line: data.time.map((_, i) => i + 2),
    },
    smoothed: null,
  };
}

describe('data summary of a lineage', () => {
  it('hand-computed case: means 1, 2, 4 at t = 0, 1, 3 with e = 0.01, 0.04, 0.01', () => {
    // Closed form: span 3; intervals 1 and 2; net change 4 - 1 = 3;
    // mean of means 7/3, variance ((4/3)² + (1/3)² + (5/3)²) / 2 = 7/3;
    // average e = 0.02, typical SE = √0.02; share = 0.02 / (7/3) = 0.06/7.
    const summary = summariseData(lineage({ time: [0, 1, 3], mean: [1, 2, 4], sampling: [0.01, 0.04, 0.01], n: [10, 20, 30] }));
    expect(summary.span).toBe(3);
    expect(summary.shortestInterval).toBe(1);
    expect(summary.longestInterval).toBe(2);
    expect(summary.netChange).toBe(3);
    expect(summary.rangeOfMeans).toBe(3);
    expect(summary.varianceOfMeans).toBeCloseTo(7 / 3, 14);
    expect(summary.typicalStandardError).toBeCloseTo(Math.sqrt(0.02), 14);
    expect(summary.changeToError).toBeCloseTo(3 / Math.sqrt(0.02), 12);
    expect(summary.samplingShare).toBeCloseTo(0.06 / 7, 14);
    expect(summary.specimens).toEqual({ smallest: 10, median: 20, largest: 30, total: 60 });
  });

  it('variance and median agree with simple-statistics on uneven data', () => {
    // Reference library: simple-statistics sampleVariance (n - 1 divisor) and median.
    const mean = [5.1, 4.87, 5.6, 6.02, 5.95, 6.4];
    const n = [12, 7, 30, 18, 9, 21];
    const summary = summariseData(lineage({ time: [0, 0.3, 0.35, 1.2, 2, 2.05], mean, sampling: [0.02, 0.05, 0.01, 0.03, 0.04, 0.02], n }));
    expect(summary.varianceOfMeans).toBeCloseTo(sampleVariance(mean), 13);
    expect(summary.specimens.median).toBe(median(n));
    expect(summary.shortestInterval).toBeCloseTo(0.05, 14);
    expect(summary.longestInterval).toBeCloseTo(0.85, 14);
  });

  it('counts exact and extrapolated horizons; constant means give no share', () => {
    const summary = summariseData(lineage({ time: [0, 1, 2], mean: [3, 3, 3], sampling: [0, 0.1, 0], n: [5, 5, 5], extrapolated: [true, false, true] }));
    expect(summary.exactHorizons).toBe(2);
    expect(summary.extrapolatedHorizons).toBe(2);
    expect(summary.samplingShare).toBeNull();
    expect(summary.netChange).toBe(0);
  });
});
