/**
 * Derivative-free optimisers used by the fitter: Brent's method in one
 * dimension (with a grid to find the basin), Brent's root finder for
 * profile-likelihood interval ends, and Nelder–Mead for more dimensions.
 * All maximise (or find roots of) plain functions and never throw on
 * non-finite values: -Infinity and NaN count as "worst".
 */
import { bracketedRoot } from './root-find.js';

const goldenSection = 0.3819660112501051;

/** A maximiser's answer. */
export interface Maximum {
  readonly at: number;
  readonly value: number;
  readonly evaluations: number;
}

function finiteOrWorst(value: number): number {
  return Number.isFinite(value) ? value : Number.NEGATIVE_INFINITY;
}

/**
 * Brent's method: maximise f on [lower, upper] by golden sections and
 * parabolic steps, to relative tolerance `tolerance` in x.
 *
 * Brent, R. P. (1973). Algorithms for Minimization without Derivatives,
 * ch. 5. Prentice-Hall.
 *
 * @example
 * brentMaximize((x) => -((x - 2) ** 2), 0, 5).at; // 2 (to about 1e-10)
 */
export function brentMaximize(f: (x: number) => number, lower: number, upper: number, tolerance = 1e-10, maxIterations = 200): Maximum {
  let a = lower;
  let b = upper;
  let x = a + goldenSection * (b - a);
  let w = x;
  let v = x;
  let fx = -finiteOrWorst(f(x));
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  let evaluations = 1;
  for (let iteration = 0; iteration < maxIterations; iteration++) {
    const middle = 0.5 * (a + b);
    const tol1 = tolerance * Math.abs(x) + 1e-300;
    const tol2 = 2 * tol1;
    if (Math.abs(x - middle) <= tol2 - 0.5 * (b - a)) break;
    let useGolden = true;
    if (Math.abs(e) > tol1 && Number.isFinite(fx) && Number.isFinite(fw) && Number.isFinite(fv)) {
      let r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      q = Math.abs(q);
      const previousStep = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * previousStep) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = middle >= x ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) {
      e = (x >= middle ? a : b) - x;
      d = goldenSection * e;
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d >= 0 ? tol1 : -tol1);
    const fu = -finiteOrWorst(f(u));
    evaluations += 1;
    if (fu <= fx) {
      if (u >= x) a = x;
      else b = x;
      v = w; fv = fw;
      w = x; fw = fx;
      x = u; fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w; fv = fw;
        w = u; fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u; fv = fu;
      }
    }
  }
  return { at: x, value: -fx, evaluations };
}

/**
 * Maximise f over [lower, upper] by a grid of `points` values to find the best
 * basin, then Brent's method between the neighbours of the best grid point.
 * The interval ends are candidates themselves, so a maximum at an end is found.
 *
 * @example
 * gridMaximize((x) => -Math.abs(x - 3), 0, 10, 11).at; // 3
 */
export function gridMaximize(f: (x: number) => number, lower: number, upper: number, points = 24, tolerance = 1e-10): Maximum {
  const step = (upper - lower) / (points - 1);
  let bestIndex = 0;
  let bestValue = Number.NEGATIVE_INFINITY;
  for (let k = 0; k < points; k++) {
    const x = k === points - 1 ? upper : lower + k * step;
    const value = finiteOrWorst(f(x));
    if (value > bestValue) {
      bestValue = value;
      bestIndex = k;
    }
  }
  const bestX = bestIndex === points - 1 ? upper : lower + bestIndex * step;
  if (bestValue === Number.NEGATIVE_INFINITY) return { at: bestX, value: bestValue, evaluations: points };
  const left = Math.max(lower, bestX - step);
  const right = Math.min(upper, bestX + step);
  const refined = brentMaximize(f, left, right, tolerance);
  if (refined.value >= bestValue) return { at: refined.at, value: refined.value, evaluations: points + refined.evaluations };
  return { at: bestX, value: bestValue, evaluations: points + refined.evaluations };
}

/**
 * Brent's root finder on a bracket [a, b] with f(a), f(b) of opposite sign.
 * Returns NaN when the bracket does not change sign.
 *
 * Brent, R. P. (1973). Algorithms for Minimization without Derivatives, ch. 4.
 *
 * @example
 * findRoot((x) => x * x - 2, 0, 2); // 1.4142135623730951 (to 1e-12; the square root of 2)
 * findRoot((x) => x * x + 1, 0, 2); // NaN (no sign change)
 */
export function findRoot(f: (x: number) => number, lower: number, upper: number, tolerance = 1e-12, maxIterations = 200): number {
  const fa = f(lower);
  const fb = f(upper);
  if (fa === 0) return lower;
  if (fb === 0) return upper;
  if (!(fa * fb < 0)) return Number.NaN;
  // The iteration itself is the one root-find.ts runs from end values it already knows.
  return bracketedRoot(f, lower, fa, upper, fb, tolerance, maxIterations);
}

/** Options of {@link nelderMead}. */
export interface NelderMeadOptions {
  /** Initial simplex step per coordinate (default 10% of |x0| or 0.1). */
  step?: readonly number[];
  /** Stop when the simplex's value spread is below this (default 1e-12, relative+absolute). */
  tolerance?: number;
  maxEvaluations?: number;
  /** Restarts from the best point with a fresh simplex (default 2): guards against collapse. */
  restarts?: number;
}

/**
 * Nelder–Mead simplex minimisation with adaptive coefficients for the
 * dimension, restarted from its own best point.
 *
 * Nelder, J. A. & Mead, R. (1965). A simplex method for function minimization.
 * Computer Journal 7:308-313. Gao, F. & Han, L. (2012). Implementing the
 * Nelder-Mead simplex algorithm with adaptive parameters. Computational
 * Optimization and Applications 51:259-277.
 *
 * @example
 * const found = nelderMead(([x, y]) => (x - 1) ** 2 + (y + 2) ** 2, [0, 0]);
 * found.at[0]; // 1 (to 1e-9; the minimum at (1, -2))
 * found.at[1]; // -2 (to 1e-9)
 */
export function nelderMead(f: (x: number[]) => number, start: readonly number[], options: NelderMeadOptions = {}): { at: number[]; value: number; evaluations: number } {
  const dimension = start.length;
  const tolerance = options.tolerance ?? 1e-12;
  const maxEvaluations = options.maxEvaluations ?? 2000 * dimension;
  const restarts = options.restarts ?? 2;
  const reflection = 1;
  const expansion = 1 + 2 / dimension;
  const contraction = 0.75 - 1 / (2 * dimension);
  const shrink = 1 - 1 / dimension;
  const safe = (x: number[]): number => {
    const value = f(x);
    return Number.isFinite(value) ? value : Number.POSITIVE_INFINITY;
  };
  let best = [...start];
  let bestValue = safe(best);
  let evaluations = 1;
  for (let round = 0; round <= restarts && evaluations < maxEvaluations; round++) {
    const simplex: number[][] = [best];
    const values: number[] = [bestValue];
    for (let j = 0; j < dimension; j++) {
      const vertex = [...best];
      const step = options.step?.[j] ?? (vertex[j] !== 0 ? 0.1 * Math.abs(vertex[j]) : 0.1);
      vertex[j] += round === 0 ? step : step * 0.5 ** round;
      simplex.push(vertex);
      values.push(safe(vertex));
      evaluations += 1;
    }
    while (evaluations < maxEvaluations) {
      const order = values.map((_, index) => index).sort((left, right) => values[left] - values[right]);
      const sortedSimplex = order.map((index) => simplex[index]);
      const sortedValues = order.map((index) => values[index]);
      for (let k = 0; k <= dimension; k++) {
        simplex[k] = sortedSimplex[k];
        values[k] = sortedValues[k];
      }
      const spread = Math.abs(values[dimension] - values[0]);
      if (spread <= tolerance * (Math.abs(values[0]) + tolerance)) break;
      const centroid = new Array<number>(dimension).fill(0);
      for (let k = 0; k < dimension; k++) for (let j = 0; j < dimension; j++) centroid[j] += simplex[k][j] / dimension;
      const worst = simplex[dimension];
      const along = (factor: number): number[] => centroid.map((c, j) => c + factor * (c - worst[j]));
      const reflected = along(reflection);
      const reflectedValue = safe(reflected);
      evaluations += 1;
      if (reflectedValue < values[0]) {
        const expanded = along(reflection * expansion);
        const expandedValue = safe(expanded);
        evaluations += 1;
        if (expandedValue < reflectedValue) {
          simplex[dimension] = expanded;
          values[dimension] = expandedValue;
        } else {
          simplex[dimension] = reflected;
          values[dimension] = reflectedValue;
        }
      } else if (reflectedValue < values[dimension - 1]) {
        simplex[dimension] = reflected;
        values[dimension] = reflectedValue;
      } else {
        const outside = reflectedValue < values[dimension];
        const contracted = along(outside ? reflection * contraction : -contraction);
        const contractedValue = safe(contracted);
        evaluations += 1;
        if (contractedValue < Math.min(reflectedValue, values[dimension])) {
          simplex[dimension] = contracted;
          values[dimension] = contractedValue;
        } else {
          for (let k = 1; k <= dimension; k++) {
            simplex[k] = simplex[k].map((value, j) => simplex[0][j] + shrink * (value - simplex[0][j]));
            values[k] = safe(simplex[k]);
            evaluations += 1;
          }
        }
      }
    }
    let bestIndex = 0;
    for (let k = 1; k < values.length; k++) if (values[k] < values[bestIndex]) bestIndex = k;
    if (values[bestIndex] <= bestValue) {
      best = simplex[bestIndex];
      bestValue = values[bestIndex];
    }
  }
  return { at: best, value: bestValue, evaluations };
}
