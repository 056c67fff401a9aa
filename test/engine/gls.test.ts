import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { informationLogDet, profileLogLik, profileOut, profileWithFixedCoefficient, reducedProfile, reducedProfileSummary } from '../../src/engine/gls.js';
import { allocateSums, whiten, workSize } from '../../src/engine/kalman-filter.js';
import { allocateStateSpace } from '../../src/engine/state-space.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { findModel } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';

// The allocation-free logL paths of gls.ts (what the searches call) against
// (1) the dense GLS solution with one coefficient held fixed, written from
// the normal equations with ml-matrix (a general-purpose library): the other
// coefficients at (X_o' V^-1 X_o)^-1 X_o' V^-1 (x - X_i b), logL the
// multivariate normal density there, and ln det(X_o' V^-1 X_o);
// (2) the allocating functions they replace in the hot loops, bit for bit.
describe('GLS profile with a coefficient held fixed', () => {
  const ou = findModel('ou')!;
  const random = createRandom(14);
  const cases = Array.from({ length: 6 }, (_, k) => {
    const size = 6 + Math.floor(random.uniform() * 25);
    const time = [0];
    for (let i = 1; i < size; i++) time.push(time[i - 1] + 0.05 + random.uniform());
    const mean = time.map(() => 3 + random.normal());
    const samplingVariance = time.map(() => 0.01 + 0.2 * random.uniform());
    const lineage = lineageFromArrays({ time, mean, samplingVariance });
    const span = time[time.length - 1];
    const parameters = { ancestral_mean: 0, optimum: 0, alpha: [0, 0.3 / span, 4 / span][k % 3], step_variance: 0.02 + 0.5 * random.uniform() };
    return { lineage, parameters, index: k % 2, value: 2 + random.normal() };
  });

  for (const [number, { lineage, parameters, index, value }] of cases.entries()) {
    it(`case ${number + 1}: filter + reduced QR agree with the dense normal equations to 1e-9 relative`, () => {
      const size = lineage.mean.length;
      const space = allocateStateSpace(size, 2, lineage.samplingVariance);
      ou.fillSpace(lineage, ou.processFrom(parameters, lineage), space);
      const sums = whiten(space, Float64Array.from(lineage.mean), allocateSums(size, 2), new Float64Array(workSize(2)));

      // Dense reference.
      const { covariance } = ou.meanCovariance(lineage, { ...parameters, alpha: parameters.alpha === 0 ? 1e-300 : parameters.alpha });
      const v = new Matrix(size, size);
      for (let i = 0; i < size; i++) for (let j = 0; j < size; j++) v.set(i, j, (parameters.alpha === 0 ? parameters.step_variance * Math.min(lineage.time[i], lineage.time[j]) : covariance[i][j]) + (i === j ? lineage.samplingVariance[i] : 0));
      const cholesky = new CholeskyDecomposition(v);
      const other = 1 - index;
      const column = (j: number): Matrix => Matrix.columnVector(Array.from({ length: size }, (_, i) => space.design[2 * i + j]));
      const shifted = Matrix.columnVector(Array.from({ length: size }, (_, i) => lineage.mean[i] - value * space.design[2 * i + index]));
      const xo = column(other);
      const solvedDesign = cholesky.solve(xo);
      const information = xo.transpose().mmul(solvedDesign).get(0, 0);
      const coefficient = xo.transpose().mmul(cholesky.solve(shifted)).get(0, 0) / information;
      const residual = Matrix.sub(shifted, Matrix.mul(xo, coefficient));
      const quadratic = residual.transpose().mmul(cholesky.solve(residual)).get(0, 0);
      const lower = cholesky.lowerTriangularMatrix;
      let logDet = 0;
      for (let i = 0; i < size; i++) logDet += 2 * Math.log(lower.get(i, i));
      const denseLogLik = -0.5 * (size * Math.log(2 * Math.PI) + logDet + quadratic);

      const summary = reducedProfileSummary(sums, index, value);
      expect(Math.abs(summary.logLik - denseLogLik) / Math.abs(denseLogLik)).toBeLessThan(1e-9);
      expect(Math.abs(summary.logDetInformation - Math.log(information)) / Math.max(1, Math.abs(Math.log(information)))).toBeLessThan(1e-9);
      expect(Math.abs(profileWithFixedCoefficient(sums, index, value) - denseLogLik) / Math.abs(denseLogLik)).toBeLessThan(1e-9);
    });
  }

  it('the allocation-free paths give the allocating functions\' numbers bit for bit (same operations, same order)', () => {
    for (const { lineage, parameters, index, value } of cases) {
      const size = lineage.mean.length;
      const space = allocateStateSpace(size, 2, lineage.samplingVariance);
      ou.fillSpace(lineage, ou.processFrom(parameters, lineage), space);
      const sums = whiten(space, Float64Array.from(lineage.mean), allocateSums(size, 2), new Float64Array(workSize(2)));
      const full = profileOut(sums);
      expect(profileLogLik(sums)).toBe(full.logLik);
      expect(informationLogDet(sums)).toBe(full.logDetInformation);
      const reduced = reducedProfile(sums, index, value);
      expect(reducedProfileSummary(sums, index, value)).toEqual({ logLik: reduced.logLik, logDetInformation: reduced.logDetInformation });
      expect(profileWithFixedCoefficient(sums, index, value)).toBe(reduced.logLik);
    }
  });

  it('a rank-deficient design gives -Infinity and a NaN log-determinant, as profileOut does', () => {
    const sums = allocateSums(3, 2);
    sums.triangle.set([1, 1, 0, 0]);
    sums.projected.set([1, 1]);
    expect(profileLogLik(sums)).toBe(profileOut(sums).logLik);
    expect(profileLogLik(sums)).toBe(Number.NEGATIVE_INFINITY);
    const reduced = reducedProfileSummary(allocateSums(3, 2), 0, 1);
    expect(reduced.logLik).toBe(Number.NEGATIVE_INFINITY);
    expect(reduced.logDetInformation).toBeNaN();
  });
});
