/**
 * The finite-difference Newton polish of interior maxima (src/fit/polish.ts),
 * on functions whose maxima are known in closed form (common practice: a
 * stationary point of a smooth function is where its gradient vanishes).
 */
import { describe, expect, it } from 'vitest';
import type { Lineage } from '../../src/lineage.js';
import type { ProcessAxis } from '../../src/models/model.js';
import { polishMaximum } from '../../src/fit/polish.js';

const lineage = {} as Lineage;
const axis = (name: string, lower = 1e-6, upper = 1e6): ProcessAxis => ({ name, allowZero: true, range: () => [lower, upper] });

describe('polishMaximum', () => {
  it('moves a one-axis maximum found to ~1e-6 onto the root of the gradient', () => {
    // f = -5u^2 + 0.1u^3 - 0.02u^4 with u = ln p - ln 3: f'(u) = 0 at u = 0 exactly, f''(0) = -10.
    const f = ([p]: number[]): number => {
      const u = Math.log(p) - Math.log(3);
      return -5 * u * u + 0.1 * u ** 3 - 0.02 * u ** 4 - 123.4;
    };
    const start = [3 * Math.exp(1e-6)];
    const polished = polishMaximum(f, [axis('variance')], lineage, { process: start, logLik: f(start) }, [0]);
    expect(Math.abs(Math.log(polished.process[0]) - Math.log(3))).toBeLessThan(1e-12);
    expect(polished.logLik).toBe(f(polished.process));
  });

  it('polishes two correlated axes jointly and leaves a third, not free, alone', () => {
    // f = -(u^2 + u v + v^2) - 0.3 u^3 at (ln 2, ln 5): gradient 0 at u = v = 0; negative definite Hessian.
    const f = ([a, b, c]: number[]): number => {
      const u = Math.log(a) - Math.log(2);
      const v = Math.log(b) - Math.log(5);
      return -(u * u + u * v + v * v) - 0.3 * u ** 3 - (c - 7) ** 2;
    };
    const start = [2 * Math.exp(2e-5), 5 * Math.exp(-3e-5), 7.5];
    const polished = polishMaximum(f, [axis('alpha'), axis('variance'), axis('other')], lineage, { process: start, logLik: f(start) }, [0, 1]);
    expect(Math.abs(Math.log(polished.process[0]) - Math.log(2))).toBeLessThan(1e-11);
    expect(Math.abs(Math.log(polished.process[1]) - Math.log(5))).toBeLessThan(1e-11);
    expect(polished.process[2]).toBe(7.5);
  });

  it('refuses a minimum, a stencil outside the range and a large step (returns the start unchanged)', () => {
    const bowl = ([p]: number[]): number => Math.log(p) ** 2;
    const atOne = { process: [1.0001], logLik: bowl([1.0001]) };
    expect(polishMaximum(bowl, [axis('variance')], lineage, atOne, [0])).toEqual({ ...atOne, converged: false });
    const hill = ([p]: number[]): number => -(Math.log(p) ** 2);
    const nearEnd = { process: [1.0001], logLik: hill([1.0001]) };
    expect(polishMaximum(hill, [axis('variance', 1e-6, 1.001)], lineage, nearEnd, [0])).toEqual({ ...nearEnd, converged: false });
    const far = { process: [Math.exp(0.1)], logLik: hill([Math.exp(0.1)]) };
    expect(polishMaximum(hill, [axis('variance')], lineage, far, [0])).toEqual({ ...far, converged: false });
  });

  it('does nothing when no axis is free', () => {
    const f = ([p]: number[]): number => -((p - 2) ** 2);
    const start = { process: [0], logLik: f([0]) };
    expect(polishMaximum(f, [axis('variance')], lineage, start, [])).toEqual({ ...start, converged: false });
  });

  it('with backtracking, reaches the maximum from a start where a full Newton step overshoots', () => {
    // f = -ln cosh(u), u = ln p: Newton's step is -sinh(2u)/2, which from u = 1.2 jumps to u = -1.56 and
    // diverges (a classic example, common practice); halving the step keeps every step uphill.
    const f = ([p]: number[]): number => -Math.log(Math.cosh(Math.log(p)));
    const start = { process: [Math.exp(1.2)], logLik: f([Math.exp(1.2)]) };
    const plain = polishMaximum(f, [axis('variance')], lineage, start, [0], { largestStep: 5 });
    expect(plain.converged).toBe(false);
    const careful = polishMaximum(f, [axis('variance')], lineage, start, [0], { largestStep: 5, backtrack: true, iterations: 12 });
    expect(careful.converged).toBe(true);
    expect(Math.abs(Math.log(careful.process[0]))).toBeLessThan(1e-9);
  });
});
