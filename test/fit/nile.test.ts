import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { aicc } from '../../src/fit/model-choice.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { stasis } from '../../src/models/stasis.js';

// Nile annual flow 1871–1970 (R datasets::Nile), one horizon per year,
// t = year - 1871. Reference values as documented with the data:
// - local level model (random walk plus noise) at observation variance
//   15098.52 and level variance 1469.18 (Durbin & Koopman 2012, Time Series
//   Analysis by State Space Methods, 2nd ed., local-level example): exact
//   diffuse logL -632.5456 (R KFAS; reproduced with R). Our random walk has a
//   fixed ancestral mean; profiled out by GLS its logL is -637.6156 (numpy),
//   and logL_diffuse = logL_p + 0.5 ln(2 pi) - 0.5 ln(1' V^-1 1).
// - stasis with no sampling error: stasis_mean 919.35, stasis_variance
//   28351.5675 (ML, divisor N), logL -654.5157, AICc 1313.1552 (Holmes, Ward &
//   Scheuerell, Applied Time Series Analysis for Fisheries and Environmental
//   Sciences, Nile example; reproduced with R).
const rows = readFileSync(new URL('../fixtures/nile-annual-flow.csv', import.meta.url), 'utf8')
  .trim().split('\n').slice(1).map((line) => line.split(',').map(Number));
const time = rows.map(([year]) => year - 1871);
const flow = rows.map(([, value]) => value);

describe('Nile annual flow reference values', () => {
  it('random-walk profile logL at the published variances is -637.6156 and the diffuse identity gives -632.5456', () => {
    const lineage = lineageFromArrays({ time, mean: flow, samplingVariance: time.map(() => 15098.52) });
    const evaluator = new LikelihoodEvaluator(randomWalk, lineage);
    const details = evaluator.details([1469.18]);
    expect(details.logLik).toBeCloseTo(-637.6156, 4);
    // 1' V^-1 1 is the GLS information for the single constant column: ln det of it is logDetInformation.
    const diffuse = details.logLik + 0.5 * Math.log(2 * Math.PI) - 0.5 * details.logDetInformation;
    expect(diffuse).toBeCloseTo(-632.5456, 4);
  });

  it('stasis without sampling error: mean 919.35, variance 28351.5675, logL -654.5157, AICc 1313.1552', () => {
    const lineage = lineageFromArrays({ time, mean: flow, samplingVariance: time.map(() => 0) });
    const fit = fitModel(stasis, lineage);
    expect(fit.parameters.stasis_mean.estimate).toBeCloseTo(919.35, 8);
    expect(Math.abs((fit.parameters.stasis_variance.estimate as number) / 28351.5675 - 1)).toBeLessThan(1e-6);
    expect(fit.logLik).toBeCloseTo(-654.5157, 4);
    expect(aicc(fit.logLik, fit.k, 100)).toBeCloseTo(1313.1552, 4);
  });
});
