import type { Lineage } from '../lineage.js';
import type { ProcessAxis } from '../models/model.js';
import { brentMaximize } from './optimise.js';

/** Where the nested search found the maximum of one axis. */
export type AxisPosition = 'interior' | 'zero' | 'range-lower' | 'range-upper';

/** Best process values found by {@link maximiseProcess}. */
export interface ProcessMaximum {
  readonly process: number[];
  readonly logLik: number;
  readonly positions: AxisPosition[];
}

/** Options of the nested search. */
export interface SearchOptions {
  /** Grid points per axis before Brent refinement (default 24). */
  points?: number;
  /** Axis values held fixed (by axis index), for profile likelihoods. */
  fixed?: ReadonlyMap<number, number>;
  /**
   * A warm start (process values, e.g. the maximum of a neighbouring
   * profile point): every free axis is then searched by Brent's method in a
   * bracket around its start value, widened while the maximum sits on the
   * bracket's edge, instead of by a grid over the whole range. Much cheaper,
   * but it finds the maximum nearest the start, not necessarily the global
   * one, so use it only where the start is known to be close. A start value
   * of 0 (or a non-finite one) makes that axis fall back to the grid.
   */
  start?: readonly number[];
}

interface Found {
  logLik: number;
  process: number[];
  positions: AxisPosition[];
}

/** Half-width, in ln units, of the first bracket of a warm-started axis (a factor e^1.5 ≈ 4.5 each way). */
const warmHalfWidth = 1.5;
/** Relative x-tolerance of Brent's method on the ln scale. */
const brentTolerance = 1e-9;

/**
 * Maximise a log-likelihood over the process (nonlinear) parameters by a
 * nested search: axis by axis, a log-spaced grid over the model's range then
 * Brent's method around the best grid point, with the inner axes maximised
 * at every trial value; a variance's bound 0 is tried as a candidate of its
 * own. For the one- and two-axis models of this project this is exhaustive
 * enough to find the global maximum of the smooth profile surfaces and
 * reports when the best value lies at a bound or at the end of the range (a limit).
 *
 * Cost: the grid over each axis is what makes the search global, so it is
 * kept; during the Brent refinement of an outer axis (steps within one grid
 * cell of the best grid point) the inner axes are warm-started from the inner
 * maximum at that grid point rather than searched over their whole range
 * again, which cuts the evaluations of a two-axis search by about half and
 * changes the maximum found only within Brent's tolerance.
 *
 * @param evaluate log-likelihood at given process values (location parameters profiled)
 */
export function maximiseProcess(
  evaluate: (process: number[]) => number,
  axes: readonly ProcessAxis[],
  lineage: Lineage,
  options: SearchOptions = {},
): ProcessMaximum {
  const points = options.points ?? 24;
  const fixed = options.fixed ?? new Map<number, number>();
  const depth = axes.length;
  const chosen: number[] = new Array(depth).fill(0);
  const leaf = (): Found => {
    const process = chosen.slice();
    return { logLik: evaluate(process), process, positions: [] };
  };
  // `hint`: warm start for this level and the ones below (null = full grid).
  const recurse = (level: number, hint: readonly number[] | null): Found => {
    if (level === depth) return leaf();
    const fixedValue = fixed.get(level);
    if (fixedValue !== undefined) {
      chosen[level] = fixedValue;
      const inner = recurse(level + 1, hint);
      inner.positions.unshift('interior');
      return inner;
    }
    const axis = axes[level];
    const [lower, upper] = axis.range(lineage, chosen.slice(0, level));
    const logLower = Math.log(lower);
    const logUpper = Math.log(upper);
    let best: Found | null = null;
    const consider = (found: Found): void => {
      if (best === null || found.logLik > best.logLik || (Number.isNaN(best.logLik) && !Number.isNaN(found.logLik))) best = found;
    };
    const innerAt = (logValue: number, innerHint: readonly number[] | null): number => {
      chosen[level] = Math.exp(logValue);
      const inner = recurse(level + 1, innerHint);
      consider(inner);
      return inner.logLik;
    };
    const startValue = hint?.[level];
    let at: number;
    if (hint !== null && startValue !== undefined && startValue > 0 && Number.isFinite(startValue)) {
      at = warmSearch((x) => innerAt(x, hint), Math.min(logUpper, Math.max(logLower, Math.log(startValue))), logLower, logUpper);
    } else {
      // Grid over the whole range, then Brent within the best grid point's neighbours,
      // the inner axes warm-started from the inner maximum at that grid point.
      const step = (logUpper - logLower) / (points - 1);
      let bestIndex = 0;
      let bestValue = Number.NEGATIVE_INFINITY;
      let bestGrid: Found | null = null;
      for (let k = 0; k < points; k++) {
        const x = k === points - 1 ? logUpper : logLower + k * step;
        const value = innerAt(x, hint === null ? null : hint);
        if (Number.isFinite(value) && value > bestValue) {
          bestValue = value;
          bestIndex = k;
          bestGrid = best;
        }
      }
      const bestX = bestIndex === points - 1 ? logUpper : logLower + bestIndex * step;
      at = bestX;
      if (bestValue !== Number.NEGATIVE_INFINITY) {
        const innerHint = level + 1 < depth ? (bestGrid as Found | null)?.process ?? hint : hint;
        const refined = brentMaximize((x) => innerAt(x, innerHint), Math.max(logLower, bestX - step), Math.min(logUpper, bestX + step), brentTolerance);
        if (refined.value >= bestValue) at = refined.at;
      }
    }
    // Re-evaluate at the reported point so process values and logL match exactly.
    const bestSoFar = best as Found | null;
    chosen[level] = Math.exp(at);
    let result = recurse(level + 1, level + 1 < depth ? bestSoFar?.process ?? hint : hint);
    if (bestSoFar !== null && bestSoFar.logLik > result.logLik) result = bestSoFar;
    if (axis.allowZero) {
      chosen[level] = 0;
      const atZero = recurse(level + 1, hint === null ? null : result.process);
      if (atZero.logLik >= result.logLik) result = atZero;
    }
    chosen[level] = result.process[level];
    const value = result.process[level];
    const position: AxisPosition =
      value === 0 ? 'zero' : value <= lower * (1 + 1e-8) ? 'range-lower' : value >= upper * (1 - 1e-8) ? 'range-upper' : 'interior';
    return { logLik: result.logLik, process: result.process, positions: [position, ...result.positions] };
  };
  const result = recurse(0, options.start ?? null);
  return { process: result.process, logLik: result.logLik, positions: result.positions };
}

/**
 * Brent's method in a bracket of ±{@link warmHalfWidth} around `start`
 * (clipped to the range), moved outward while the maximum sits on an inner
 * edge of the bracket. Returns the best abscissa found.
 */
function warmSearch(f: (x: number) => number, start: number, lower: number, upper: number): number {
  let left = Math.max(lower, start - warmHalfWidth);
  let right = Math.min(upper, start + warmHalfWidth);
  let bestAt = start;
  let bestValue = Number.NEGATIVE_INFINITY;
  for (let attempt = 0; attempt < 40; attempt++) {
    const found = brentMaximize(f, left, right, brentTolerance);
    if (found.value > bestValue || bestValue === Number.NEGATIVE_INFINITY) {
      bestValue = found.value;
      bestAt = found.at;
    }
    const width = right - left;
    const edge = 1e-4 * width;
    if (found.at - left <= edge && left > lower) {
      right = left + 0.1 * width;
      left = Math.max(lower, left - 2 * warmHalfWidth);
    } else if (right - found.at <= edge && right < upper) {
      left = right - 0.1 * width;
      right = Math.min(upper, right + 2 * warmHalfWidth);
    } else break;
    if (found.value < bestValue) break;
  }
  return bestAt;
}
