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
 * The value of a round step.
 *
 * @example
 * stepValue({ multiple: 2, exponent: -2 }); // 0.02
 */
export function stepValue(step: RoundStep): number {
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
  const exponent = Math.floor(Math.log10(span / target));
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
  const values: number[] = [];
  for (let k = first; k <= last; k++) {
    const whole = k * step.multiple;
    // + 0 turns -0 into 0, so no tick is labelled "-0".
    values.push((step.exponent >= 0 ? whole * powerOfTen(step.exponent) : whole / powerOfTen(-step.exponent)) + 0);
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
