import type { Lineage } from '../lineage.js';
import type { ProcessAxis } from '../models/model.js';
import { brentMaximize, nelderMead } from './optimise.js';
import { polishMaximum } from './polish.js';
import { slopeMaximize, warmSlopeSearch, type ValueSlope } from './slope-search.js';

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
   * A warm start (process values, e.g. the maximum at a neighbouring value
   * of a profile likelihood). The search is then: the same grid over every
   * free axis (with the bound 0 where allowed) — whose filter passes the
   * evaluator has usually kept from earlier searches, so it costs little —
   * followed by a Nelder–Mead polish on the ln scale from the best grid point
   * and from the start, instead of the nested Brent refinement. Several times
   * cheaper for the repeated searches of profile intervals, and still global
   * at grid resolution.
   */
  start?: readonly number[];
  /**
   * Finish with a finite-difference Newton polish of the interior axes
   * (`polish.ts`), so that the estimate is located to rounding rather than
   * to the ~1e-8 a value-only search can reach. For the reported estimate;
   * profile searches, which need only the maximum's value, go without.
   */
  polish?: boolean;
  /**
   * The gradient of `evaluate` with respect to the process values, in
   * natural units, at the same process values (e.g. from
   * `LikelihoodEvaluator.profileScore`), when the model provides its state
   * space's derivatives. The one-dimensional refinements then locate the
   * zero of the slope (`slope-search.ts`) instead of searching on values,
   * and the polish uses it instead of finite differences of values. The
   * grids, and so what makes the search global, are unchanged. At an outer
   * axis the slope of the profile (the inner axes maximised) is the partial
   * derivative at the inner maximum (envelope theorem), so one gradient there
   * serves every level.
   */
  gradient?: (process: number[]) => ArrayLike<number>;
}

interface Found {
  logLik: number;
  process: number[];
  positions: AxisPosition[];
}

/**
 * With a gradient, the innermost axis at the outer grid's points after the
 * first is searched from the previous point's inner maximum by the slope,
 * guarded by a grid of 1/guardStride as many points as the full one (8 of 24):
 * every local maximum of that grid outside the followed maximum's cell is
 * screened and refined like a full grid's. Why the search stays global: the
 * followed maximum is exact wherever the inner maximum moves continuously
 * with the outer axis, and a jump to another basin needs that basin to
 * overtake it, which the guard grid sees unless the new basin is narrower
 * than a guard cell (about 4 ln units of a variance: a factor 50) and lies
 * between guard points; the outer axis keeps its full grid, the bound 0 is
 * still tried at every outer point, and the face where the inner variance is
 * 0 is still searched on its own (issue 25's narrow outer peaks).
 */
const guardStride = 3;
/** Half-width, in ln units, of the first bracket of a warm-started axis (a factor e^1.5 ≈ 4.5 each way). */
const warmHalfWidth = 1.5;
/**
 * A warm-started search polishes its best grid point too unless that point's
 * log-likelihood is more than this below the maximum reached from the start.
 */
const gridBasinMargin = 1;
/** Relative x-tolerance of Brent's method on the ln scale. */
const brentTolerance = 1e-9;
/**
 * Screening of the grid's secondary local maxima: Brent to this relative
 * x-tolerance first, and the full refinement only when the value reached is
 * within {@link screenMargin} of the best peak's refined value. Stopping
 * within 1e-3 (relative, ln scale) of a smooth peak leaves its value short
 * by about half the curvature times 1e-6, far below the margin.
 */
const screenTolerance = 1e-3;
const screenMargin = 0.05;

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
 *
 * @example
 * // The walk's profile on increments 1, 2, 1 has its maximum at q = 2 (closed form, see LikelihoodEvaluator).
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [1e-12, 1e-12, 1e-12, 1e-12] });
 * const evaluator = new LikelihoodEvaluator(randomWalk, lineage);
 * const best = maximiseProcess((process) => evaluator.profile(process), randomWalk.process, lineage);
 * best.process[0]; // 2 (to 1e-7)
 * best.positions; // ['interior']
 */
export function maximiseProcess(
  evaluate: (process: number[]) => number,
  axes: readonly ProcessAxis[],
  lineage: Lineage,
  options: SearchOptions = {},
): ProcessMaximum {
  const points = options.points ?? 24;
  const fixed = options.fixed ?? new Map<number, number>();
  const gradient = options.gradient;
  const depth = axes.length;
  const chosen: number[] = new Array(depth).fill(0);
  const leaf = (): Found => {
    const process = chosen.slice();
    return { logLik: evaluate(process), process, positions: [] };
  };
  // `hint`: warm start for this level and the ones below (null = full grid). `guarded`: with a hint, the innermost
  // axis is searched from it by the slope and a coarse guard grid (see guardStride), not by the slope alone.
  const recurse = (level: number, hint: readonly number[] | null, guarded = false): Found => {
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
    let lastInner: Found | null = null;
    const innerAt = (logValue: number, innerHint: readonly number[] | null, innerGuarded = false): number => {
      chosen[level] = Math.exp(logValue);
      const inner = recurse(level + 1, innerHint, innerGuarded);
      consider(inner);
      lastInner = inner;
      return inner.logLik;
    };
    // Value and slope in ln units of this axis (the inner axes maximised), for the slope-based refinements.
    const slopeAt = (logValue: number, innerHint: readonly number[] | null): ValueSlope => {
      chosen[level] = Math.exp(logValue);
      const inner = recurse(level + 1, innerHint);
      consider(inner);
      if (gradient === undefined || !Number.isFinite(inner.logLik)) return { value: inner.logLik, slope: Number.NaN };
      return { value: inner.logLik, slope: gradient(inner.process)[level] * inner.process[level] };
    };
    // Maximum within one grid cell either side of `centre`: by the slope when there is a gradient, else (or when the
    // slope does not bracket a maximum there) by Brent's method on values.
    const refine = (centre: number, left: number, right: number, innerHint: readonly number[] | null, tolerance: number): { at: number; value: number } =>
      (gradient === undefined ? null : slopeMaximize((x) => slopeAt(x, innerHint), centre, left, right, tolerance)) ??
      brentMaximize((x) => innerAt(x, innerHint), left, right, tolerance);
    const startValue = hint?.[level];
    let at = Number.NaN;
    // A guarded start at the bound 0 (the previous inner maximum was there) starts at the lower end of the range.
    if (hint !== null && startValue !== undefined && (startValue > 0 || (guarded && startValue === 0)) && Number.isFinite(startValue)) {
      const from = startValue === 0 ? logLower : Math.min(logUpper, Math.max(logLower, Math.log(startValue)));
      const warm = gradient === undefined ? null : warmSlopeSearch((x) => slopeAt(x, hint), from, logLower, logUpper, warmHalfWidth, brentTolerance);
      if (!guarded) at = warm !== null ? warm.at : warmSearch((x) => innerAt(x, hint), from, logLower, logUpper);
      else if (warm !== null) {
        // The innermost axis at the next point of an outer grid, started from the maximum at the previous point:
        // the slope search above follows that maximum; a coarse guard grid catches another basin that overtakes
        // it, each of its local maxima refined (screened first) as in the full grid's path below.
        at = warm.at;
        let atValue = warm.value;
        const count = Math.max(4, Math.ceil(points / guardStride));
        const step = (logUpper - logLower) / (count - 1);
        const guardAt = (k: number): number => (k === count - 1 ? logUpper : logLower + k * step);
        const values = new Array<number>(count);
        let bestIndex = 0;
        for (let k = 0; k < count; k++) {
          const value = innerAt(guardAt(k), hint);
          values[k] = Number.isFinite(value) ? value : Number.NEGATIVE_INFINITY;
          if (values[k] > values[bestIndex]) bestIndex = k;
        }
        for (const k of gridPeaks(values, bestIndex)) {
          const centre = guardAt(k);
          if (!Number.isFinite(values[k]) || Math.abs(centre - warm.at) < step) continue;
          const left = Math.max(logLower, centre - step);
          const right = Math.min(logUpper, centre + step);
          if (refine(centre, left, right, hint, screenTolerance).value < atValue - screenMargin) continue;
          const refined = refine(centre, left, right, hint, brentTolerance);
          if (refined.value > atValue) {
            at = refined.at;
            atValue = refined.value;
          }
        }
      }
    }
    if (Number.isNaN(at)) {
      // Grid over the whole range, then Brent within the neighbours of the best grid point and of every
      // other local maximum of the grid (a narrow interior peak can sit between grid points whose values
      // are below the best one, e.g. a directional walk's step variance whose best grid value is next to
      // the bound 0: issue 25), the inner axes warm-started from the inner maximum at that grid point.
      const step = (logUpper - logLower) / (points - 1);
      const gridAt = (k: number): number => (k === points - 1 ? logUpper : logLower + k * step);
      const values = new Array<number>(points);
      const innerBest: Array<Found | null> = new Array(points).fill(null);
      let bestIndex = 0;
      let bestValue = Number.NEGATIVE_INFINITY;
      // With a gradient, the innermost axis at each outer grid point after the first starts from the inner maximum
      // at the previous one (guarded: see guardStride) instead of a full grid of its own.
      const continued = gradient !== undefined && hint === null && level + 2 === depth && !fixed.has(level + 1);
      let previous: Found | null = null;
      for (let k = 0; k < points; k++) {
        const value = continued && previous !== null && Number.isFinite(previous.logLik) ? innerAt(gridAt(k), previous.process, true) : innerAt(gridAt(k), hint === null ? null : hint);
        previous = lastInner as Found | null;
        values[k] = Number.isFinite(value) ? value : Number.NEGATIVE_INFINITY;
        innerBest[k] = best;
        if (Number.isFinite(value) && value > bestValue) {
          bestValue = value;
          bestIndex = k;
        }
      }
      at = gridAt(bestIndex);
      if (bestValue !== Number.NEGATIVE_INFINITY) {
        let atValue = bestValue;
        for (const k of gridPeaks(values, bestIndex)) {
          const innerHint = level + 1 < depth ? innerBest[k]?.process ?? hint : hint;
          const centre = gridAt(k);
          const left = Math.max(logLower, centre - step);
          const right = Math.min(logUpper, centre + step);
          // Another local maximum of the grid is first located coarsely; one that then stays clearly below the
          // best peak's refined value cannot win and is not refined further.
          if (k !== bestIndex && refine(centre, left, right, innerHint, screenTolerance).value < atValue - screenMargin) continue;
          const refined = refine(centre, left, right, innerHint, brentTolerance);
          if (k === bestIndex ? refined.value >= atValue : refined.value > atValue) {
            at = refined.at;
            atValue = refined.value;
          }
        }
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
  if (options.start !== undefined) return gridAndPolish(evaluate, axes, lineage, points, fixed, options.start);
  let nested = recurse(0, null);
  // An inner axis whose bound 0 wins over part of the outer range makes the outer profile the upper envelope of
  // two smooth curves, with a narrow peak where the curve at 0 is on top, which a grid and Brent on the envelope
  // can step over (ou: step_variance 0 only near one alpha; issue 25). So the face where that axis is 0 is
  // searched as a problem of its own too.
  for (let level = 1; level < depth; level++) {
    if (!axes[level].allowZero || fixed.has(level)) continue;
    const face = maximiseProcess(evaluate, axes, lineage, { points, fixed: new Map([...fixed, [level, 0]]), gradient });
    if (face.logLik > nested.logLik + flatTolerance * Math.max(1, Math.abs(nested.logLik))) {
      nested = { logLik: face.logLik, process: face.process, positions: face.positions.map((position, other) => (other === level ? 'zero' : position)) };
    }
  }
  const result = preferEnds(evaluate, axes, lineage, fixed, nested, gradient);
  if (options.polish) {
    const free = result.positions.flatMap((position, level) => (position === 'interior' && !fixed.has(level) ? [level] : []));
    const polished = polishMaximum(evaluate, axes, lineage, result, free, { gradient });
    return { process: polished.process, logLik: polished.logLik, positions: result.positions };
  }
  return { process: result.process, logLik: result.logLik, positions: result.positions };
}

/** Most local maxima of one grid that are refined by Brent's method (besides the best grid point). */
export const gridPeaksRefined = 6;

/**
 * Indices of a grid's points to refine: the best one first, then the other
 * local maxima (a value at least its left neighbour's and above its right
 * neighbour's; an end counts against its one neighbour), highest first, at
 * most {@link gridPeaksRefined} of them.
 *
 * @example
 * gridPeaks([0, 3, 1, 2, 1, 5, 4], 5); // [5, 1, 3] (the best, then the other local maxima, highest first)
 */
export function gridPeaks(values: readonly number[], bestIndex: number): number[] {
  const peaks: number[] = [];
  for (let k = 0; k < values.length; k++) {
    if (k === bestIndex || !Number.isFinite(values[k])) continue;
    const left = k > 0 ? values[k - 1] : Number.NEGATIVE_INFINITY;
    const right = k + 1 < values.length ? values[k + 1] : Number.NEGATIVE_INFINITY;
    if (values[k] >= left && values[k] > right) peaks.push(k);
  }
  peaks.sort((a, b) => values[b] - values[a] || a - b);
  return [bestIndex, ...peaks.slice(0, gridPeaksRefined)];
}

/**
 * Log-likelihood differences smaller than this (relative to |logL|, at least
 * this absolute) are rounding: the data cannot tell the two points apart.
 */
const flatTolerance = 1e-10;

/**
 * Move an interior maximum to a bound or limit of an axis when the
 * likelihood there, the other axes unchanged, is the same to rounding
 * ({@link flatTolerance}): a variance indistinguishable from 0 is reported
 * as 0, and an ou alpha on the plateau where e^(−alpha·Δt) has underflowed
 * (ou indistinguishable from stasis; the other axes maximised again at the
 * limit, since it is approached along a ridge) is reported at its alpha → ∞ limit,
 * instead of an arbitrary point of the plateau. Without this the reported
 * value on a plateau depends on the search's path, so it would change with
 * the unit of time or a constant added to the trait (issue 6 invariances).
 */
function preferEnds(
  evaluate: (process: number[]) => number,
  axes: readonly ProcessAxis[],
  lineage: Lineage,
  fixed: ReadonlyMap<number, number>,
  found: Found,
  gradient?: (process: number[]) => ArrayLike<number>,
): Found {
  if (!Number.isFinite(found.logLik)) return found;
  let result = found;
  const tolerance = flatTolerance * Math.max(1, Math.abs(found.logLik));
  for (let level = 0; level < axes.length; level++) {
    if (fixed.has(level) || result.positions[level] !== 'interior') continue;
    const axis = axes[level];
    const [lower, upper] = axis.range(lineage, result.process.slice(0, level));
    const ends: Array<[number, AxisPosition]> = [];
    if (axis.allowZero) ends.push([0, 'zero']);
    else if (axis.limitNames?.[0]) ends.push([lower, 'range-lower']);
    if (axis.limitNames?.[1]) ends.push([upper, 'range-upper']);
    const othersFree = axes.some((_, other) => other !== level && !fixed.has(other));
    for (const [value, position] of ends) {
      let process = result.process.slice();
      process[level] = value;
      let logLik = evaluate(process);
      let positions = result.positions.slice();
      positions[level] = position;
      if (!(logLik >= found.logLik - tolerance) && othersFree && position !== 'zero' && axis.limitNames?.[position === 'range-upper' ? 1 : 0]) {
        // A limit can be approached along a ridge (ou: alpha and step_variance growing together, the
        // stationary variance fixed), so there the other axes are maximised again. (A bound 0 allowed
        // on the axis was already searched over the other axes by the nested search.)
        const ridge = maximiseProcess(evaluate, axes, lineage, { fixed: new Map([...fixed, [level, value]]), points: 12, gradient });
        process = ridge.process;
        logLik = ridge.logLik;
        positions = ridge.positions.slice();
        positions[level] = position;
      }
      if (Number.isFinite(logLik) && logLik >= found.logLik - tolerance) {
        result = { process, logLik, positions };
        break;
      }
    }
  }
  return result;
}

/**
 * Grid over every free axis (nested ranges, 0 added where allowed), then a
 * Nelder–Mead polish on the ln scale of the axes that are not at 0, from the
 * best grid point and from `start`; values are clamped into their ranges.
 */
function gridAndPolish(
  evaluate: (process: number[]) => number,
  axes: readonly ProcessAxis[],
  lineage: Lineage,
  points: number,
  fixed: ReadonlyMap<number, number>,
  start: readonly number[],
): ProcessMaximum {
  const depth = axes.length;
  const chosen: number[] = new Array(depth).fill(0);
  let best: number[] | null = null;
  let bestValue = Number.NEGATIVE_INFINITY;
  // The grid in enumeration order (for the local maxima along a single free axis).
  const visited: Array<{ process: number[]; value: number }> = [];
  const offer = (process: number[], value: number): void => {
    if (Number.isFinite(value) && (best === null || value > bestValue)) {
      best = process.slice();
      bestValue = value;
    }
  };
  const enumerate = (level: number): void => {
    if (level === depth) {
      const value = evaluate(chosen.slice());
      visited.push({ process: chosen.slice(), value });
      offer(chosen, value);
      return;
    }
    const fixedValue = fixed.get(level);
    if (fixedValue !== undefined) {
      chosen[level] = fixedValue;
      enumerate(level + 1);
      return;
    }
    const axis = axes[level];
    const [lower, upper] = axis.range(lineage, chosen.slice(0, level));
    const logLower = Math.log(lower);
    const step = (Math.log(upper) - logLower) / (points - 1);
    for (let k = 0; k < points; k++) {
      chosen[level] = k === points - 1 ? upper : Math.exp(logLower + k * step);
      enumerate(level + 1);
    }
    if (axis.allowZero) {
      chosen[level] = 0;
      enumerate(level + 1);
    }
  };
  enumerate(0);
  // Clamp a candidate into the nested ranges (axes at 0 or fixed stay put).
  const clamp = (process: number[]): number[] => {
    const clamped = process.slice();
    for (let level = 0; level < depth; level++) {
      const fixedValue = fixed.get(level);
      if (fixedValue !== undefined) {
        clamped[level] = fixedValue;
        continue;
      }
      if (clamped[level] === 0 && axes[level].allowZero) continue;
      const [lower, upper] = axes[level].range(lineage, clamped.slice(0, level));
      clamped[level] = Math.min(upper, Math.max(lower, clamped[level]));
    }
    return clamped;
  };
  const polish = (from: readonly number[]): void => {
    const free: number[] = [];
    for (let level = 0; level < depth; level++) if (!fixed.has(level) && from[level] > 0 && Number.isFinite(from[level])) free.push(level);
    const base = clamp(from.map((value, level) => (fixed.has(level) ? (fixed.get(level) as number) : value > 0 || (value === 0 && axes[level].allowZero) ? value : axes[level].range(lineage, [])[0])));
    if (free.length === 0) {
      offer(base, evaluate(base.slice()));
      return;
    }
    const at = (logs: number[]): number[] => {
      const process = base.slice();
      free.forEach((level, j) => (process[level] = Math.exp(logs[j])));
      return clamp(process);
    };
    // Two or more free axes: Newton on finite differences from here (a warm start is near the maximum),
    // which needs a few dozen evaluations; when it does not converge, a simplex and Brent passes instead.
    if (free.length > 1) {
      const newton = polishMaximum(evaluate, axes, lineage, { process: base, logLik: evaluate(base.slice()) }, free, { largestStep: 2, backtrack: true, iterations: 8 });
      if (newton.converged) {
        offer(newton.process, newton.logLik);
        return;
      }
    }
    // One free axis: Brent alone does it; more: a simplex first.
    const found = free.length === 1
      ? { at: [Math.log(base[free[0]])] }
      : nelderMead((logs) => -evaluate(at(logs)), free.map((level) => Math.log(base[level])), {
          step: free.map(() => 0.3),
          tolerance: 1e-10,
          restarts: 1,
          maxEvaluations: 300 * free.length,
        });
    // Then one Brent pass along each axis (the simplex can stall on a ridge that runs into a range end).
    const logs = found.at.slice();
    for (let j = 0; j < free.length; j++) {
      const level = free[j];
      const [lower, upper] = axes[level].range(lineage, at(logs).slice(0, level));
      const along = (x: number): number => {
        const trial = logs.slice();
        trial[j] = x;
        return evaluate(at(trial));
      };
      logs[j] = warmSearch(along, Math.min(Math.log(upper), Math.max(Math.log(lower), logs[j])), Math.log(lower), Math.log(upper));
    }
    if (free.length > 1) {
      const polished = at(found.at);
      offer(polished, evaluate(polished.slice()));
    }
    const process = at(logs);
    offer(process, evaluate(process.slice()));
  };
  // Polish from both: the start tracks the neighbouring maximum, the grid point guards against a jump to
  // another basin. The start first; the grid point only when it is not already well below what the
  // start reached (a grid point more than gridBasinMargin below is in the same basin or a lower one).
  const gridBest = best as number[] | null;
  const gridValue = bestValue;
  const startUsable = start.length === depth && start.every((value) => Number.isFinite(value) && value >= 0);
  if (startUsable) polish(start);
  if (gridBest !== null && (!startUsable || gridValue > bestValue - gridBasinMargin)) polish(gridBest);
  // One free axis: also polish from the grid's other local maxima (a narrow peak between grid points, issue 25).
  const freeAxes = axes.flatMap((_, level) => (fixed.has(level) ? [] : [level]));
  if (freeAxes.length === 1) {
    const line = visited.filter((point) => point.process[freeAxes[0]] > 0);
    const values = line.map((point) => (Number.isFinite(point.value) ? point.value : Number.NEGATIVE_INFINITY));
    const top = values.indexOf(Math.max(...values));
    if (top >= 0) for (const k of gridPeaks(values, top).slice(1)) polish(line[k].process);
  }
  const result = (best ?? clamp(start.slice())) as number[];
  const logLik = best === null ? Number.NEGATIVE_INFINITY : bestValue;
  const positions: AxisPosition[] = result.map((value, level) => {
    if (fixed.has(level)) return 'interior';
    const [lower, upper] = axes[level].range(lineage, result.slice(0, level));
    return value === 0 ? 'zero' : value <= lower * (1 + 1e-8) ? 'range-lower' : value >= upper * (1 - 1e-8) ? 'range-upper' : 'interior';
  });
  return { process: result, logLik, positions };
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
