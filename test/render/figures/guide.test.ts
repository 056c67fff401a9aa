import { describe, expect, it } from 'vitest';
import { fitLineage } from '../../../src/fit/fit-lineage.js';
import { lineageFromArrays } from '../../../src/lineage.js';
import { movingOptimum } from '../../../src/models/moving-optimum.js';
import { optimumShift } from '../../../src/models/optimum-shift.js';
import { lineageDocument } from '../../../src/render/fit-document.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { modelCurve, timeAxisFor } from '../../../src/render/figures/geometry.js';
import { createRandom } from '../../../src/random/random.js';
import { simulateMeans } from '../../../src/random/simulate-lineage.js';

// The dashed guides of the issue-16 figures: the moving optimum drawn at
// theta(t) = optimum + optimum_drift t, and the optimum of optimum-shift as a
// step at t_p, the last horizon before the shift (the definitions of issue 16).

const time = Array.from({ length: 30 }, (_, i) => i * 0.1);
const design = lineageFromArrays({ time, mean: time.map(() => 0), samplingVariance: time.map(() => 0.02) });
const truth = { ancestral_mean: 0, optimum_before: 2, optimum_after: -1, alpha: 3, step_variance: 0.05, shift_1_time: time[15], shift_1_previous_time: time[14] };
const lineage = { ...design, mean: simulateMeans(optimumShift, design, truth, createRandom(12)) };
const fit = fitLineage(lineage, [movingOptimum, optimumShift], { intervals: false });
const drawnLineage = figureLineage(JSON.parse(JSON.stringify(lineageDocument(fit))));
const axis = timeAxisFor([drawnLineage]);

describe('guide lines of the trajectory figure', () => {
  it('moving-optimum: the optimum line optimum + optimum_drift t at every sampled time (1e-12)', () => {
    const model = fit.models.find((candidate) => candidate.id === 'moving-optimum')!;
    const { curve } = modelCurve(drawnLineage, axis, 'moving-optimum');
    expect(curve?.guide?.words).toBe('Moving optimum');
    const guide = curve!.guide!;
    guide.time.forEach((t, i) => expect(guide.value[i]).toBeCloseTo(model.estimates.optimum + model.estimates.optimum_drift * t, 12));
  });
  it('optimum-shift: a step from optimum_before to optimum_after at the last horizon before the fitted shift', () => {
    const model = fit.models.find((candidate) => candidate.id === 'optimum-shift')!;
    const shift = (model.extra?.shifts as { index: number }[])[0].index;
    const { curve } = modelCurve(drawnLineage, axis, 'optimum-shift');
    const guide = curve!.guide!;
    expect(guide.time).toEqual([0, time[shift - 1], time[shift - 1], time[29]]);
    expect(guide.value).toEqual([model.estimates.optimum_before, model.estimates.optimum_before, model.estimates.optimum_after, model.estimates.optimum_after]);
  });
  it('models without a guide draw none', async () => {
    const { ornsteinUhlenbeck } = await import('../../../src/models/ou.js');
    const plain = fitLineage(lineage, [ornsteinUhlenbeck], { intervals: false });
    const other = figureLineage(JSON.parse(JSON.stringify(lineageDocument(plain))));
    expect(modelCurve(other, timeAxisFor([other]), 'ou').curve?.guide).toBeNull();
  });
});
