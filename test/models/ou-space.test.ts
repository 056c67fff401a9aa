import { describe, expect, it } from 'vitest';
import { allocateStateSpace } from '../../src/engine/state-space.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { findModel } from '../../src/models/registry.js';

// ou keeps the exponentials of the last alpha per time axis (the searches vary
// step_variance at fixed alpha). Whatever order alphas come in, the state space
// must be the closed form of MODELS.md / Hansen (1997): design exp(-alpha t),
// (1 - exp(-alpha t)) / alpha; transition exp(-alpha dt); process variance
// sigma2 (1 - exp(-2 alpha dt)) / (2 alpha) (t and dt at alpha = 0).
describe('ou state space under changing alpha', () => {
  const ou = findModel('ou')!;
  const time = [0, 0.4, 1.1, 1.5, 2.9];
  const lineage = lineageFromArrays({ time, mean: [1, 2, 1.5, 2.5, 3], samplingVariance: [0.1, 0.1, 0.1, 0.1, 0.1] });
  const other = lineageFromArrays({ time: [0, 1, 2, 3, 4], mean: [1, 2, 1.5, 2.5, 3], samplingVariance: [0.1, 0.1, 0.1, 0.1, 0.1] });
  const relaxed = (rate: number, t: number): number => (rate === 0 ? t : (1 - Math.exp(-rate * t)) / rate);

  it('matches the closed form for alphas in any order, step variances changing at a fixed alpha, and two time axes in turn', () => {
    const space = allocateStateSpace(5, 2, lineage.samplingVariance);
    const otherSpace = allocateStateSpace(5, 2, other.samplingVariance);
    const sequence: Array<[number, number]> = [[0.7, 0.2], [0.7, 0.5], [0, 0.5], [2.5, 0.1], [0.7, 0.3], [0.7, 0]];
    for (const [alpha, stepVariance] of sequence) {
      for (const [which, target] of [[lineage, space], [other, otherSpace]] as const) {
        ou.fillSpace(which, [alpha, stepVariance], target);
        for (let i = 0; i < 5; i++) {
          const t = which.time[i];
          expect(target.design[2 * i]).toBeCloseTo(Math.exp(-alpha * t), 14);
          expect(target.design[2 * i + 1]).toBeCloseTo(relaxed(alpha, t), 14);
          if (i > 0) {
            const dt = which.time[i] - which.time[i - 1];
            expect(target.transition[i]).toBeCloseTo(Math.exp(-alpha * dt), 14);
            expect(target.processVariance[i]).toBeCloseTo(stepVariance * relaxed(2 * alpha, dt), 14);
          }
        }
      }
    }
  });
});
