/**
 * Shared by the axis-tick tests: record the ticks chart.js actually lays out
 * (after drawing), and check them against the closed form of a round axis
 * (common practice for axis labelling).
 */
import type { Chart, Plugin } from 'chart.js';
import { drawFigure } from '../../../src/render/figures/chart-backend.js';

/** One scale's ticks as drawn. */
export interface DrawnScale {
  readonly min: number;
  readonly max: number;
  readonly horizontal: boolean;
  readonly values: number[];
  readonly labels: string[];
  /** Smallest distance between neighbouring ticks (points) and the widest (or, up an axis, tallest) label by chart.js's own measure. */
  readonly spacing: number;
  readonly widestLabel: number;
}

/**
 * Draw a figure plan and return every scale's ticks as chart.js laid them
 * out. The label measure calls chart.js's private `_getLabelSizes`, so this
 * helper may need a change on a chart.js upgrade.
 */
export function recordDrawnTicks(plan: Parameters<typeof drawFigure>[0], resolved: Parameters<typeof drawFigure>[1]): Record<string, DrawnScale> {
  const recorded: Record<string, DrawnScale> = {};
  const recorder: Plugin = {
    id: 'tickRecorder',
    afterDraw(chart: Chart) {
      for (const [id, scale] of Object.entries(chart.scales)) {
        const values = scale.ticks.map((tick) => tick.value);
        const pixels = values.map((value) => scale.getPixelForValue(value)).sort((a, b) => a - b);
        const gaps = pixels.slice(1).map((pixel, i) => pixel - pixels[i]);
        const sizes = (scale as unknown as { _getLabelSizes(): { widest: { width: number }; highest: { height: number } } })._getLabelSizes();
        recorded[id] = {
          min: scale.min,
          max: scale.max,
          horizontal: scale.isHorizontal(),
          values,
          labels: scale.ticks.map((tick) => String(tick.label)),
          spacing: gaps.length > 0 ? Math.min(...gaps) : Number.POSITIVE_INFINITY,
          widestLabel: scale.isHorizontal() ? sizes.widest.width : sizes.highest.height,
        };
      }
    },
  };
  const configuration = () => {
    const base = plan.configuration();
    return { ...base, plugins: [...(base.plugins ?? []), recorder] };
  };
  drawFigure({ ...plan, configuration }, resolved);
  return recorded;
}

/**
 * What is wrong with a set of ticks under the closed form of a round axis
 * (common practice): empty when the step is 1, 2 or 5 × 10^k, every tick is
 * an integer multiple of it, neighbours are one step apart, the ticks lie on
 * the axis and each label reads back as its value.
 */
export function roundAxisFailures(scale: DrawnScale): string[] {
  const failures: string[] = [];
  const values = [...scale.values].sort((a, b) => a - b);
  if (values.length < 2) return [`${values.length} tick(s): ${values.join(', ')}`];
  const step = values[1] - values[0];
  const mantissa = step / 10 ** Math.floor(Math.log10(step));
  if (![1, 2, 5, 10].some((round) => Math.abs(mantissa - round) < 1e-9 * round)) failures.push(`step ${step} is not 1, 2 or 5 × 10^k`);
  values.forEach((value, i) => {
    const multiple = value / step;
    if (Math.abs(multiple - Math.round(multiple)) > 1e-9 * Math.max(1, Math.abs(multiple))) failures.push(`tick ${value} is not a multiple of ${step}`);
    if (i > 0 && Math.abs(value - values[i - 1] - step) > 1e-9 * step) failures.push(`ticks ${values[i - 1]} and ${value} are not one step (${step}) apart`);
    if (value < scale.min - 1e-9 * step || value > scale.max + 1e-9 * step) failures.push(`tick ${value} outside the axis ${scale.min}…${scale.max}`);
  });
  scale.values.forEach((value, i) => {
    const read = Number(scale.labels[i].replace(/,/g, '').replace(/\u2212/g, '-'));
    if (!(Math.abs(read - value) <= 1e-9 * step)) failures.push(`label "${scale.labels[i]}" does not read as ${value}`);
  });
  return failures;
}
