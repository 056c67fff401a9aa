import { describe, expect, it } from 'vitest';
import type { ModelFit } from '../../src/fit/fit-model.js';
import { darwins, haldanes, lineageRates, pooledPair, rateCaution } from '../../src/fit/rates.js';
import { lineageFromArrays, timeUnit } from '../../src/lineage.js';

const fitWith = (id: string, parameters: Record<string, number>): ModelFit => ({
  id, label: id, k: 3, horizons: 3, logLik: 0, converged: true, message: null,
  parameters: Object.fromEntries(Object.entries(parameters).map(([name, estimate]) => [name, { estimate, lower: null, upper: null, atBound: null, lowerAtBound: false, upperAtBound: false }])),
  derived: {}, process: [], estimates: parameters, flags: [], intervalMethod: 'profile', evaluations: 0,
});

describe('rates', () => {
  it('darwins: 10 -> 12 over 2 Myr is ln(1.2) / 2 = 0.0912 darwins (Haldane 1949; worked example of the project reference notes)', () => {
    expect(darwins(Math.log(12 / 10), 2)).toBeCloseTo(0.0912, 4);
    // ln(1.2) = 0.1823215567939546 (closed form), so 0.0911607783969773.
    expect(darwins(Math.log(1.2), 2)).toBeCloseTo(0.0911607783969773, 15);
  });

  it('haldanes by hand (Gingerich 1993): ln change 0.18232 over a pooled sd of ln trait 0.1 and 2e6 generations', () => {
    // (ln 12 - ln 10) / 0.1 = 1.823215567939546 sd; over 2 Myr at 1 year per generation: / 2e6.
    expect(haldanes(Math.log(1.2), 0.1, 2e6)).toBeCloseTo(9.11607783969773e-7, 20);
    // Pooled variance of two samples: ((n1-1) v1 + (n2-1) v2) / (n1 + n2 - 2): (9 * 1 + 19 * 4) / 28 = 85 / 28.
    expect(pooledPair(10, 1, 20, 4)).toBeCloseTo(85 / 28, 14);
  });

  it('interval and whole-sequence rates of a lineage, from untransformed means (delta-method sd of ln trait)', () => {
    // Means 10, 12, 11 at 0, 2, 3 Myr; sd 1, 1.2, 1.1 so sd of ln trait is 0.1 at every horizon (delta method: sd / mean).
    const lineage = lineageFromArrays({
      time: [0, 2, 3], mean: [10, 12, 11], count: [20, 20, 20],
      samplingVariance: [1 / 20, 1.44 / 20, 1.21 / 20], timeUnit: timeUnit('Ma'),
    });
    const rates = lineageRates(lineage, [], 1);
    expect(rates.intervals[0].darwins).toBeCloseTo(Math.log(1.2) / 2, 12);
    expect(rates.intervals[0].haldanes).toBeCloseTo(Math.log(1.2) / 0.1 / 2e6, 18);
    expect(rates.intervals[1].darwins).toBeCloseTo(Math.log(11 / 12) / 1, 12);
    expect(rates.whole.darwins).toBeCloseTo(Math.log(1.1) / 3, 12);
    expect(rates.whole.generations).toBe(3e6);
    expect(rates.caution).toBe(rateCaution);
    expect(rates.caution).toMatch(/depend on the interval/);
  });

  it('the same rates in kyr: 2000 kyr is 2 Myr', () => {
    const lineage = lineageFromArrays({ time: [0, 2000], mean: [10, 12], count: [5, 5], samplingVariance: [0.2, 0.288], timeUnit: timeUnit('ka') });
    expect(lineageRates(lineage, [], null).whole.darwins).toBeCloseTo(Math.log(1.2) / 2, 12);
    expect(lineageRates(lineage, [], null).whole.haldanes).toBeNull();
  });

  it('model-based rates: drift in darwins and haldanes, step variance as Lynch Delta against the neutral range', () => {
    // Logged trait in Myr, pooled within variance 0.01 (sd 0.1), generation time 2 years.
    const base = lineageFromArrays({ time: [0, 1, 2], mean: [2, 2.1, 2.2], count: [11, 11, 11], samplingVariance: [0.01 / 11, 0.01 / 11, 0.01 / 11], timeUnit: timeUnit('Myr') });
    const lineage = { ...base, logTransformed: true };
    const rates = lineageRates(lineage, [fitWith('directional-walk', { ancestral_mean: 2, drift: 0.05, step_variance: 1e-3 })], 2);
    const drift = rates.model.find((rate) => rate.parameter === 'drift')!;
    expect(drift.perMillionYears).toBeCloseTo(0.05, 14); // darwins = ln units per Myr
    expect(drift.perGeneration).toBeCloseTo((0.05 * 2e-6) / 0.1, 18); // haldanes: per generation / sd
    const step = rates.model.find((rate) => rate.parameter === 'step_variance')!;
    // Delta = 1e-3 per Myr * 2e-6 Myr per generation / 0.01 = 2e-7 per generation: far below 2e-4.
    expect(step.perGeneration).toBeCloseTo(2e-7, 20);
    expect(step.neutral).toBe('below');
    const fast = lineageRates(lineage, [fitWith('random-walk', { ancestral_mean: 2, step_variance: 1e3 })], 2).model[0];
    expect(fast.perGeneration).toBeCloseTo(0.2, 12);
    expect(fast.neutral).toBe('above');
  });

  it('says why rates are missing: non-positive means, unknown time unit', () => {
    const lineage = lineageFromArrays({ time: [0, 1], mean: [-1, 2], samplingVariance: [0.1, 0.1], timeUnit: timeUnit('m') });
    const rates = lineageRates(lineage, [], 1);
    expect(rates.whole.darwins).toBeNull();
    expect(rates.notes.join(' ')).toMatch(/not positive/);
    expect(rates.notes.join(' ')).toMatch(/no known length in years/);
  });
});
