import { whitenRows, type WhitenedSums } from '../engine/kalman-filter.js';
import type { StateSpace } from '../engine/state-space.js';

/**
 * The filter of one shift position with its first rows shared (issue 14).
 *
 * For a model whose state-space rows before the shift (i < s) depend only on
 * the first `axes` process values (a mode shift: the first segment's
 * variance), the filter's state after those rows is the same for every
 * value of the later axes. The shift search varies the later axes most (the
 * nested search holds the outer axis while it searches the inner one), so
 * the state after row s is kept per value of the first axes and the pass
 * resumes from it through `whitenRows` of `engine/kalman-filter.ts`, the
 * loop `whiten` itself runs, so the sums are the same bit for bit
 * (`test/fit/prefix-filter.test.ts`).
 *
 * The kept state: the filtered latent deviations of the data and of every
 * design column, the filtered variance, the running ln det (sum of logs and
 * the pending product), the singular flag and the QR factor so far (R, z and
 * the residual).
 *
 * @example
 * // Stasis then a walk, shift at horizon 4: rows 0..3 depend on the first variance only, so a second pass with the
 * // same first variance resumes after them, with the same result bit for bit.
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 0.1, -0.1, 0, 1, 2, 2.5, 4], samplingVariance: Array(8).fill(0.01) });
 * const model = bindConfiguration(modeShift('stasis', 'random-walk'), { shifts: [4] });
 * const evaluator = new LikelihoodEvaluator(model, lineage);
 * evaluator.prefix.rows; // 4
 * evaluator.profile([0.01, 0.5]);
 * const resumed = evaluator.profile([0.01, 0.7]);
 * evaluator.prefix.resumed; // 1
 * resumed === new LikelihoodEvaluator(model, lineage).profile([0.01, 0.7]); // true
 */
export class PrefixFilter {
  /** Rows shared: 0 .. rows - 1. */
  readonly rows: number;
  /** Process values the shared rows depend on (the first `axes`). */
  readonly axes: number;
  /** Passes resumed from a kept state (for tests and the benchmark). */
  resumed = 0;
  private readonly width: number;
  private readonly stateSize: number;
  private readonly kept = new Map<number | string, Float64Array>();

  constructor(rows: number, axes: number, width: number) {
    this.rows = rows;
    this.axes = axes;
    this.width = width;
    this.stateSize = width + 1 + 5 + width * width + width;
  }

  /** States are kept per value of the first axes; beyond this many the store starts afresh (bounded memory). */
  static readonly keptStates = 4096;

  private key(process: ArrayLike<number>): number | string {
    if (this.axes === 1) return process[0];
    return Array.prototype.slice.call(process, 0, this.axes).join(',');
  }

  /**
   * `whiten(space, data, sums, work)` of `engine/kalman-filter.ts`, resuming
   * after the shared rows when a pass with the same first process values
   * was run before. `space` must be filled at `process`.
   */
  whiten(space: StateSpace, data: Float64Array, sums: WhitenedSums, work: Float64Array, process: ArrayLike<number>): WhitenedSums {
    for (let k = 0; k < this.axes; k++) if (Number.isNaN(process[k])) return whitenRows(space, data, sums, work, this.rows, null, false);
    const key = this.key(process);
    const state = this.kept.get(key);
    if (state !== undefined) {
      this.resumed += 1;
      return whitenRows(space, data, sums, work, this.rows, state, true);
    }
    if (this.kept.size >= PrefixFilter.keptStates) this.kept.clear();
    const fresh = new Float64Array(this.stateSize);
    this.kept.set(key, fresh);
    return whitenRows(space, data, sums, work, this.rows, fresh, false);
  }
}
