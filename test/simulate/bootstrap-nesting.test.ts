import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { nestingModels, runBootstrap } from '../../src/analyses/bootstrap-run.js';
import { runFit } from '../../src/analyses/fit-run.js';
import { InputError } from '../../src/data/errors.js';
import type { ModelFit } from '../../src/fit/fit-results.js';
import { allModels } from '../../src/models/registry.js';
import { nullGenerator, type NestingTest } from '../../src/simulate/bootstrap-test.js';
import { runCliHere } from '../support/cli-in-process.js';

// `bootstrap --models` (issue 16): each newer model against the classic model
// it nests, by a parametric-bootstrap likelihood ratio. Replicates run on the
// worker pool, which loads dist/: build first (npx tsc -p tsconfig.json).

// One invented lineage of 12 horizons (a wander, then a step up at 3.0 Myr):
// small, so that 19 replicates per test refit quickly, and long enough for
// optimum-shift's search (segments of at least 5 horizons: 3 placements).
const means = [10.0, 10.3, 10.1, 10.6, 10.4, 10.9, 12.0, 12.4, 12.1, 12.6, 12.3, 12.5];
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-bootstrap-nesting-'));
const file = join(folder, 'invented.csv');
writeFileSync(file, ['section,trait,time,n,mean,sd', ...means.map((mean, i) => `Marl Gully,width,${(0.5 * i).toFixed(1)},15,${mean.toFixed(2)},0.80`)].join('\n') + '\n');

const newer = ['accelerating-walk', 'moving-optimum', 'optimum-shift'];
const base = { replicates: '19', seed: '5', quiet: true };

type LineageEntry = Record<string, unknown> & { nested_models?: NestingTest[] };
const lineagesOf = (document: Record<string, unknown>): LineageEntry[] => document.lineages as LineageEntry[];

describe('bootstrap --models: newer models against the classic models they nest', () => {
  it('declares in each newer model the classic model it nests (MODELS.md restrictions)', () => {
    // The restrictions are those of the model definitions: r = 0 gives C_ij = sigma2 min(t_i, t_j)
    // (random walk); a fixed optimum (optimum_drift = 0) or equal optima give ou's mean and covariance.
    const declared = Object.fromEntries(allModels().filter((model) => model.nests).map((model) => [model.id, model.nests!.model]));
    expect(declared).toEqual({ 'accelerating-walk': 'random-walk', 'moving-optimum': 'ou', 'optimum-shift': 'ou' });
  });

  it('leaves the default run as it was, gives p in (0, 1] per test, equal on 1 and 2 threads, statistic = 2 ΔlogL of fit', async () => {
    const plain = lineagesOf((await runBootstrap(file, { ...base, threads: '1' })).document);
    const one = lineagesOf((await runBootstrap(file, { ...base, threads: '1', models: newer.join(',') })).document);
    const two = lineagesOf((await runBootstrap(file, { ...base, threads: '2', models: newer.join(',') })).document);

    // Default: exactly the two fixed tests, no new key (the JSON before issue 16's bootstrap part).
    expect(Object.keys(plain[0])).toEqual(['lineage', 'nested', 'non_nested', 'replicates', 'seed']);
    // Adding models changes neither fixed test (each model's logL and AICc do not depend on the set).
    expect(one[0].nested).toEqual(plain[0].nested);
    expect(one[0].non_nested).toEqual(plain[0].non_nested);

    const tests = one[0].nested_models!;
    expect(tests.map((test) => [test.full, test.reduced])).toEqual([['accelerating-walk', 'random-walk'], ['moving-optimum', 'ou'], ['optimum-shift', 'ou']]);
    // The logL of the plain fit of the same lineage (fit --models ...): the statistic is 2 (logL_full − logL_reduced), floored at 0 (an identity).
    const fitted = runFit(file, { intervals: false, models: 'random-walk,ou,' + newer.join(',') }).document as { lineages: { models: { id: string; logLik: number }[] }[] };
    const logLik = Object.fromEntries(fitted.lineages[0].models.map((model) => [model.id, model.logLik]));
    for (const test of tests) {
      expect(test.not_tested).toBeNull();
      // p = (1 + #{T* >= T}) / (R + 1) with R <= 19 usable replicates: in [1/20, 1] (Davison & Hinkley 1997, ch. 4).
      expect(test.p_bootstrap!).toBeGreaterThanOrEqual(1 / 20);
      expect(test.p_bootstrap!).toBeLessThanOrEqual(1);
      expect(test.null_distribution!.replicates).toBeGreaterThan(0);
      expect(test.statistic!).toBeCloseTo(Math.max(0, 2 * (logLik[test.full] - logLik[test.reduced])), 9);
      expect(test.p_chi_square!).toBeGreaterThan(0);
      expect(test.p_chi_square!).toBeLessThanOrEqual(1);
    }
    // Regular interior restrictions keep chi-square(1) as their asymptotic reference; the shift position,
    // which exists only under the alternative, does not (Davies 1987, Biometrika 74:33).
    expect(tests.map((test) => test.chi_square_exact)).toEqual([true, true, false]);
    // Seeds depend on (seed, stream, replicate) only, never on threads.
    expect(two[0].nested_models).toEqual(tests);
  }, 120_000);

  it('refuses a model that nests none, an unknown id and an empty list, as usage errors', async () => {
    for (const text of ['stasis', 'directional-walk', 'ou', 'no-such-model', ' , ']) {
      expect(() => nestingModels(text), text).toThrow(InputError);
    }
    expect(() => nestingModels('stasis')).toThrow(/"stasis" declares no classic model it nests/);
    await expect(runBootstrap(file, { ...base, threads: '1', models: 'random-walk' })).rejects.toMatchObject({ kind: 'usage' });
    expect(nestingModels(undefined)).toEqual([]);
    expect(nestingModels('optimum-shift, accelerating-walk,optimum-shift').map((model) => model.id)).toEqual(['optimum-shift', 'accelerating-walk']);
  });

  it('tests optimum-shift on a short lineage with --min-segment 3, drawing from the walk its ou fit at alpha = 0 equals', async () => {
    // The first 8 horizons: no shift position with segments of 5 (the default), 3 with segments of 3.
    const short = join(folder, 'short.csv');
    writeFileSync(short, ['section,trait,time,n,mean,sd', ...means.slice(0, 8).map((mean, i) => `Marl Gully,width,${(0.5 * i).toFixed(1)},15,${mean.toFixed(2)},0.80`)].join('\n') + '\n');
    const options = { ...base, threads: '1', models: 'optimum-shift' };
    const [refused] = (await runBootstrap(short, options)).results[0].report.nested_models!;
    expect(refused.not_tested).toMatch(/^optimum-shift: not fitted: 8 horizons leave no admissible shift position/);
    expect(refused.p_bootstrap).toBeNull();

    const fitted = runFit(short, { intervals: false, models: 'ou,optimum-shift', minSegment: '3' });
    const ou = fitted.fits[0].models.find((model) => model.id === 'ou')!;
    expect(ou.estimates.alpha).toBe(0); // the precondition: ou at its alpha -> 0 limit on these data
    const [test] = (await runBootstrap(short, { ...options, minSegment: '3' })).results[0].report.nested_models!;
    expect(test.generator).toBe('directional-walk');
    const optimumShift = fitted.fits[0].models.find((model) => model.id === 'optimum-shift')!;
    // Identity: 2 (logL_full − logL_reduced) of `fit --min-segment 3` on the same lineage.
    expect(test.statistic!).toBeCloseTo(Math.max(0, 2 * (optimumShift.logLik - ou.logLik)), 9);
    expect(test.p_bootstrap!).toBeGreaterThanOrEqual(1 / 20);
    expect(test.p_bootstrap!).toBeLessThanOrEqual(1);
  }, 60_000);

  it('lists the declared models in --help and exits 2 on a model that nests none, through the command line', async () => {
    const help = (await runCliHere(['bootstrap', '--help'], folder)).stdout.replace(/\s+/g, ' ');
    for (const model of allModels().filter((entry) => entry.nests)) expect(help).toContain(`${model.id} (${model.nests!.condition}: ${model.nests!.model})`);
    const refused = await runCliHere(['bootstrap', 'invented.csv', '--models', 'stasis', '--replicates', '19', '--threads', '1'], folder);
    expect(refused.status).toBe(2);
    expect(refused.stderr).toMatch(/^stratotrend: --models: model "stasis" declares no classic model it nests/);
  });

  it('draws from the directional walk an ou fitted at its alpha -> 0 limit equals (MODELS.md)', () => {
    // MODELS.md: as alpha -> 0 with (optimum − a) alpha held at c, ou's mean is a + c t and its
    // covariance sigma2 min(t_i, t_j): the directional walk with drift c. The fit reports no optimum there.
    const estimate = (value: number) => ({ estimate: value, lower: null, upper: null, atBound: null, lowerAtBound: false, upperAtBound: false });
    const atLimit = {
      id: 'ou', label: 'ou', k: 4, horizons: 12, logLik: -3, converged: true, message: null,
      parameters: {}, derived: { limit_drift: estimate(0.25) }, process: [0, 0.01],
      // The fit keeps the optimum as NaN at the limit (the JSON writes null).
      estimates: { ancestral_mean: 10, optimum: Number.NaN, alpha: 0, step_variance: 0.01 }, flags: [], intervalMethod: 'profile', evaluations: 1,
    } as ModelFit;
    expect(nullGenerator(atLimit)).toEqual({ model: 'directional-walk', parameters: { ancestral_mean: 10, drift: 0.25, step_variance: 0.01 } });
    // Away from the limit the fitted model itself is the generator.
    const inside = { ...atLimit, estimates: { ancestral_mean: 10, optimum: 12, alpha: 0.5, step_variance: 0.01 }, derived: {} } as ModelFit;
    expect(nullGenerator(inside)).toEqual({ model: 'ou', parameters: { ancestral_mean: 10, optimum: 12, alpha: 0.5, step_variance: 0.01 } });
  });
});
