import { Matrix, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { LikelihoodEvaluator } from '../../src/fit/evaluator.js';
import type { Lineage } from '../../src/lineage.js';
import { relaxedTimeSlope } from '../../src/models/ou.js';
import { findModel } from '../../src/models/registry.js';
import { approachingLineage } from '../support/random-lineage.js';

// The score recursions (src/engine/kalman-score.ts) through
// LikelihoodEvaluator.profileScore: the gradient of ou's profile
// log-likelihood in (alpha, step_variance), checked two independent ways.
//
// 1. Central finite differences of the profile log-likelihood itself
//    (f(x + h) - f(x - h)) / 2h, truncation h^2 f'''/6 (Abramowitz & Stegun
//    1964, 25.3.21; from memory); h = 1e-5 relative.
// 2. The dense-covariance derivative of the Gaussian log-likelihood with the
//    location parameters held at their GLS estimate (which is the derivative
//    of the profile, because d logL / d beta = 0 there: Harville 1977,
//    J. Amer. Statist. Assoc. 72:320-340, section 3; Searle, Casella &
//    McCulloch 1992, Variance Components, section 6.2):
//      d logL = -1/2 tr(V^-1 dV) + 1/2 r' V^-1 dV V^-1 r + r' V^-1 dX beta,
//    r = x - X beta, beta = (X' V^-1 X)^-1 X' V^-1 x, with V, dV, X and dX
//    written here from the closed forms of MODELS.md (Hansen 1997) and
//    inverted by ml-matrix.

const ou = findModel('ou')!;

/** The dense derivative of item 2 above, in natural units of (alpha, step_variance). */
function denseGradient(lineage: Lineage, alpha: number, stepVariance: number): [number, number] {
  const t = Array.from(lineage.time);
  const n = t.length;
  const x = Matrix.columnVector(Array.from(lineage.mean));
  const covariance = (i: number, j: number): number =>
    (stepVariance / (2 * alpha)) * (Math.exp(-alpha * Math.abs(t[i] - t[j])) - Math.exp(-alpha * (t[i] + t[j])));
  const covarianceByAlpha = (i: number, j: number): number =>
    -covariance(i, j) / alpha +
    (stepVariance / (2 * alpha)) * (-Math.abs(t[i] - t[j]) * Math.exp(-alpha * Math.abs(t[i] - t[j])) + (t[i] + t[j]) * Math.exp(-alpha * (t[i] + t[j])));
  const V = Matrix.from1DArray(n, n, Array.from({ length: n * n }, (_, k) => covariance(Math.floor(k / n), k % n) + (Math.floor(k / n) === k % n ? lineage.samplingVariance[k % n] : 0)));
  const dVAlpha = Matrix.from1DArray(n, n, Array.from({ length: n * n }, (_, k) => covarianceByAlpha(Math.floor(k / n), k % n)));
  const dVVariance = Matrix.from1DArray(n, n, Array.from({ length: n * n }, (_, k) => covariance(Math.floor(k / n), k % n) / stepVariance));
  const X = Matrix.from1DArray(n, 2, t.flatMap((time) => [Math.exp(-alpha * time), (1 - Math.exp(-alpha * time)) / alpha]));
  const dX = Matrix.from1DArray(n, 2, t.flatMap((time) => [-time * Math.exp(-alpha * time), (time * Math.exp(-alpha * time)) / alpha - (1 - Math.exp(-alpha * time)) / (alpha * alpha)]));
  const Vi = inverse(V);
  const beta = inverse(X.transpose().mmul(Vi).mmul(X)).mmul(X.transpose()).mmul(Vi).mmul(x);
  const r = x.clone().sub(X.mmul(beta));
  const Vir = Vi.mmul(r);
  const term = (dV: Matrix, dMean: Matrix | null): number => {
    let trace = 0;
    const product = Vi.mmul(dV);
    for (let i = 0; i < n; i++) trace += product.get(i, i);
    const quadratic = Vir.transpose().mmul(dV).mmul(Vir).get(0, 0);
    const meanPart = dMean === null ? 0 : Vir.transpose().mmul(dMean).get(0, 0);
    return -0.5 * trace + 0.5 * quadratic + meanPart;
  };
  return [term(dVAlpha, dX.mmul(beta)), term(dVVariance, null)];
}

describe('score recursions: gradient of the profile log-likelihood (ou)', () => {
  const cases: Array<[number, number, number, number]> = [
    // size, seed, alpha, step_variance
    [12, 1, 0.4, 0.05],
    [25, 2, 1.7, 0.3],
    [8, 3, 0.02, 0.01],
    [30, 4, 6, 2],
  ];
  for (const [size, seed, alpha, stepVariance] of cases) {
    it(`matches central differences and the dense derivative (N = ${size}, alpha = ${alpha}, step_variance = ${stepVariance})`, () => {
      const lineage = approachingLineage(size, seed);
      const evaluator = new LikelihoodEvaluator(ou, lineage);
      const gradient = new Float64Array(2);
      const logLik = evaluator.profileScore([alpha, stepVariance], gradient);
      // The value is the profile's, bit for bit.
      expect(logLik).toBe(evaluator.profile([alpha, stepVariance]));
      // 1. central differences (relative step 1e-5; agreement to ~1e-6 relative of the gradient's scale).
      const scale = Math.abs(gradient[0] * alpha) + Math.abs(gradient[1] * stepVariance) + 1;
      for (const [axis, value] of [[0, alpha], [1, stepVariance]] as const) {
        const h = value * 1e-5;
        const up = [alpha, stepVariance];
        const down = [alpha, stepVariance];
        up[axis] += h;
        down[axis] -= h;
        const difference = (evaluator.profile(up) - evaluator.profile(down)) / (2 * h);
        expect(Math.abs(difference - gradient[axis]) * value).toBeLessThan(1e-6 * scale);
      }
      // 2. dense derivative (agreement to rounding of the dense solves, 1e-8 of the scale).
      const dense = denseGradient(lineage, alpha, stepVariance);
      expect(Math.abs(dense[0] - gradient[0]) * alpha).toBeLessThan(1e-8 * scale);
      expect(Math.abs(dense[1] - gradient[1]) * stepVariance).toBeLessThan(1e-8 * scale);
    });
  }

  it('at alpha = 0 is the one-sided derivative: the central difference at a tiny alpha', () => {
    const lineage = approachingLineage(15, 5);
    const evaluator = new LikelihoodEvaluator(ou, lineage);
    const atZero = new Float64Array(2);
    evaluator.profileScore([0, 0.1], atZero);
    const nearZero = new Float64Array(2);
    evaluator.profileScore([1e-7, 0.1], nearZero);
    expect(atZero[0]).toBeCloseTo(nearZero[0], 5);
    const h = 1e-6;
    const difference = (evaluator.profile([2 * h, 0.1]) - evaluator.profile([0, 0.1])) / (2 * h);
    expect(Math.abs(difference - atZero[0])).toBeLessThan(1e-4 * (1 + Math.abs(atZero[0])));
  });
});

describe('relaxedTimeSlope: d/d rate of (1 - exp(-rate t)) / rate', () => {
  // Closed form t e^-x / rate - (1 - e^-x) / rate^2 (x = rate t; differentiation of the quotient), evaluated
  // where it does not cancel, and its limit -t^2 / 2 at rate 0 (series of 1 - e^-x, common practice).
  it('equals the closed form away from 0 and on both sides of the series switch at x = 0.1', () => {
    for (const [rate, t] of [[3, 1.5], [0.5, 2], [0.1, 1], [0.0999999, 1], [0.1000001, 1], [0.05, 0.5]] as const) {
      const x = rate * t;
      const closed = (t * Math.exp(-x)) / rate - (1 - Math.exp(-x)) / (rate * rate);
      // The closed form cancels by about 1e-16 / x^2 relative.
      expect(Math.abs(relaxedTimeSlope(rate, t) - closed)).toBeLessThan(Math.max(1e-13, 1e-15 / (x * x)) * t * t);
    }
    expect(relaxedTimeSlope(0, 3)).toBe(-4.5);
  });
});

describe('score recursions: the variance of the walks and of stasis', () => {
  // Central differences of the profile (as above) and the dense derivative with dV = C / variance (C linear in
  // the variance; MODELS.md's covariances: sigma2 min(t_i, t_j) for the walks, omega on the diagonal for stasis)
  // and no mean term (the designs do not depend on the variance).
  // The covariate variants (issue 5's definitions: stasis or the random walk about intercept + slope × covariate,
  // the walk's covariate measured from its first horizon) have the same covariances.
  const covariances: Record<string, (t: number[], i: number, j: number) => number> = {
    'random-walk': (t, i, j) => Math.min(t[i], t[j]),
    'directional-walk': (t, i, j) => Math.min(t[i], t[j]),
    stasis: (_t, i, j) => (i === j ? 1 : 0),
    'covariate-stasis': (_t, i, j) => (i === j ? 1 : 0),
    'covariate-walk': (t, i, j) => Math.min(t[i], t[j]),
  };
  const covariate = Float64Array.from({ length: 18 }, (_, i) => Math.sin(i) + 0.1 * i);
  const designs: Record<string, (time: number, i: number) => number[]> = {
    'random-walk': () => [1],
    'directional-walk': (time) => [1, time],
    stasis: () => [1],
    'covariate-stasis': (_time, i) => [1, covariate[i]],
    'covariate-walk': (_time, i) => [1, covariate[i] - covariate[0]],
  };
  for (const id of Object.keys(covariances)) {
    it(`${id}: matches central differences and the dense derivative`, () => {
      const model = findModel(id)!;
      const lineage = { ...approachingLineage(18, 7), covariate };
      const evaluator = new LikelihoodEvaluator(model, lineage);
      const t = Array.from(lineage.time);
      const n = t.length;
      for (const variance of [0.003, 0.2, 4]) {
        const gradient = new Float64Array(1);
        evaluator.profileScore([variance], gradient);
        const h = variance * 1e-5;
        const difference = (evaluator.profile([variance + h]) - evaluator.profile([variance - h])) / (2 * h);
        const scale = Math.abs(gradient[0] * variance) + 1;
        expect(Math.abs(difference - gradient[0]) * variance).toBeLessThan(1e-6 * scale);
        const unit = Matrix.from1DArray(n, n, Array.from({ length: n * n }, (_, k) => covariances[id](t, Math.floor(k / n), k % n)));
        const V = unit.clone().mul(variance);
        for (let i = 0; i < n; i++) V.set(i, i, V.get(i, i) + lineage.samplingVariance[i]);
        const X = new Matrix(t.map((time, i) => designs[id](time, i)));
        const x = Matrix.columnVector(Array.from(lineage.mean));
        const Vi = inverse(V);
        const beta = inverse(X.transpose().mmul(Vi).mmul(X)).mmul(X.transpose()).mmul(Vi).mmul(x);
        const Vir = Vi.mmul(x.clone().sub(X.mmul(beta)));
        let trace = 0;
        const product = Vi.mmul(unit);
        for (let i = 0; i < n; i++) trace += product.get(i, i);
        const dense = -0.5 * trace + 0.5 * Vir.transpose().mmul(unit).mmul(Vir).get(0, 0);
        expect(Math.abs(dense - gradient[0]) * variance).toBeLessThan(1e-8 * scale);
      }
    });
  }
});
