import type { Lineage } from '../lineage.js';
import type { ProcessAxis } from '../models/model.js';
import { gridMaximize } from './optimise.js';

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
}

/**
 * Maximise a log-likelihood over the process (nonlinear) parameters by a
 * nested search: axis by axis, a log-spaced grid over the model's range then
 * Brent's method around the best grid point, with the inner axes maximised
 * at every trial value; a variance's bound 0 is tried as a candidate of its
 * own. For the one- and two-axis models of this project this is exhaustive
 * enough to find the global maximum of the smooth profile surfaces and
 * reports when the best value lies at a bound or at the end of the range (a limit).
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
  const chosen: number[] = new Array(axes.length).fill(0);
  const recurse = (level: number): { logLik: number; process: number[]; positions: AxisPosition[] } => {
    if (level === axes.length) return { logLik: evaluate([...chosen]), process: [...chosen], positions: [] };
    const fixedValue = fixed.get(level);
    if (fixedValue !== undefined) {
      chosen[level] = fixedValue;
      const inner = recurse(level + 1);
      return { ...inner, positions: ['interior', ...inner.positions] };
    }
    const axis = axes[level];
    const [lower, upper] = axis.range(lineage, chosen.slice(0, level));
    let bestInner: { logLik: number; process: number[]; positions: AxisPosition[] } | null = null;
    const innerAt = (logValue: number): number => {
      chosen[level] = Math.exp(logValue);
      const inner = recurse(level + 1);
      if (bestInner === null || inner.logLik > bestInner.logLik) bestInner = inner;
      return inner.logLik;
    };
    const logLower = Math.log(lower);
    const logUpper = Math.log(upper);
    const found = gridMaximize(innerAt, logLower, logUpper, points, 1e-9);
    // Re-evaluate at the reported point so process values and logL match exactly.
    chosen[level] = Math.exp(found.at);
    let best = recurse(level + 1);
    const candidate = bestInner as { logLik: number; process: number[]; positions: AxisPosition[] } | null;
    if (candidate !== null && candidate.logLik > best.logLik) best = candidate;
    if (axis.allowZero) {
      chosen[level] = 0;
      const atZero = recurse(level + 1);
      if (atZero.logLik >= best.logLik) best = atZero;
    }
    chosen[level] = best.process[level];
    const value = best.process[level];
    const position: AxisPosition =
      value === 0 ? 'zero' : value <= lower * (1 + 1e-8) ? 'range-lower' : value >= upper * (1 - 1e-8) ? 'range-upper' : 'interior';
    return { logLik: best.logLik, process: best.process, positions: [position, ...best.positions] };
  };
  const result = recurse(0);
  return { process: result.process, logLik: result.logLik, positions: result.positions };
}
