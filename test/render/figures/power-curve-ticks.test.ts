/**
 * Axis ticks of the power-curve figure, read back from the chart.js scales
 * after the chart is drawn (the values chart.js actually labels), checked
 * against the closed form of a round axis (common practice for axis
 * labelling): the step between ticks is 1, 2 or 5 × 10^k, every tick is an
 * integer multiple of it, and each label reads back as its value. Drift grids
 * with awkward ends (0 to 0.1237, 0 to 37.3) are the cases in which chart.js
 * labelled the axis end itself ("0.1237").
 */
import { describe, expect, it } from 'vitest';
import { recordDrawnTicks, roundAxisFailures, type DrawnScale } from './drawn-ticks.js';
import { powerCurvePlan, type PowerCurveInput } from '../../../src/render/figures/power-curve.js';
import { fittedTicks, roundTicks, tickLabel, tickStep } from '../../../src/render/figures/ticks.js';


/** An invented design's power grid: `count` drifts evenly from 0 to `maximumDrift`, power rising with drift. */
function powerInput(maximumDrift: number, count = 11): PowerCurveInput {
  const grid = Array.from({ length: count }, (_, i) => {
    const drift = (maximumDrift * i) / (count - 1);
    const share = i / (count - 1);
    return { drift, drift_sd: drift / 0.4, p_lrt: 0.05 + 0.9 * share, p_best: 0.05 + 0.85 * share ** 1.3, p_weight: 0.9 * share ** 2 };
  });
  return { grid, lineage: 'Tarn Ledge / rib count', horizons: 18, replicates: 40, timeUnit: 'Myr', traitUnit: 'mm', weightThreshold: 0.5, targetPower: 0.8, level: 0.05, withinSd: 0.4 };
}

/** Draw the power curve and record each scale's ticks as chart.js laid them out. */
function drawnTicks(input: PowerCurveInput, width: number): Record<string, DrawnScale> {
  const { plan, resolved } = powerCurvePlan(input, { width, dpi: 72 });
  return recordDrawnTicks(plan, resolved);
}


describe('power-curve axis ticks (closed form: integer multiples of a 1, 2 or 5 × 10^k step)', () => {
  for (const maximumDrift of [0.1237, 37.3, 0.09029, 2.5e-4, 1234.5]) {
    it(`drift grid 0 to ${maximumDrift}: round ticks on both axes at 9 and 18 cm (the widths the power command and the report draw), labels apart`, () => {
      for (const width of [9, 18]) {
        const scales = drawnTicks(powerInput(maximumDrift), width);
        expect(Object.keys(scales).sort()).toEqual(['x', 'y']);
        for (const id of ['x', 'y']) {
          expect(roundAxisFailures(scales[id]), `${width} cm, axis ${id}`).toEqual([]);
          expect(scales[id].spacing, `${width} cm, axis ${id}`).toBeGreaterThan(scales[id].widestLabel);
        }
        // The drift axis still runs from 0 to the grid's largest drift (the curve reaches the frame); an awkward end is simply not labelled.
        expect(scales.x.min).toBe(0);
        expect(scales.x.max).toBe(maximumDrift);
        expect(scales.x.values.length, `${width} cm`).toBeGreaterThanOrEqual(3);
        // Probability axis 0..1: both ends are multiples of any 1-2-5 step up to 1, so both are labelled (step 0.2, or 0.5 if the axis were short).
        expect(scales.y.values[0]).toBe(0);
        expect(scales.y.values[scales.y.values.length - 1]).toBe(1);
      }
    });
  }

  it('9 cm, drift 0 to 0.1237: x ticks 0, 0.02 … 0.12 and y ticks 0, 0.2 … 1 (closed form: the 1-2-5 step nearest six ticks)', () => {
    const scales = drawnTicks(powerInput(0.1237), 9);
    expect(scales.x.values).toEqual([0, 0.02, 0.04, 0.06, 0.08, 0.1, 0.12]);
    expect(scales.x.labels).toEqual(['0.00', '0.02', '0.04', '0.06', '0.08', '0.10', '0.12']);
    expect(scales.y.values).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(scales.y.labels).toEqual(['0.0', '0.2', '0.4', '0.6', '0.8', '1.0']);
  });

  it('9 cm, drift 0 to 37.3: x ticks every 5 (closed form: 37.3 / 5 = 7.46, so 0 … 35)', () => {
    const scales = drawnTicks(powerInput(37.3), 9);
    expect(scales.x.values).toEqual([0, 5, 10, 15, 20, 25, 30, 35]);
  });
});

describe('ticks.ts helpers (closed forms of a 1-2-5 axis)', () => {
  it('tickStep is 1, 2 or 5 × 10^k with at least 3 ticks over spans 1e-6 … 1e9', () => {
    for (let e = -6; e <= 9; e += 0.37) {
      const span = 10 ** e;
      for (const target of [4, 6, 8]) {
        const step = tickStep(span, target);
        const mantissa = step / 10 ** Math.floor(Math.log10(step));
        expect([1, 2, 5].some((round) => Math.abs(mantissa - round) < 1e-9), `span ${span}, step ${step}`).toBe(true);
        expect(Math.floor(span / step + 1e-9) + 1, `span ${span}, target ${target}`).toBeGreaterThanOrEqual(3);
      }
    }
  });

  it('roundTicks gives the decimal values exactly (0.3 is the double nearest 0.3, not 3 × 0.1) and no -0', () => {
    expect(roundTicks(-0.25, 0.35, { multiple: 1, exponent: -1 })).toEqual([-0.2, -0.1, 0, 0.1, 0.2, 0.3]);
    expect(Object.is(roundTicks(-1, 1, { multiple: 1, exponent: 0 })[1], 0)).toBe(true);
    expect(tickLabel(1e6, { multiple: 2, exponent: 5 })).toBe('1,000,000');
  });

  it('fittedTicks coarsens along 1 → 2 → 5 → 10 until labels of 30 points fit (closed form: 100 points over 0..1)', () => {
    // Six ticks on 0.2 are 20 points apart, < 30; 0.5 gives 50 points: ticks 0, 0.5, 1.
    expect(fittedTicks({ min: 0, max: 1 }, 6, 100, () => 30).values).toEqual([0, 0.5, 1]);
    expect(fittedTicks({ min: 0, max: 1 }, 6, 200, () => 30).values).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });
});
