import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { classicModels } from '../../src/models/registry.js';

// Independent reference: maximum-likelihood fits of the five models made with
// numpy/scipy on the dense multivariate-normal likelihood (many starts,
// limits evaluated explicitly) by test/fixtures/reference/make_dense_fits.py;
// output in dense-fits.json (numpy/scipy versions recorded in the file).
interface ReferenceCase {
  name: string;
  time: number[];
  mean: number[];
  sampling_variance: number[];
  fits: Record<string, { logLik: number; k: number; params: Record<string, number>; at_limit: string | null }>;
  points: Record<string, { params: Record<string, number>; logLik: number }[]>;
  profile_intervals: Record<string, Record<string, { lower: number; upper: number; lower_at_bound: boolean; upper_at_bound: boolean }>>;
}
const reference = JSON.parse(readFileSync(new URL('../fixtures/reference/dense-fits.json', import.meta.url), 'utf8')) as { cases: ReferenceCase[] };

describe('fits against the independent numpy/scipy dense reference', () => {
  for (const item of reference.cases) {
    const lineage = lineageFromArrays({ time: item.time, mean: item.mean, samplingVariance: item.sampling_variance });
    describe(item.name, () => {
      for (const model of classicModels) {
        const expected = item.fits[model.id];
        if (!expected) continue;
        const fit = fitModel(model, lineage);
        it(`${model.id}: maximum logL within 0.01 of the reference, and no worse than it by more than 1e-6 relative`, () => {
          expect(Math.abs(fit.logLik - expected.logLik)).toBeLessThan(0.01);
          expect(fit.logLik).toBeGreaterThan(expected.logLik - 1e-6 * Math.max(1, Math.abs(expected.logLik)));
          expect(fit.k).toBe(expected.k);
        });
        it(`${model.id}: logL at the reported estimates reproduces the reported maximum`, () => {
          const finite = Object.fromEntries(Object.entries(fit.estimates).filter(([, value]) => Number.isFinite(value)));
          if (Object.keys(finite).length !== model.parameters.length) return; // a limit with a non-finite optimum
          const evaluator = new LikelihoodEvaluator(model, lineage);
          expect(Math.abs(evaluator.atParameters(finite) - fit.logLik)).toBeLessThan(1e-6);
        });
        it(`${model.id}: logL at fixed parameter points equals numpy's dense value to 1e-9 relative`, () => {
          const evaluator = new LikelihoodEvaluator(model, lineage);
          for (const point of item.points[model.id] ?? []) {
            const value = evaluator.atParameters(point.params);
            expect(Math.abs(value - point.logLik) / Math.max(1, Math.abs(point.logLik))).toBeLessThan(1e-9);
          }
        });
        const intervals = item.profile_intervals?.[model.id];
        if (intervals) {
          it(`${model.id}: 95% profile-likelihood intervals agree with the reference's`, () => {
            for (const [name, ends] of Object.entries(intervals)) {
              const ours = fit.parameters[name];
              const scale = Math.max(Math.abs(ends.upper - ends.lower), 1e-12);
              if (ends.lower_at_bound) expect(ours.lowerAtBound, `${name} lower at bound`).toBe(true);
              else expect(Math.abs((ours.lower as number) - ends.lower) / scale, `${name} lower`).toBeLessThan(2e-3);
              if (ends.upper_at_bound) expect(ours.upperAtBound, `${name} upper at bound`).toBe(true);
              else expect(Math.abs((ours.upper as number) - ends.upper) / scale, `${name} upper`).toBeLessThan(2e-3);
            }
          });
        }
      }
    });
  }
});
