/**
 * Round axis ticks, pure: steps of 1, 2 or 5 × 10^k (common practice for
 * axis labelling), ticks that are integer multiples of the step, labels with
 * the step's decimals, and the coarsening that keeps labels from touching.
 *
 * These are copies of the helpers the trajectory figure keeps private in
 * `trajectory.ts` (same names, same behaviour), so that other figures
 * (the power curve) can use them without depending on that file; the two
 * can be merged by making `trajectory.ts` import from here.
 */

import { InputError } from '../../data/errors.js';

/** A round tick step, multiple × 10^exponent, kept as its parts so that ticks k × step carry no binary drift. */
export interface RoundStep {
  readonly multiple: 1 | 2 | 5;
  readonly exponent: number;
}

/** 10^exponent, exact for |exponent| ≤ 22 (parsed from decimal text, not computed by pow). */
function powerOfTen(exponent: number): number {
  return Number(`1e${exponent}`);
}

/**
 * The exponents a step may have: 1e-323 is the smallest power of ten a double
 * holds (as a subnormal), 5e307 the largest step on the ladder that is finite.
 * Clamping keeps every helper finite and terminating for any finite input
 * (a span that underflows to a subnormal, 0, or overflows to Infinity).
 */
const lowestExponent = -323;
const highestExponent = 307;

/** At most this many ticks are ever listed (an axis shows a dozen; more means a degenerate step). */
export const maximumTicks = 1000;

/**
 * multiple × 10^exponent as the double nearest that decimal (parsed from text):
 * for |exponent| ≤ 22 this equals the exact quotient or product of the two
 * integers, and it stays right where 10^exponent itself over- or underflows.
 */
function scaled(multiple: number, exponent: number): number {
  return Number(`${multiple}e${exponent}`);
}

/**
 * The value of a round step.
 *
 * @example
 * stepValue({ multiple: 2, exponent: -2 }); // 0.02
 */
export function stepValue(step: RoundStep): number {
  if (step.exponent < -22 || step.exponent > 22) return scaled(step.multiple, step.exponent);
  return step.exponent >= 0 ? step.multiple * powerOfTen(step.exponent) : step.multiple / powerOfTen(-step.exponent);
}

/**
 * The next coarser step on the 1–2–5 ladder: 1 → 2 → 5 → 10.
 *
 * @example
 * coarser({ multiple: 5, exponent: -1 }); // { multiple: 1, exponent: 0 }
 */
export function coarser(step: RoundStep): RoundStep {
  if (step.multiple === 1) return { multiple: 2, exponent: step.exponent };
  if (step.multiple === 2) return { multiple: 5, exponent: step.exponent };
  return { multiple: 1, exponent: step.exponent + 1 };
}

/**
 * The round step (1, 2 or 5 × 10^k) whose count of ticks over `span` is
 * closest to `target`, never fewer than 3 ticks.
 *
 * @param span - max − min of the axis, > 0
 * @param target - the wished-for number of ticks
 * @example
 * roundStep(0.1237, 6); // { multiple: 2, exponent: -2 } (ticks 0, 0.02 … 0.12)
 */
export function roundStep(span: number, target: number): RoundStep {
  // A span of 0, or one that underflows or overflows, still gets a finite exponent (the loop below then ends).
  const raw = Math.floor(Math.log10(span / target));
  const exponent = Number.isFinite(raw) ? Math.min(highestExponent - 1, Math.max(lowestExponent + 1, raw)) : raw > 0 ? highestExponent - 1 : lowestExponent + 1;
  let best: RoundStep = { multiple: 1, exponent };
  let bestMiss = Number.POSITIVE_INFINITY;
  for (let k = exponent - 1; k <= exponent + 1; k++) {
    for (const multiple of [1, 2, 5] as const) {
      const step = { multiple, exponent: k };
      const count = Math.floor(span / stepValue(step)) + 1;
      const miss = count < 3 ? Number.POSITIVE_INFINITY : Math.abs(count - target);
      if (miss < bestMiss) {
        best = step;
        bestMiss = miss;
      }
    }
  }
  return best;
}

/**
 * A round tick step (1, 2 or 5 × 10^k, common practice for axis labelling)
 * giving close to `target` ticks over the span, never fewer than 3.
 *
 * @example
 * tickStep(37.3, 6); // 5
 */
export function tickStep(span: number, target: number): number {
  return stepValue(roundStep(span, target));
}

/**
 * Every integer multiple k × step inside [min, max], ascending. Each value is
 * computed from the integer k × multiple and an exact power of ten, so 0.3
 * is the double nearest 0.3 rather than 3 × 0.1.
 *
 * @example
 * roundTicks(0, 0.1237, { multiple: 2, exponent: -2 }); // [0, 0.02, 0.04, 0.06, 0.08, 0.1, 0.12]
 */
export function roundTicks(min: number, max: number, step: RoundStep): number[] {
  const size = stepValue(step);
  const first = Math.ceil(min / size - 1e-9);
  const last = Math.floor(max / size + 1e-9);
  // A step of 0, a non-finite end, an absurd count, or multiples beyond 2^53 (where k + 1 rounds back to k:
  // a step below the values' rounding) list no ticks rather than looping without end.
  if (!(size > 0) || !Number.isSafeInteger(first) || !Number.isSafeInteger(last) || last - first >= maximumTicks) return [];
  const values: number[] = [];
  for (let k = first; k <= last; k++) {
    const whole = k * step.multiple;
    const value = step.exponent < -22 || step.exponent > 22 ? scaled(whole, step.exponent) : step.exponent >= 0 ? whole * powerOfTen(step.exponent) : whole / powerOfTen(-step.exponent);
    // + 0 turns -0 into 0, so no tick is labelled "-0".
    values.push(value + 0);
  }
  return values;
}

/**
 * A tick label: en-US digit grouping and as many decimals as the step has.
 *
 * @example
 * tickLabel(0.1, { multiple: 2, exponent: -2 }); // "0.10"
 * tickLabel(1e6, { multiple: 2, exponent: 5 }); // "1,000,000"
 */
export function tickLabel(value: number, step: RoundStep): string {
  // Beyond 20 decimals a fixed label would read 0.000…; write the value as its integer multiple × 10^exponent (e.g. 2e-311).
  if (step.exponent < -20) {
    const whole = Math.round(value / stepValue(step)) * step.multiple;
    return whole === 0 ? '0' : `${whole}e${step.exponent}`;
  }
  const decimals = Math.min(20, Math.max(0, -step.exponent));
  return new Intl.NumberFormat('en-US', { minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(value + 0);
}

/**
 * The ticks of one axis: start from `roundStep`'s step and move up the
 * 1–2–5 ladder until neighbouring labels no longer collide over the axis
 * length, keeping at least two ticks.
 *
 * @param limits - the axis ends (data units)
 * @param target - the wished-for number of ticks
 * @param length - the axis length, in the units of `extent` (points)
 * @param extent - the room one label needs along the axis, gap included
 * @example
 * fittedTicks({ min: 0, max: 1 }, 6, 200, () => 12).values; // [0, 0.2, 0.4, 0.6, 0.8, 1]
 */
export function fittedTicks(limits: { min: number; max: number }, target: number, length: number, extent: (label: string) => number): { step: RoundStep; values: number[] } {
  const span = limits.max - limits.min;
  let step = roundStep(span, target);
  let values = roundTicks(limits.min, limits.max, step);
  for (let guard = 0; guard < 64; guard++) {
    const spacing = (length * stepValue(step)) / span;
    const needed = Math.max(...values.map((value) => extent(tickLabel(value, step))));
    if (spacing >= needed) break;
    const next = coarser(step);
    const nextValues = roundTicks(limits.min, limits.max, next);
    if (nextValues.length < 2) break;
    step = next;
    values = nextValues;
  }
  return { step, values };
}

/**
 * The spans and magnitudes an axis can show: 1e-200 to 1e200. The chart
 * library counts a tick step's decimals by multiplying by 10 until the value
 * comes back whole, which never ends for values near the double's underflow
 * (below about 1e-290): limits outside this range are refused before it runs.
 */
export const drawableRange = { smallest: 1e-200, largest: 1e200 } as const;

/**
 * Check axis limits before they reach the chart library: both finite, a
 * span of at least {@link drawableRange}.smallest and ends no larger in
 * magnitude than {@link drawableRange}.largest.
 *
 * @param axis - the axis in words, for the message ("time axis")
 * @throws InputError naming the axis and its ends when they cannot be drawn
 *
 * @example
 * drawableLimits({ min: 0, max: 12 }, 'time axis'); // { min: 0, max: 12 }
 * drawableLimits({ min: 0, max: 3e-311 }, 'time axis');
 * // throws: cannot draw the time axis: its values run from 0 to 3e-311
 */
export function drawableLimits(limits: { min: number; max: number }, axis: string): { min: number; max: number } {
  const span = limits.max - limits.min;
  const largest = Math.max(Math.abs(limits.min), Math.abs(limits.max));
  if (!Number.isFinite(span) || !(span >= drawableRange.smallest) || !(largest <= drawableRange.largest)) {
    throw new InputError(
      `cannot draw the ${axis}: its values run from ${limits.min} to ${limits.max}; a figure shows spans of at least ${drawableRange.smallest} and values up to ${drawableRange.largest} in magnitude; rescale the unit`,
    );
  }
  return limits;
}
