/**
 * Degenerate but legal data and the invariances every fit must respect, run
 * through runFit (what `stratotrend fit` calls).
 *
 * Invariances (closed forms of the models in MODELS.md, common practice for
 * location-scale families): the likelihood of every model depends on the
 * data only through the sorted horizons, is unchanged by adding a constant c
 * to the trait (location parameters move by c, the rest stay), and is
 * unchanged by measuring time in units k times smaller (rates per unit time
 * — step_variance, drift, alpha — divide by k; half-life multiplies by k).
 * Each holds here to 1e-8 relative.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { runFit, type FitCommandOptions } from '../../src/analyses/fit-run.js';
import { lineageTable } from '../../src/render/text-table.js';
import { modelsCsv } from '../../src/render/models-csv.js';
import { nonFinitePaths, nonFiniteText } from './finite.js';
import { createRandom } from '../../src/random/random.js';
import { sweepSize } from '../support/sweep.js';

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-numbers-'));
let counter = 0;

const ages = [9.8, 9.35, 9.1, 8.6, 8.25, 7.9, 7.2, 6.85];
const means = [14.2, 14.65, 14.4, 15.1, 15.55, 15.3, 16.05, 16.4];
const sds = [1.1, 1.3, 0.9, 1.2, 1.0, 1.15, 1.25, 1.05];
const counts = [12, 15, 11, 14, 10, 13, 16, 12];

function write(rows: ReadonlyArray<readonly (string | number)[]>, header = 'age,n,mean,sd'): string {
  const path = join(folder, `numbers-${counter++}.csv`);
  writeFileSync(path, `${header}\n${rows.map((row) => row.join(',')).join('\n')}\n`);
  return path;
}

function table(transform: { age?: (a: number) => number; mean?: (m: number) => number; sd?: (s: number) => number } = {}, order = ages.map((_, i) => i)) {
  return order.map((i) => [
    (transform.age ?? ((a) => a))(ages[i]),
    counts[i],
    (transform.mean ?? ((m) => m))(means[i]),
    (transform.sd ?? ((s) => s))(sds[i]),
  ]);
}

type ModelDoc = {
  id: string;
  logLik: number | null;
  aicc: number | null;
  weight: number | null;
  converged: boolean;
  not_compared_reason: string | null;
  params: Record<string, { estimate: number | null; lower: number | null; upper: number | null }>;
  derived: Record<string, { estimate: number | null; lower: number | null; upper: number | null }>;
};
type LineageDoc = { models: ModelDoc[]; best_model: string | null };

function fitDocument(path: string, options: FitCommandOptions = {}): LineageDoc[] {
  const run = runFit(path, { models: 'classic', ...options });
  expect(nonFinitePaths(run.document)).toEqual([]);
  expect(run.fits.map(lineageTable).join('\n')).not.toMatch(nonFiniteText);
  expect(modelsCsv(run.fits)).not.toMatch(nonFiniteText);
  return (run.document as { lineages: LineageDoc[] }).lineages;
}

/** |a - b| <= 1e-8 max(|a|, |b|), or both null; a small absolute floor for values that are 0 in exact arithmetic. */
function expectClose(actual: number | null, expected: number | null, label: string, floor = 1e-12): void {
  if (expected === null || actual === null) {
    expect(actual, label).toBe(expected);
    return;
  }
  const scale = Math.max(Math.abs(actual), Math.abs(expected));
  expect(Math.abs(actual - expected), `${label}: ${actual} vs ${expected}`).toBeLessThanOrEqual(1e-8 * scale + floor);
}

/** Location parameters move by the constant added to the trait (the means of every model and segment, the optimum). */
const isLocation = (name: string): boolean => /(^|_)mean$/.test(name) || /^optimum(_before|_after)?$/.test(name);
/** Power of the time unit in each parameter: rates per unit time (-1), the limit's acceleration (-2), times and half-lives (+1); by name, segment prefixes included. */
const timePower = (name: string): number =>
  /(step_variance|drift|alpha|rate_change|limit_drift_before|limit_drift_after)$/.test(name) ? -1 : name === 'limit_acceleration' ? -2 : /(half_life|_time)$/.test(name) ? 1 : 0;

/** Compare two fits model by model, with per-parameter maps (shift for locations, scale for rates). */
function expectSameFit(
  actual: LineageDoc[],
  expected: LineageDoc[],
  map: { shift?: number; timeFactor?: number } = {},
): void {
  expect(actual.length).toBe(expected.length);
  actual.forEach((lineage, l) => {
    expect(lineage.best_model).toBe(expected[l].best_model);
    lineage.models.forEach((model, m) => {
      const reference = expected[l].models[m];
      expect(model.id).toBe(reference.id);
      expect(model.converged).toBe(reference.converged);
      expectClose(model.logLik, reference.logLik, `${model.id} logLik`);
      expectClose(model.aicc, reference.aicc, `${model.id} aicc`);
      expectClose(model.weight, reference.weight, `${model.id} weight`, 1e-10);
      for (const group of ['params', 'derived'] as const) {
        for (const [name, estimate] of Object.entries(reference[group])) {
          const got = model[group][name];
          const transform = (value: number | null): number | null => {
            if (value === null) return null;
            if (isLocation(name)) return value + (map.shift ?? 0);
            return value * (map.timeFactor ?? 1) ** -timePower(name);
          };
          for (const end of ['estimate', 'lower', 'upper'] as const) {
            expectClose(got[end], transform(estimate[end]), `${model.id} ${name} ${end}`, 1e-9);
          }
        }
      }
    });
  });
}

describe('invariances (1e-8 relative)', () => {
  const reference = fitDocument(write(table()));

  it('row order does not matter', () => {
    expectSameFit(fitDocument(write(table({}, [5, 2, 7, 0, 3, 6, 1, 4]))), reference);
  });

  it.each([1000, 1e5, -37.25])('adding %d to the trait moves the location parameters only', (shift) => {
    // The shifted data differ from the originals by rounding (ulp of 1e5 ~ 1.5e-11), so this also
    // checks that the variances and alpha are located to better than a value-only search can do
    // (sqrt(machine epsilon)); the finite-difference Newton polish of search.ts / polish.ts does it.
    expectSameFit(fitDocument(write(table({ mean: (m) => m + shift }))), reference, { shift });
  });

  it('both hold for every extended model on a longer lineage, at the default intervals (and at profile intervals in the whole sweep)', () => {
    // 24 horizons, a trend, a step and some wander, so that the shift models' variances are interior.
    const size = 24;
    const rows = Array.from({ length: size }, (_, i) => [
      20 - i * 0.5,
      10 + (i % 4),
      5 + 0.08 * i + (i >= 12 ? 0.9 : 0) + 0.3 * Math.sin(i * 1.7),
      0.6 + 0.05 * (i % 3),
    ]);
    const shifted = rows.map(([age, n, mean, sd]) => [age, n, mean + 1000, sd]);
    const thousandths = rows.map(([age, n, mean, sd]) => [Math.round(age * 1000), n, mean, sd]);
    // npm test: the default method (issue 22); the whole sweep (npm run bench) adds profile intervals, which the seeded
    // "extended models" case below also checks on every extended model in npm test.
    for (const intervals of sweepSize(['integrated', 'profile'] as const, ['integrated'] as const)) {
      const options: FitCommandOptions = { models: 'extended', intervals };
      const original = fitDocument(write(rows), options);
      expectSameFit(fitDocument(write(shifted), options), original, { shift: 1000 });
      expectSameFit(fitDocument(write(thousandths), { ...options, timeUnit: 'ka' }), original, { timeFactor: 1 / 1000 });
    }
  });

  it('time in units 1000 times smaller scales every rate by 1000 (Ma with Myr → ka with kyr)', () => {
    const shifted = fitDocument(write(table({ age: (a) => Math.round(a * 1000) })), { timeUnit: 'ka' });
    // A rate per Myr is 1000 times a rate per kyr: value_kyr = value_Myr / 1000 for per-time parameters.
    expectSameFit(shifted, reference, { timeFactor: 1 / 1000 });
  });
});

describe('invariances on seeded random lineages (1e-8 relative, every interval method)', () => {
  // Four kinds of lineage (stasis, random walk, trend, approach to an optimum), 10-39 horizons,
  // uneven spacing, sample sizes and spreads drawn from a seeded generator: each fitted as given,
  // with 1000 added to the trait, with time in units 2.5 times smaller, and in reverse row order.
  const lineageRows = (seed: number): number[][] => {
    const random = createRandom(seed);
    const kind = seed % 4;
    const size = 10 + Math.floor(random.uniform() * 30);
    let value = 10;
    let age = 20;
    const rows: number[][] = [];
    for (let i = 0; i < size; i++) {
      age -= 0.1 + random.uniform() * 0.5;
      value += kind === 0 ? 0 : kind === 1 ? 0.3 * random.normal() : kind === 2 ? 0.1 + 0.2 * random.normal() : 0.3 * (12 - value) + 0.2 * random.normal();
      const n = 5 + Math.floor(random.uniform() * 20);
      const sd = 0.5 + random.uniform();
      const mean = (kind === 0 ? 10 + 0.2 * random.normal() : value) + (sd / Math.sqrt(n)) * random.normal();
      rows.push([Number(age.toFixed(3)), n, Number(mean.toFixed(4)), Number(sd.toFixed(3))]);
    }
    return rows;
  };
  // The whole sweep (every seed) runs with STRATOTREND_SWEEP=full, which `npm run bench` sets
  // (bench/run.ts, "sweep"); `npm test` runs the seeded sample: every method, and every kind of
  // lineage (seed % 4) at least once.
  const methods: Array<[string, number[], number[], FitCommandOptions]> = [
    ['integrated (the default)', [1, 2, 3, 4, 5, 6, 7, 8], [3, 4], {}],
    ['profile', [9, 10, 11, 12], [9], { intervals: 'profile' }],
    ['adjusted', [13, 14, 15, 16], [14], { intervals: 'adjusted' }],
    ['bootstrap', [17, 18], [18], { intervals: 'bootstrap' }],
    ['extended models', [19, 22], [22], { models: 'extended', intervals: 'profile' }],
  ];
  it.each(methods)('%s', (_, allSeeds, sampleSeeds, options) => {
    for (const seed of sweepSize(allSeeds, sampleSeeds)) {
      const rows = lineageRows(seed);
      const original = fitDocument(write(rows), options);
      expectSameFit(fitDocument(write(rows.map(([age, n, mean, sd]) => [age, n, mean + 1000, sd])), options), original, { shift: 1000 });
      expectSameFit(fitDocument(write(rows.map(([age, n, mean, sd]) => [age * 2.5, n, mean, sd])), { ...options, timeUnit: 'u' }), original, { timeFactor: 1 / 2.5 });
      expectSameFit(fitDocument(write([...rows].reverse()), options), original);
    }
  });
});

describe('degenerate but legal data: finite results or one clear message', () => {
  const cases: Array<[string, ReadonlyArray<readonly (string | number)[]>, FitCommandOptions]> = [
    ['all means identical', table({ mean: () => 5 }), {}],
    ['zero within-horizon variance everywhere, means differ', table({ sd: () => 0 }), {}],
    ['a single enormous outlier', table({ mean: (m) => (m === means[4] ? 1e9 : m) }), {}],
    ['trait scale 1e-6', table({ mean: (m) => m * 1e-6, sd: (s) => s * 1e-6 }), {}],
    ['trait scale 1e6', table({ mean: (m) => m * 1e6, sd: (s) => s * 1e6 }), {}],
    ['ages in years', table({ age: (a) => a * 1e6 }), { timeUnit: 'yr' }],
    ['ages in Ma', table(), { timeUnit: 'Ma' }],
    ['very unequal spacing', table({ age: (a) => [100, 99.9999, 99.9998, 50, 10, 9.9999, 1, 0.0001][ages.indexOf(a)] }), {}],
    ['horizons a millionth of a Myr apart', table({ age: (a) => 5 + ages.indexOf(a) * 1e-6 }), {}],
    ['natural log of the trait', table(), { log: true }],
    ['pooled variance', table(), { pool: true }],
  ];

  it.each(cases)('%s', (_, rows, options) => {
    const lineages = fitDocument(write(rows), { ...options, intervals: false });
    for (const lineage of lineages) {
      expect(lineage.models.length).toBe(5);
      for (const model of lineage.models) {
        if (model.converged) expect(model.logLik).not.toBeNull();
        else expect(model.not_compared_reason).toMatch(/\S/);
      }
    }
  });

  it('ages in years read as Ma (the default unit) raise a time-axis warning naming --time-unit yr', () => {
    // A span beyond 100 Myr for one lineage (common practice, a generous bound; README) means the unit is wrong.
    const path = write(table({ age: (a) => a * 1e6 }));
    const asMa = runFit(path, { intervals: false });
    expect(asMa.warnings.list().filter((warning) => warning.category === 'time-axis').map((warning) => warning.message)).toEqual([
      'lineage: the horizons span 2950000 Myr, more than the 100 Myr plausible for one lineage; if the age values are in yr, give --time-unit yr (rates are per Myr)',
    ]);
    expect(runFit(path, { intervals: false, timeUnit: 'yr' }).warnings.has('time-axis')).toBe(false);
  });

  it('ages in ka read as Ma (1000 times too long, issue 19) raise the warning naming --time-unit ka', () => {
    const path = write(table({ age: (a) => a * 1e3 }));
    expect(runFit(path, { intervals: false }).warnings.list().filter((warning) => warning.category === 'time-axis').map((warning) => warning.message)).toEqual([
      'lineage: the horizons span 2950 Myr, more than the 100 Myr plausible for one lineage; if the age values are in kyr, give --time-unit ka (rates are per Myr)',
    ]);
    expect(runFit(path, { intervals: false, timeUnit: 'ka' }).warnings.has('time-axis')).toBe(false);
  });

  it('a model that cannot be fitted is reported as such without hiding the others', () => {
    const [lineage] = fitDocument(write(table({ sd: () => 0 })), { intervals: false });
    const stasis = lineage.models.find((model) => model.id === 'stasis');
    expect(stasis?.converged).toBe(true);
    expect(lineage.best_model).toBe('stasis');
    const others = lineage.models.filter((model) => model.id !== 'stasis');
    expect(others.length).toBe(4);
    for (const model of others) {
      expect(model.converged).toBe(false);
      expect(model.weight).toBeNull();
      expect(model.not_compared_reason).toMatch(/not fitted/);
    }
  });

  it('stasis on zero-variance horizons equals the closed-form normal fit (ML variance with divisor N)', () => {
    // Closed form (common practice): iid normal sample, mean = average, variance = sum of squared deviations / N.
    const [lineage] = fitDocument(write(table({ sd: () => 0 })), { intervals: false });
    const stasis = lineage.models.find((model) => model.id === 'stasis') as ModelDoc;
    const average = means.reduce((sum, m) => sum + m, 0) / means.length;
    const variance = means.reduce((sum, m) => sum + (m - average) ** 2, 0) / means.length;
    expectClose(stasis.params.stasis_mean.estimate, average, 'stasis_mean');
    expectClose(stasis.params.stasis_variance.estimate, variance, 'stasis_variance');
    const logLik = -0.5 * means.length * (Math.log(2 * Math.PI * variance) + 1);
    expectClose(stasis.logLik, logLik, 'logLik', 1e-9);
  });

  const refusals: Array<[string, ReadonlyArray<readonly (string | number)[]>, RegExp]> = [
    ['one zero-variance horizon among positive ones', table({ sd: (s) => (s === sds[3] ? 0 : s) }), /the horizon at age 8\.6 has zero within-horizon variance .*Use --pool/],
    ['identical means with zero variance everywhere', table({ mean: () => 5, sd: () => 0 }), /every horizon has the same mean \(5\) and zero within-horizon variance/],
  ];

  it.each(refusals)('%s is refused with a message', (_, rows, message) => {
    expect(() => runFit(write(rows), { intervals: false })).toThrow(InputError);
    expect(() => runFit(write(rows), { intervals: false })).toThrow(message);
  });
});
