import { describe, expect, it } from 'vitest';
import { lineageFromArrays } from '../../src/lineage.js';
import type { ProcessAxis } from '../../src/models/model.js';
import { maximiseProcess } from '../../src/fit/search.js';

// The nested search screens the grid's secondary local maxima with a coarse
// Brent pass before refining them (search.ts, issue 14). A narrow peak that
// sits between grid points, whose grid value is well below the best grid
// value, must still win when it is the higher one. Reference: the closed form
// of the test surface, f(u) = exp(-u^2 / 8) + 1.5 exp(-(u - c)^2 / (2 w^2)),
// u = ln x: its maximum near c is the root of the closed-form derivative f'(u),
// found here by bisection on [c - w, c + w].
describe('screening of secondary grid maxima', () => {
  const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 0, 0, 0], samplingVariance: [1, 1, 1, 1] });
  const axis: ProcessAxis = { name: 'step_variance', allowZero: false, range: () => [1e-3, 1e3] };
  // 24 grid points over ln 1e-3 .. ln 1e3: a step of 0.6; c sits 0.25 from its nearest grid point.
  const gridStep = (Math.log(1e3) - Math.log(1e-3)) / 23;
  const centre = Math.log(1e-3) + 17 * gridStep + 0.25;
  const width = 0.12;
  const surface = (u: number): number => Math.exp(-(u * u) / 8) + 1.5 * Math.exp(-((u - centre) ** 2) / (2 * width * width));

  const slope = (u: number): number => (-u / 4) * Math.exp(-(u * u) / 8) - ((1.5 * (u - centre)) / (width * width)) * Math.exp(-((u - centre) ** 2) / (2 * width * width));

  it('finds the narrow higher peak between grid points (closed form: the root of f\' near c, to 1e-6)', () => {
    let low = centre - width;
    let high = centre + width;
    for (let step = 0; step < 60; step++) {
      const middle = 0.5 * (low + high);
      if (slope(middle) > 0) low = middle;
      else high = middle;
    }
    const found = maximiseProcess((process) => surface(Math.log(process[0])), [axis], lineage, { points: 24 });
    expect(Math.abs(Math.log(found.process[0]) - 0.5 * (low + high))).toBeLessThan(1e-6);
    expect(found.logLik).toBeCloseTo(surface(0.5 * (low + high)), 10);
  });

  it('keeps the broad peak when the narrow one is lower (closed form: at u = 0 within 1e-3)', () => {
    const lower = (u: number): number => Math.exp(-(u * u) / 8) + 0.5 * Math.exp(-((u - centre) ** 2) / (2 * width * width));
    const found = maximiseProcess((process) => lower(Math.log(process[0])), [axis], lineage, { points: 24 });
    expect(Math.abs(Math.log(found.process[0]))).toBeLessThan(1e-3);
    expect(found.logLik).toBeCloseTo(1, 9);
  });
});
