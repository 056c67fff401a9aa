import type { Lineage } from '../lineage.js';
import type { ProcessAxis } from '../models/model.js';

/**
 * Step, in ln units of each process parameter, of the finite-difference
 * stencils. Rounding noise in the log-likelihood (about 1e-15 of its terms;
 * the evaluator centres the trait) gives a gradient noise near 1e-12 / step
 * ≈ 5e-13; the five-point gradient's truncation error, step^4 / 30 times the
 * fifth derivative, moves the root by about 5e-13 relative (for stasis with
 * e = 0, exactly step^4 / 30 of the variance: 3e-10 at step 1e-2, which the
 * closed-form test in test/fit/closed-forms.test.ts would catch). It is also
 * the same function of the surface for any two data sets that differ only by
 * rounding, so it does not break the invariances.
 */
const stencilStep = 2e-3;
/** Largest Newton step (ln units) accepted: the value-only search is already within ~1e-7 of the root. */
const largestStep = 1e-3;
/** Newton iterations at most; one normally reaches the root to rounding. */
const iterations = 4;
/** A Newton step (ln units) after which the error is of order its square: the polish stops. */
const quadraticEnough = 1e-6;

/** A polished maximum: process values and the log-likelihood there. */
export interface PolishedMaximum {
  readonly process: number[];
  readonly logLik: number;
  /** The last Newton step was below {@link quadraticEnough}: the point is a stationary point to rounding. */
  readonly converged: boolean;
}

/** Options of {@link polishMaximum}. */
export interface PolishOptions {
  /** Largest Newton step (ln units) taken; a larger one refuses the polish (default {@link largestStep}). */
  readonly largestStep?: number;
  /**
   * Halve a step that lowers the log-likelihood (up to 20 times) instead of
   * refusing: for starts further from the maximum (a warm start from a
   * neighbouring profile point).
   */
  readonly backtrack?: boolean;
  /** Newton iterations at most (default {@link iterations}). */
  readonly iterations?: number;
  /**
   * The gradient of `evaluate` in natural units at the same process values
   * (`LikelihoodEvaluator.profileScore`). When given, the Newton steps use it
   * (in ln units: value times the natural-unit derivative) instead of
   * finite differences of values, and the Hessian is its central difference
   * (see {@link polishMaximum}).
   */
  readonly gradient?: (process: number[]) => ArrayLike<number>;
}

/**
 * Step, in ln units, of the central differences of an analytic gradient that
 * give the Hessian. The Hessian only scales the Newton step: its relative
 * error (about step^2 / 6 times the fourth derivative over the second, plus
 * 1e-13 / step of rounding: ~1e-9) slows convergence by that factor but does
 * not move the root, which is the analytic gradient's.
 */
const gradientStencilStep = 1e-4;

/**
 * Polish an interior maximum found by a value-only search (Brent, Nelder–Mead)
 * by Newton's method on the stationarity condition, with the gradient and
 * Hessian of the log-likelihood in ln(process values) taken by central
 * finite differences.
 *
 * Why: a search that only compares function values can place a maximum no
 * more finely than about sqrt(machine epsilon) of the scale of the parameter,
 * because near the maximum the function changes by less than its rounding
 * noise (Press et al., Numerical Recipes, 3rd ed. 2007, section 10.1; from
 * memory). Two data sets that differ only by rounding (the trait with a
 * constant added) then give estimates that differ at ~1e-8. The root of the
 * gradient is located by differences of values taken a fixed step apart,
 * which rounding noise barely moves (Nocedal & Wright, Numerical
 * Optimization, 2nd ed. 2006, section 8.1; from memory).
 *
 * Stencils (Abramowitz & Stegun 1964, 25.3.6 and 25.3.24; from memory):
 * f' ≈ [f(−2h) − 8f(−h) + 8f(h) − f(2h)] / 12h,
 * f'' ≈ [−f(−2h) + 16f(−h) − 30f(0) + 16f(h) − f(2h)] / 12h²,
 * and the cross term [f(h,h) − f(h,−h) − f(−h,h) + f(−h,−h)] / 4h².
 *
 * Only axes listed in `free` move (interior maxima). The polish is refused —
 * the input is returned — when a stencil point leaves an axis's range, the
 * Hessian is not negative definite, a step is larger than {@link largestStep},
 * or the polished value is lower than the start by more than rounding.
 *
 * @param evaluate profile log-likelihood at process values
 * @param free indices of the axes to move
 *
 * @example
 * // A start 1e-3 off the walk's maximum at q = 2 (closed form) is polished onto it.
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [1e-12, 1e-12, 1e-12, 1e-12] });
 * const evaluator = new LikelihoodEvaluator(randomWalk, lineage);
 * const start = { process: [2.001], logLik: evaluator.profile([2.001]) };
 * const polished = polishMaximum((process) => evaluator.profile(process), randomWalk.process, lineage, start, [0]);
 * polished.process[0]; // 2 (to 1e-9)
 * polished.converged; // true
 */
export function polishMaximum(
  evaluate: (process: number[]) => number,
  axes: readonly ProcessAxis[],
  lineage: Lineage,
  start: { readonly process: readonly number[]; readonly logLik: number },
  free: readonly number[],
  options: PolishOptions = {},
): PolishedMaximum {
  const unchanged = { process: start.process.slice(), logLik: start.logLik, converged: false };
  const stepLimit = options.largestStep ?? largestStep;
  let converged = false;
  if (free.length === 0 || !Number.isFinite(start.logLik)) return unchanged;
  if (options.gradient !== undefined) return polishWithGradient(evaluate, options.gradient, axes, lineage, start, free, options);
  const dimension = free.length;
  const h = stencilStep;
  let logs = free.map((level) => Math.log(start.process[level]));
  if (!logs.every(Number.isFinite)) return unchanged;
  /** Value at these ln values of the free axes, or NaN when a point leaves the nested ranges. */
  const at = (trial: readonly number[]): number => valueOf(evaluate, processWithin(start, free, axes, lineage, trial));
  let centreValue = start.logLik;
  for (let iteration = 0; iteration < (options.iterations ?? iterations); iteration++) {
    const gradient = new Array<number>(dimension);
    const hessian: number[][] = Array.from({ length: dimension }, () => new Array<number>(dimension).fill(0));
    const shifted = (offsets: ReadonlyArray<readonly [number, number]>): number => {
      const trial = logs.slice();
      for (const [j, offset] of offsets) trial[j] += offset;
      return at(trial);
    };
    for (let j = 0; j < dimension; j++) {
      const m2 = shifted([[j, -2 * h]]);
      const m1 = shifted([[j, -h]]);
      const p1 = shifted([[j, h]]);
      const p2 = shifted([[j, 2 * h]]);
      gradient[j] = (m2 - 8 * m1 + 8 * p1 - p2) / (12 * h);
      hessian[j][j] = (-m2 + 16 * m1 - 30 * centreValue + 16 * p1 - p2) / (12 * h * h);
    }
    for (let j = 0; j < dimension; j++) {
      for (let k = j + 1; k < dimension; k++) {
        const cross =
          (shifted([[j, h], [k, h]]) - shifted([[j, h], [k, -h]]) - shifted([[j, -h], [k, h]]) + shifted([[j, -h], [k, -h]])) / (4 * h * h);
        hessian[j][k] = cross;
        hessian[k][j] = cross;
      }
    }
    if (!gradient.every(Number.isFinite) || !hessian.every((row) => row.every(Number.isFinite))) return unchanged;
    const moved = newtonMove(logs, hessian, gradient, centreValue, at, stepLimit, options.backtrack === true);
    if (moved === null) return unchanged;
    logs = moved.logs;
    centreValue = moved.value;
    if (moved.converged) {
      converged = true;
      break;
    }
  }
  return polishedAt(start, free, logs, centreValue, converged);
}

/**
 * {@link polishMaximum} with an analytic gradient: Newton's method on the
 * gradient in ln(process values), the Hessian from central differences of
 * the gradient ({@link gradientStencilStep}), computed at the first iteration
 * and again only after a step larger than 1e-2 (a chord method: from a start
 * within ~1e-7 of the root, the first step already lands within rounding, and
 * each later step shrinks the error by the Hessian's relative error). The
 * refusals are those of the finite-difference polish. Where the value-only
 * polish locates the root of a five-point difference of values (truncation
 * about 5e-13 relative), this locates the root of the exact gradient.
 *
 * Nocedal, J. & Wright, S. J. (2006). Numerical Optimization, 2nd ed.,
 * sections 3.3 and 8.1 (Newton's method with a finite-difference Hessian;
 * from memory).
 */
function polishWithGradient(
  evaluate: (process: number[]) => number,
  gradient: (process: number[]) => ArrayLike<number>,
  axes: readonly ProcessAxis[],
  lineage: Lineage,
  start: { readonly process: readonly number[]; readonly logLik: number },
  free: readonly number[],
  options: PolishOptions,
): PolishedMaximum {
  const unchanged = { process: start.process.slice(), logLik: start.logLik, converged: false };
  const stepLimit = options.largestStep ?? largestStep;
  const dimension = free.length;
  const h = gradientStencilStep;
  let logs = free.map((level) => Math.log(start.process[level]));
  if (!logs.every(Number.isFinite)) return unchanged;
  const processAt = (trial: readonly number[]): number[] | null => processWithin(start, free, axes, lineage, trial);
  const valueAt = (trial: readonly number[]): number => valueOf(evaluate, processAt(trial));
  /** Gradient in ln units of the free axes, or null outside the ranges or where it is not finite. */
  const slopesAt = (trial: readonly number[]): number[] | null => {
    const process = processAt(trial);
    if (process === null) return null;
    const full = gradient(process);
    const slopes = free.map((level) => full[level] * process[level]);
    return slopes.every(Number.isFinite) ? slopes : null;
  };
  let centreValue = start.logLik;
  let hessian: number[][] | null = null;
  let converged = false;
  for (let iteration = 0; iteration < (options.iterations ?? iterations); iteration++) {
    const slopes = slopesAt(logs);
    if (slopes === null) return unchanged;
    if (hessian === null) {
      const rows: number[][] = Array.from({ length: dimension }, () => new Array<number>(dimension).fill(0));
      for (let k = 0; k < dimension; k++) {
        const up = logs.slice();
        const down = logs.slice();
        up[k] += h;
        down[k] -= h;
        const above = slopesAt(up);
        const below = slopesAt(down);
        if (above === null || below === null) return unchanged;
        for (let j = 0; j < dimension; j++) rows[j][k] = (above[j] - below[j]) / (2 * h);
      }
      for (let j = 0; j < dimension; j++) {
        for (let k = j + 1; k < dimension; k++) rows[j][k] = rows[k][j] = 0.5 * (rows[j][k] + rows[k][j]);
      }
      hessian = rows;
    }
    const moved = newtonMove(logs, hessian, slopes, centreValue, valueAt, stepLimit, options.backtrack === true);
    if (moved === null) return unchanged;
    logs = moved.logs;
    centreValue = moved.value;
    if (moved.converged) {
      converged = true;
      break;
    }
    if (moved.step.some((entry) => Math.abs(entry) > 1e-2)) hessian = null;
  }
  return polishedAt(start, free, logs, centreValue, converged);
}

/**
 * The process values with the free axes at these ln values, or null when one
 * leaves its nested range (the ranges of later axes depend on earlier ones).
 */
function processWithin(
  start: { readonly process: readonly number[] },
  free: readonly number[],
  axes: readonly ProcessAxis[],
  lineage: Lineage,
  trial: readonly number[],
): number[] | null {
  const process = start.process.slice();
  free.forEach((level, j) => (process[level] = Math.exp(trial[j])));
  for (const level of free) {
    const [lower, upper] = axes[level].range(lineage, process.slice(0, level));
    if (!(process[level] >= lower && process[level] <= upper)) return null;
  }
  return process;
}

/** The value at `process`, NaN outside the ranges (null) or where it is not finite. */
function valueOf(evaluate: (process: number[]) => number, process: number[] | null): number {
  const value = process === null ? Number.NaN : evaluate(process);
  return Number.isFinite(value) ? value : Number.NaN;
}

/**
 * What a polish returns: the point it reached, or the start unchanged when
 * the reached value is below the start's (beyond rounding).
 */
function polishedAt(
  start: { readonly process: readonly number[]; readonly logLik: number },
  free: readonly number[],
  logs: readonly number[],
  value: number,
  converged: boolean,
): PolishedMaximum {
  if (value < start.logLik - 1e-12 * (1 + Math.abs(start.logLik))) return { process: start.process.slice(), logLik: start.logLik, converged: false };
  const process = start.process.slice();
  free.forEach((level, j) => (process[level] = Math.exp(logs[j])));
  return { process, logLik: value, converged };
}

/**
 * One Newton step from `logs` (ln-scale process values) with the given
 * gradient and Hessian, halved (with `backtrack`) while it goes downhill;
 * tiny steps are taken as they are, since their value differs by rounding
 * only. Null when the step cannot be taken (singular Hessian, a step longer
 * than `stepLimit`, or a non-finite value); `converged` when an undamped step
 * was below {@link quadraticEnough} (Newton converges quadratically: the next
 * step would be below rounding). Both polishes take their steps here: the
 * finite-difference one and the one on the analytic gradient.
 */
function newtonMove(
  logs: readonly number[],
  hessian: readonly (readonly number[])[],
  gradient: readonly number[],
  centreValue: number,
  at: (logs: number[]) => number,
  stepLimit: number,
  backtrack: boolean,
): { logs: number[]; value: number; step: number[]; converged: boolean } | null {
  let step = newtonStep(hessian, gradient);
  if (step === null || step.some((value) => Math.abs(value) > stepLimit)) return null;
  let trial = logs.map((value, j) => value + (step as number[])[j]);
  let value = at(trial);
  let halvings = 0;
  for (; backtrack && halvings < 20 && step.some((entry) => Math.abs(entry) > quadraticEnough) && !(value >= centreValue); halvings++) {
    step = step.map((entry) => entry / 2);
    trial = logs.map((entry, j) => entry + (step as number[])[j]);
    value = at(trial);
  }
  if (!Number.isFinite(value)) return null;
  return { logs: trial, value, step, converged: halvings === 0 && step.every((entry) => Math.abs(entry) <= quadraticEnough) };
}

/**
 * The Newton step −H⁻¹g by Cholesky factorisation of −H; null when −H is not
 * positive definite (not a maximum, or too flat to polish).
 */
function newtonStep(hessian: readonly (readonly number[])[], gradient: readonly number[]): number[] | null {
  const n = gradient.length;
  const factor: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = -hessian[i][j];
      for (let k = 0; k < j; k++) sum -= factor[i][k] * factor[j][k];
      if (i === j) {
        if (!(sum > 0)) return null;
        factor[i][i] = Math.sqrt(sum);
      } else factor[i][j] = sum / factor[j][j];
    }
  }
  // Solve (−H) s = g: forward then back substitution.
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let sum = gradient[i];
    for (let k = 0; k < i; k++) sum -= factor[i][k] * y[k];
    y[i] = sum / factor[i][i];
  }
  const s = new Array<number>(n);
  for (let i = n - 1; i >= 0; i--) {
    let sum = y[i];
    for (let k = i + 1; k < n; k++) sum -= factor[k][i] * s[k];
    s[i] = sum / factor[i][i];
  }
  return s;
}
