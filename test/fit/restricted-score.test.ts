import { Matrix, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import { restrictedLogLik } from '../../src/fit/intervals.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { findModel } from '../../src/models/registry.js';
import { approachingLineage } from '../support/random-lineage.js';

// LikelihoodEvaluator.restrictedScore: the gradient of the restricted (REML-type) log-likelihood (ou, the walks, stasis
// and the two covariate models)
// profile - 0.5 ln det(X' V^-1 X) in the process values, checked two independent ways.
//
// 1. Central finite differences of restrictedLogLik itself, (f(x + h) - f(x - h)) / 2h, truncation
//    h^2 f'''/6 (Abramowitz & Stegun 1964, 25.3.21; from memory); h = 1e-5 relative.
// 2. The dense closed form from the model's dense covariance (its `meanCovariance`, MODELS.md): the
//    profile part -1/2 tr(V^-1 dV) + 1/2 r' V^-1 dV V^-1 r + r' V^-1 dX beta at the GLS beta (as in
//    test/engine/kalman-score.test.ts), minus half of
//      d ln det(X' V^-1 X) = tr(A^-1 (-X' V^-1 dV V^-1 X + dX' V^-1 X + X' V^-1 dX)),  A = X' V^-1 X
//    (Harville 1977, J. Amer. Statist. Assoc. 72:320-340, the derivatives of the REML log-likelihood;
//    from memory; the derivative of ln det and of an inverse are common practice), with dV by central
//    differences of the dense covariance in the parameter (step 1e-6 relative; the covariance is smooth in it)
//    and X, dX from MODELS.md's designs, all inverted by ml-matrix.

/** The designs of MODELS.md (ou in the basis exp(-alpha t), (1 - exp(-alpha t)) / alpha) and their derivatives per process axis. */
const designs: Record<string, (process: number[], t: number, i: number) => { row: number[]; slopes: number[][] }> = {
  ou: ([alpha], t) => ({
    row: [Math.exp(-alpha * t), (1 - Math.exp(-alpha * t)) / alpha],
    slopes: [[-t * Math.exp(-alpha * t), (t * Math.exp(-alpha * t)) / alpha - (1 - Math.exp(-alpha * t)) / (alpha * alpha)], [0, 0]],
  }),
  'random-walk': () => ({ row: [1], slopes: [[0]] }),
  'directional-walk': (_process, t) => ({ row: [1, t], slopes: [[0, 0]] }),
  stasis: () => ({ row: [1], slopes: [[0]] }),
  // The covariate variants (issue 5's definitions: stasis or the random walk about intercept + slope × covariate,
  // the walk's covariate measured from its first horizon; see test/engine/kalman-score.test.ts).
  'covariate-stasis': (_process, _t, i) => ({ row: [1, covariate[i]], slopes: [[0, 0]] }),
  'covariate-walk': (_process, _t, i) => ({ row: [1, covariate[i] - covariate[0]], slopes: [[0, 0]] }),
};

/** The covariate of the covariate models' cases (as in test/engine/kalman-score.test.ts). */
const covariate = Float64Array.from({ length: 18 }, (_, i) => Math.sin(i) + 0.1 * i);

/** Natural parameters for the model's dense covariance at these process values (locations do not enter it). */
const parametersOf: Record<string, (process: number[]) => Record<string, number>> = {
  ou: ([alpha, stepVariance]) => ({ ancestral_mean: 0, optimum: 0, alpha, step_variance: stepVariance }),
  'random-walk': ([stepVariance]) => ({ ancestral_mean: 0, step_variance: stepVariance }),
  'directional-walk': ([stepVariance]) => ({ ancestral_mean: 0, drift: 0, step_variance: stepVariance }),
  stasis: ([variance]) => ({ stasis_mean: 0, stasis_variance: variance }),
  'covariate-stasis': ([variance]) => ({ covariate_intercept: 0, covariate_slope: 0, stasis_variance: variance }),
  'covariate-walk': ([stepVariance]) => ({ ancestral_mean: 0, covariate_slope: 0, step_variance: stepVariance }),
};

function denseRestrictedGradient(id: string, lineage: Lineage, process: number[]): number[] {
  const model = findModel(id)!;
  const n = lineage.time.length;
  const covarianceAt = (values: number[]): Matrix => {
    const { covariance } = model.meanCovariance(lineage, parametersOf[id](values));
    return new Matrix(covariance.map((row) => Array.from(row)));
  };
  const V = covarianceAt(process);
  for (let i = 0; i < n; i++) V.set(i, i, V.get(i, i) + lineage.samplingVariance[i]);
  const rows = Array.from(lineage.time, (t, i) => designs[id](process, t, i));
  const X = new Matrix(rows.map((entry) => entry.row));
  const x = Matrix.columnVector(Array.from(lineage.mean));
  const Vi = inverse(V);
  const A = X.transpose().mmul(Vi).mmul(X);
  const Ai = inverse(A);
  const beta = Ai.mmul(X.transpose()).mmul(Vi).mmul(x);
  const Vir = Vi.mmul(x.clone().sub(X.mmul(beta)));
  const trace = (matrix: Matrix): number => {
    let sum = 0;
    for (let i = 0; i < matrix.rows; i++) sum += matrix.get(i, i);
    return sum;
  };
  return process.map((value, axis) => {
    const h = value * 1e-6;
    const up = process.slice();
    const down = process.slice();
    up[axis] += h;
    down[axis] -= h;
    const dV = covarianceAt(up).sub(covarianceAt(down)).div(2 * h);
    const dX = new Matrix(rows.map((entry) => entry.slopes[axis]));
    const profile = -0.5 * trace(Vi.mmul(dV)) + 0.5 * Vir.transpose().mmul(dV).mmul(Vir).get(0, 0) + Vir.transpose().mmul(dX.mmul(beta)).get(0, 0);
    const dA = X.transpose().mmul(Vi).mmul(dV).mmul(Vi).mmul(X).mul(-1).add(dX.transpose().mmul(Vi).mmul(X)).add(X.transpose().mmul(Vi).mmul(dX));
    return profile - 0.5 * trace(Ai.mmul(dA));
  });
}

describe('restrictedScore: gradient of the restricted log-likelihood', () => {
  const cases: Array<[string, number, number, number[]]> = [
    // model, size, seed, process values
    ['ou', 12, 1, [0.4, 0.05]],
    ['ou', 25, 2, [1.7, 0.3]],
    ['ou', 8, 3, [0.02, 0.01]],
    ['ou', 30, 4, [6, 2]],
    ['random-walk', 18, 7, [0.003]],
    ['random-walk', 18, 7, [0.2]],
    ['random-walk', 18, 7, [4]],
    ['directional-walk', 18, 8, [0.003]],
    ['directional-walk', 18, 8, [0.2]],
    ['directional-walk', 18, 8, [4]],
    ['stasis', 18, 9, [0.003]],
    ['stasis', 18, 9, [0.2]],
    ['stasis', 18, 9, [4]],
    ['covariate-stasis', 18, 10, [0.05]],
    ['covariate-stasis', 18, 10, [2]],
    ['covariate-walk', 18, 10, [0.05]],
    ['covariate-walk', 18, 10, [2]],
  ];
  for (const [id, size, seed, process] of cases) {
    it(`${id} at ${process.join(', ')} (N = ${size}): matches central differences and the dense closed form`, () => {
      const seeded = approachingLineage(size, seed);
      const lineage = id.startsWith('covariate') ? { ...seeded, covariate } : seeded;
      const evaluator = new LikelihoodEvaluator(findModel(id)!, lineage);
      const gradient = new Float64Array(process.length);
      const value = evaluator.restrictedScore(process, gradient);
      // The value is restrictedLogLik's, bit for bit.
      expect(value).toBe(restrictedLogLik(evaluator.whiten(process)));
      const scale = 1 + gradient.reduce((sum, slope, axis) => sum + Math.abs(slope * process[axis]), 0);
      // 1. central differences (relative step 1e-5; agreement to 1e-6 of the gradient's scale in ln units).
      process.forEach((at, axis) => {
        const h = at * 1e-5;
        const up = process.slice();
        const down = process.slice();
        up[axis] += h;
        down[axis] -= h;
        const difference = (restrictedLogLik(evaluator.whiten(up)) - restrictedLogLik(evaluator.whiten(down))) / (2 * h);
        expect(Math.abs(difference - gradient[axis]) * at).toBeLessThan(1e-6 * scale);
      });
      // 2. the dense closed form (its dV by central differences of step 1e-6: agreement to 1e-7 of the scale).
      const dense = denseRestrictedGradient(id, lineage, process);
      process.forEach((at, axis) => expect(Math.abs(dense[axis] - gradient[axis]) * at).toBeLessThan(1e-7 * scale));
    });
  }

  it('differs from the profile gradient by the design term (ou: the adjustment depends on alpha and the step variance)', () => {
    const lineage = approachingLineage(20, 11);
    const evaluator = new LikelihoodEvaluator(findModel('ou')!, lineage);
    const restricted = new Float64Array(2);
    const profile = new Float64Array(2);
    evaluator.restrictedScore([0.8, 0.1], restricted);
    evaluator.profileScore([0.8, 0.1], profile);
    // d/dsigma2 of -0.5 ln det(X' V^-1 X): V grows with sigma2, so X' V^-1 X shrinks and the adjustment rises (sign: common practice).
    expect(restricted[1] - profile[1]).toBeGreaterThan(0);
    expect(Math.abs(restricted[0] - profile[0])).toBeGreaterThan(0);
  });

  it('is NaN where the restricted log-likelihood is not finite (a singular covariance)', () => {
    // A walk whose first horizon has zero sampling variance and no process variance: V singular (MODELS.md).
    const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [0, 1, 3], samplingVariance: [0, 0, 0] });
    const evaluator = new LikelihoodEvaluator(findModel('random-walk')!, lineage);
    const gradient = new Float64Array(1);
    expect(evaluator.restrictedScore([1], gradient)).toBe(Number.NEGATIVE_INFINITY);
    expect(Number.isNaN(gradient[0])).toBe(true);
  });
});

describe('the adjusted supremum of a location parameter: its gradient (issue 14)', () => {
  // locationSupremum's adjusted value is profile - 0.5 ln det(X_r' V^-1 X_r), X_r the design without the parameter's
  // column, computed from the reduced QR factor (reducedProfileSummary). Its gradient (supremumScore: restrictedScore
  // with `omit`) is checked against central finite differences of that value (Abramowitz & Stegun 1964, 25.3.21; from
  // memory), h = 1e-5 relative, for ou's two location parameters at interior process values.
  it('ou, ancestral_mean and optimum, three seeded lineages: slopes agree to 1e-6 relative', async () => {
    const { reducedProfileSummary, profileLogLik } = await import('../../src/engine/gls.js');
    const { supremumScore } = await import('../../src/fit/intervals.js');
    const ou = findModel('ou');
    if (!ou) throw new Error('ou not registered');
    for (const seed of [3, 17, 29]) {
      const lineage = approachingLineage(14, seed);
      const evaluator = new LikelihoodEvaluator(ou, lineage);
      for (const name of ['ancestral_mean', 'optimum']) {
        const index = ou.fixLocation(name, 0, [1, 1], lineage).index;
        const value = (process: number[]): number => {
          const sums = evaluator.whiten(process);
          return profileLogLik(sums) - 0.5 * reducedProfileSummary(sums, index, 0).logDetInformation;
        };
        const score = supremumScore(evaluator, name, true);
        if (!score) throw new Error('ou has derivatives');
        for (const process of [[0.4, 0.05], [1.3, 0.2], [0.08, 0.01]]) {
          const slopes = Array.from(score(process.slice()));
          for (let k = 0; k < 2; k++) {
            const h = 1e-5 * process[k];
            const up = process.slice();
            const down = process.slice();
            up[k] += h;
            down[k] -= h;
            const numeric = (value(up) - value(down)) / (2 * h);
            expect(Math.abs(slopes[k] - numeric)).toBeLessThan(1e-6 * Math.max(1, Math.abs(numeric)));
          }
        }
      }
    }
  });
});
