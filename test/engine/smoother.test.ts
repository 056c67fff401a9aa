import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { smoothLineage } from '../../src/engine/smoother.js';
import { allocateStateSpace } from '../../src/engine/state-space.js';
import { smoothUnder } from '../../src/fit/fit-lineage.js';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import type { Lineage } from '../../src/lineage.js';
import type { EvolutionModel } from '../../src/models/model.js';
import { classicModels, extendedModels } from '../../src/models/registry.js';
import { createRandom, type RandomSource } from '../../src/random/random.js';
import { randomTestLineage } from '../support/random-lineage.js';

// RTS smoother against the dense conditional distribution.
//
// Reference: with the latent mean z = mu + u, u ~ N(0, S) and the observed
// means x = z + eps, eps ~ N(0, diag e), the Gaussian conditioning formulas
// (closed form; e.g. Rauch, Tung & Striebel 1965, whose fixed-interval
// smoother computes exactly these moments for a linear-Gaussian state space)
// give
//   E[z | x]   = mu + S V^-1 (x - mu),       V = S + diag(e),
//   Var[z | x] = diag(S - S V^-1 S).
// mu and S are each model's dense `meanCovariance`, written straight from the
// MODELS.md table (not from `fillSpace`); V^-1 is applied by ml-matrix's
// `solve` (LU), a general-purpose library. The smoother under test runs on
// the model's O(N) state-space form.

interface DenseConditional {
  readonly mean: number[];
  readonly variance: number[];
}

function denseConditional(mu: ArrayLike<number>, latent: readonly (readonly number[])[], samplingVariance: ArrayLike<number>, data: ArrayLike<number>): DenseConditional {
  const size = data.length;
  const s = new Matrix(latent.map((row) => [...row]));
  const v = s.clone();
  for (let i = 0; i < size; i++) v.set(i, i, v.get(i, i) + samplingVariance[i]);
  const residual = Matrix.columnVector(Array.from({ length: size }, (_, i) => data[i] - mu[i]));
  const weights = solve(v, residual); // V^-1 (x - mu)
  const shift = s.mmul(weights);
  const vInverseS = solve(v, s); // V^-1 S
  const reduction = s.mmul(vInverseS);
  return {
    mean: Array.from({ length: size }, (_, i) => mu[i] + shift.get(i, 0)),
    variance: Array.from({ length: size }, (_, i) => s.get(i, i) - reduction.get(i, i)),
  };
}

/** Random natural parameters of any registered model (variances sometimes 0; shift positions at least two horizons apart). */
function randomParameters(model: EvolutionModel, lineage: Lineage, random: RandomSource): Record<string, number> {
  const parameters: Record<string, number> = {};
  const time = lineage.time;
  const span = time[time.length - 1];
  for (const spec of model.parameters) {
    if (spec.role === 'location') parameters[spec.name] = spec.unit.time === -1 ? random.normal() : 10 + 2 * random.normal();
    else if (spec.name === 'alpha') parameters[spec.name] = 10 ** (-3 + 4 * random.uniform()) / span;
    else parameters[spec.name] = random.uniform() < 0.15 ? 0 : 10 ** (-4 + 4 * random.uniform());
  }
  const shiftCount = model.id.startsWith('punctuated-2') ? 2 : model.configurations ? 1 : 0;
  const size = time.length;
  let earliest = 2;
  for (let k = 0; k < shiftCount; k++) {
    const latest = size - 2 * (shiftCount - k);
    const shift = earliest + Math.floor(random.uniform() * (latest - earliest + 1));
    parameters[`shift_${k + 1}_time`] = time[shift];
    parameters[`shift_${k + 1}_previous_time`] = time[shift - 1];
    earliest = shift + 2;
  }
  return parameters;
}

describe('RTS smoother against the dense conditional mean and variance (ml-matrix)', () => {
  const random = createRandom(23);
  const designs = Array.from({ length: 8 }, (_, design) => randomTestLineage(random, design, 22));

  for (const model of extendedModels) {
    it(`${model.id}: smoothed mean and variance equal the dense conditional moments to 1e-9`, () => {
      let checked = 0;
      for (const lineage of designs) {
        if (lineage.mean.length < model.minimumHorizons) continue;
        for (let draw = 0; draw < 2; draw++) {
          const parameters = randomParameters(model, lineage, random);
          const { mean: mu, covariance } = model.meanCovariance(lineage, parameters);
          const space = allocateStateSpace(lineage.mean.length, model.width(lineage), lineage.samplingVariance);
          model.fillSpace(lineage, model.processFrom(parameters, lineage), space);
          const smoothed = smoothLineage(space, Float64Array.from(mu), lineage.mean);
          const dense = denseConditional(mu, covariance, lineage.samplingVariance, lineage.mean);
          for (let i = 0; i < lineage.mean.length; i++) {
            const scale = Math.max(1, Math.abs(dense.mean[i]));
            expect(Math.abs(smoothed.smoothedMean[i] - dense.mean[i]) / scale).toBeLessThan(1e-9);
            // Variance: absolute against the prior variance S_ii (the conditional one is below it).
            const prior = Math.max(covariance[i][i], 1e-12);
            expect(Math.abs(smoothed.smoothedVariance[i] - Math.max(0, dense.variance[i]))).toBeLessThan(1e-9 * Math.max(1, prior));
          }
          checked += 1;
        }
      }
      expect(checked).toBeGreaterThanOrEqual(12);
    });
  }

  // smoothUnder (what fit.json's smoothed band comes from) plugs the GLS
  // location coefficients at the process values into the same smoother: its
  // mean and standard error equal the dense conditional moments at
  // mu = X beta_hat, beta_hat being the GLS coefficients the evaluator reports.
  for (const model of classicModels) {
    it(`${model.id}: smoothUnder equals the dense conditional moments at the GLS location`, () => {
      const lineage = designs[1];
      const parameters = randomParameters(model, lineage, random);
      const process = model.processFrom(parameters, lineage);
      const details = new LikelihoodEvaluator(model, lineage).details(process);
      const atGls = model.toParameters(details.coefficients, process, lineage);
      const { mean: mu, covariance } = model.meanCovariance(lineage, atGls);
      const dense = denseConditional(mu, covariance, lineage.samplingVariance, lineage.mean);
      const smoothed = smoothUnder(model, { process }, lineage);
      for (let i = 0; i < lineage.mean.length; i++) {
        expect(Math.abs(smoothed.mean[i] - dense.mean[i]) / Math.max(1, Math.abs(dense.mean[i]))).toBeLessThan(1e-8);
        expect(Math.abs(smoothed.standardError[i] ** 2 - Math.max(0, dense.variance[i]))).toBeLessThan(1e-9 * Math.max(1, covariance[i][i]));
      }
    });
  }
});
