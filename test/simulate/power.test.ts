import { describe, expect, it } from 'vitest';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { fitLineage } from '../../src/fit/fit-lineage.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { bootstrapTests } from '../../src/simulate/bootstrap-test.js';
import { designFromOptions, designLineage, extendDesign } from '../../src/simulate/design.js';
import { firstCrossing, powerAnalysis } from '../../src/simulate/power.js';
import { createRandom } from '../../src/random/random.js';
import { poolRunner } from '../../src/simulate/run-replicates.js';
import { replicateSeed } from '../../src/random/seeds.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

// Power of a design by simulation (seeded, inline runner). Expected shapes
// are facts of testing (common practice): power rises with the effect and
// with the sample, and at effect 0 it is the test's false-positive rate.
const runner = poolRunner({ threads: 1 });
const design = designFromOptions({ horizons: 15, spacing: 0.2, count: 20, withinVariance: 0.25 });
const stepVariance = 0.0625; // per interval 0.0125 = the sampling variance of a mean
const lineage = designLineage(design);
const driftError = Math.sqrt(new LikelihoodEvaluator(directionalWalk, lineage).details([stepVariance]).coefficientCovariance[3]);
const replicates = 150;

describe('power of the design to detect drift', () => {
  const plan = { design, stepVariance, ancestralMean: 5, replicates, seed: 11, coverage: false };
  const small = powerAnalysis({ ...plan, drifts: [0, 1.5 * driftError, 4 * driftError] }, runner);
  const longer = powerAnalysis({ ...plan, design: extendDesign(design, 30), drifts: [1.5 * driftError] }, runner);

  // Binomial reasoning: over 150 replicates a rate's SE is at most 0.041.
  // The LRT rates measured with this seed are about 0.05, 0.19 and 0.72 (the
  // bootstrap critical value is about 8, not chi-square's 3.84: with few
  // horizons drift and a random walk are hard to tell apart), so each step
  // up is more than 3.5 SE of the difference; a flat or falling curve fails.
  it('rises with drift, for every decision rule', async () => {
    const { grid } = await small;
    for (const key of ['p_best', 'p_weight', 'p_lrt'] as const) {
      expect(grid[1][key]).toBeGreaterThan(grid[0][key]);
      expect(grid[2][key]).toBeGreaterThan(grid[1][key]);
    }
    expect(grid[2].p_lrt).toBeGreaterThan(0.5);
  });

  it('rises with the number of horizons (same spacing and sample sizes)', async () => {
    const [shortRun, longRun] = await Promise.all([small, longer]);
    const drift = 1.5 * driftError;
    const shortPower = shortRun.grid.find((point) => Math.abs(point.drift - drift) < 1e-12)!.p_lrt;
    const longPower = longRun.grid.find((point) => Math.abs(point.drift - drift) < 1e-12)!.p_lrt;
    // About 0.19 at 15 horizons; doubling the span more than halves the drift's standard error. SE of the difference is below 0.055.
    expect(longPower).toBeGreaterThan(shortPower + 0.08);
  });

  it('equals the false-trend rate at drift 0, and that rate is near the 5% level', async () => {
    const report = await small;
    const zero = report.grid.find((point) => point.drift === 0)!;
    expect(report.false_trend).toEqual({ p_best: zero.p_best, p_weight: zero.p_weight, p_lrt: zero.p_lrt });
    // The LRT's critical value comes from a separate null set, so its rate at drift 0 is an honest
    // estimate of its size: 0.05 with SE 0.018 over 150; 0.13 is 4.5 SE above.
    expect(zero.p_lrt).toBeLessThan(0.13);
  });

  it('interpolates the first drift reaching the target power', () => {
    expect(firstCrossing([[0, 0.05], [1, 0.5], [2, 0.9]], 0.8)).toBeCloseTo(1.75, 12);
    expect(firstCrossing([[0, 0.05], [1, 0.5]], 0.8)).toBeNull();
  });
});

describe('size of the bootstrap likelihood-ratio test', () => {
  // 400 lineages drawn from the random walk (the null: drift 0), each tested
  // by its own parametric bootstrap of 59 replicates from its fitted random
  // walk; reject when p = (1 + #{T* >= T}) / 60 <= 0.05. Binomial reasoning:
  // at a true size of 5% the rejection rate over 400 has SE 0.011, so the
  // band 2%-9% lies 2.75 SE below and 3.7 SE above it (chance failure < 0.5%),
  // while the chi-square(1) cut-off, known to be liberal for drift in a
  // random walk, would not be checked by this at all.
  it('rejects a true random walk in 2%-9% of 400 lineages at the 5% level', async () => {
    let rejected = 0;
    const tested = 400;
    for (let index = 0; index < tested; index++) {
      const data = withMeans(lineage, simulateMeans(randomWalk, lineage, { ancestral_mean: 5, step_variance: stepVariance }, createRandom(replicateSeed(77, 0, index))));
      const fit = fitLineage(data, [randomWalk, directionalWalk], { intervals: false });
      const report = await bootstrapTests(fit, 59, replicateSeed(78, 0, index), runner, undefined, { nonNested: false });
      if (report.nested!.p_bootstrap <= 0.05) rejected += 1;
    }
    expect(rejected / tested).toBeGreaterThanOrEqual(0.02);
    expect(rejected / tested).toBeLessThanOrEqual(0.09);
  });
});
