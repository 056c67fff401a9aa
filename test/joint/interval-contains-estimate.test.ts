import { describe, expect, it } from 'vitest';
import { fitJointModel, type JointModelFit } from '../../src/joint/fit-joint.js';
import type { JointInterval } from '../../src/joint/joint-intervals.js';
import { jointModel, type JointModel, type JointModelId } from '../../src/joint/joint-models.js';
import { simulateJoint } from '../../src/joint/simulate-joint.js';
import { createRandom } from '../../src/random/random.js';

/** One reported interval beside its estimate. */
interface Placed {
  readonly name: string;
  readonly estimate: number;
  readonly interval: JointInterval;
}

/**
 * Every reported interval of a joint fit with its estimate: the per-trait
 * arrays (means, drifts, optima, alphas), the diagonal of the covariance
 * (variances) and the off-diagonal of the step correlation. Estimates that
 * are null (an optimum at the random-walk limit) have nothing to contain.
 */
function placedIntervals(fit: JointModelFit): Placed[] {
  const placed: Placed[] = [];
  const parameters = fit.parameters!;
  const intervals = fit.intervals!;
  for (const name of ['ancestral_mean', 'drift', 'stasis_mean', 'optimum', 'alpha'] as const) {
    intervals[name]?.forEach((interval, j) => {
      const estimate = parameters[name]?.[j];
      if (typeof estimate === 'number') placed.push({ name: `${name}[${j + 1}]`, estimate, interval });
    });
  }
  for (const name of ['step_covariance', 'stasis_covariance'] as const) {
    intervals[name]?.forEach((row, j) => {
      const interval = row[j];
      if (interval) placed.push({ name: `${name}[${j + 1}][${j + 1}]`, estimate: parameters[name]![j][j], interval });
    });
  }
  intervals.step_correlation?.forEach((row, j) => row.forEach((interval, l) => {
    const estimate = parameters.step_correlation?.[j][l];
    if (interval && l > j && typeof estimate === 'number') placed.push({ name: `step_correlation[${j + 1}][${l + 1}]`, estimate, interval });
  }));
  // The stasis models' correlation, from their covariance (the estimate is not a parameter of its own).
  const stasis = parameters.stasis_covariance;
  intervals.stasis_correlation?.forEach((row, j) => row.forEach((interval, l) => {
    if (!interval || l <= j || !stasis) return;
    placed.push({ name: `stasis_correlation[${j + 1}][${l + 1}]`, estimate: stasis[j][l] / Math.sqrt(stasis[j][j] * stasis[l][l]), interval });
  }));
  return placed;
}

/** Names of the intervals that do not contain their estimate (an open end, null, reaches infinitely far). */
function misplaced(placed: readonly Placed[]): string[] {
  // A profile end is found by bracketing from the estimate outwards, so it lies beyond the estimate; the slack only absorbs the unit conversion's rounding.
  const slack = (value: number): number => 1e-9 * (Math.abs(value) + 1e-12);
  return placed
    .filter(({ estimate, interval }) => !((interval.lower ?? Number.NEGATIVE_INFINITY) - slack(estimate) <= estimate && estimate <= (interval.upper ?? Number.POSITIVE_INFINITY) + slack(estimate)))
    .map(({ name }) => name);
}

/** A seeded 2-trait group: uneven spacing, unequal sampling variances, trait 2 on a wider scale. */
function group(model: JointModel, horizons: number, seed: number) {
  const random = createRandom(seed);
  const time = [0];
  for (let i = 1; i < horizons; i++) time.push(time[i - 1] + 0.5 + random.uniform());
  const sampling = new Float64Array(horizons * 4);
  for (let i = 0; i < horizons; i++) {
    sampling[i * 4] = 0.01 + 0.01 * random.uniform();
    sampling[i * 4 + 3] = 0.04 + 0.04 * random.uniform();
  }
  // Correlation 0.5 (seed-dependent sign), variances about the sampling variances: estimates land inside, at bounds or near them.
  const sign = seed % 2 === 0 ? 1 : -1;
  const covariance = Float64Array.of(0.015, sign * 0.5 * 0.03, sign * 0.5 * 0.03, 0.06);
  const locations = model.mean === 'drift' ? [4.4, 0.05, 10, -0.1] : [4.4, 10];
  return simulateJoint(model, { traits: 2, time: Float64Array.from(time), values: new Float64Array(horizons * 2), sampling }, { locations, covariance, alpha: null }, createRandom(seed + 1000));
}

describe('placedIntervals and misplaced (the checker itself)', () => {
  it('flags an interval with an end on the wrong side of its estimate and passes one that contains it', () => {
    const fit = fitJointModel(jointModel('correlated-random-walk')!, group(jointModel('correlated-random-walk')!, 12, 2), { intervals: true });
    const placed = placedIntervals(fit);
    // Two ancestral means, two step variances and one correlation of a 2-trait correlated walk.
    expect(placed.map(({ name }) => name)).toEqual(['ancestral_mean[1]', 'ancestral_mean[2]', 'step_covariance[1][1]', 'step_covariance[2][2]', 'step_correlation[1][2]']);
    expect(misplaced(placed)).toEqual([]);
    // Deliberately broken: the correlation's upper end moved below the estimate, the first mean's lower end above it.
    const broken = placed.map((entry) => entry.name === 'step_correlation[1][2]'
      ? { ...entry, interval: { lower: entry.interval.lower, upper: entry.estimate - 0.01 } }
      : entry.name === 'ancestral_mean[1]' ? { ...entry, interval: { lower: entry.estimate + 0.01, upper: entry.interval.upper } } : entry);
    expect(misplaced(broken)).toEqual(['ancestral_mean[1]', 'step_correlation[1][2]']);
  });
});

describe('every joint interval contains its estimate (property over seeded groups)', () => {
  // A profile-likelihood interval is the set where the profile logL is within chi^2_1(0.95)/2 of its maximum, which the estimate attains: it always contains the estimate (common practice; Venzon & Moolgavkar 1988, Applied Statistics 37:87-94).
  // The cheaper models (the ou ones cost seconds per fit with intervals): 14 groups of 12-16 horizons.
  const cases: { id: JointModelId; seed: number; horizons: number }[] = [
    ...[1, 2, 3, 4].map((seed) => ({ id: 'independent-random-walks' as const, seed, horizons: 12 + seed })),
    ...[5, 6, 7].map((seed) => ({ id: 'independent-directional-walks' as const, seed, horizons: 10 + seed })),
    ...[8, 9].map((seed) => ({ id: 'independent-stasis' as const, seed, horizons: 4 + seed })),
    ...[10, 11].map((seed) => ({ id: 'correlated-stasis' as const, seed, horizons: 2 + seed })),
    ...[12, 13].map((seed) => ({ id: 'correlated-random-walk' as const, seed, horizons: seed })),
    { id: 'correlated-directional-walk', seed: 14, horizons: 14 },
  ];
  it.each(cases)('$id, seed $seed, $horizons horizons', ({ id, seed, horizons }) => {
    const model = jointModel(id)!;
    const fit = fitJointModel(model, group(model, horizons, seed), { intervals: true });
    const placed = placedIntervals(fit);
    // Every parameter has an interval: 2 locations per trait for drift models, 1 otherwise, 2 variances, and the correlation of a correlated model (walk or stasis).
    const expected = 2 * (model.mean === 'drift' ? 2 : 1) + 2 + (model.correlated ? 1 : 0);
    expect(placed).toHaveLength(expected);
    expect(misplaced(placed)).toEqual([]);
  });
});
