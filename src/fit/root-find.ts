/**
 * Where a profile likelihood crosses its cut-off: the end of an interval, by
 * few trial values (issue 14b). Each trial value of a profile costs an inner
 * maximisation over the other parameters, so the search is built to spend
 * as few as it can: the first trial comes from the quadratic approximation
 * at the maximum, the next ones from the quadratic through the maximum and
 * the last trial inside (aimed a little beyond the cut-off so that it
 * brackets the end), and the bracket is then closed by Brent's root finder
 * started from the values already known.
 */

/** Options of {@link profileCrossing}. */
export interface CrossingOptions {
  /**
   * Abscissa tolerance of the root, as in Brent (1973): the bracket is closed
   * when its half-width is at most 2 ε |x| + tolerance · max(1, |x|) / 2.
   */
  readonly tolerance: number;
  /** Farthest abscissa the search may try (the end of the range); default unbounded. */
  readonly limit?: number;
  /** Most trial values before the bracket (default 60). */
  readonly maxSteps?: number;
}

/**
 * Most a step-out trial goes beyond the previous one, as a multiple of the
 * previous distance from the maximum (the quadratic can overshoot wildly
 * where the profile flattens).
 */
const largestGrowth = 4;
/**
 * The step-out aims at this fraction of the drop below the cut-off (a trial
 * aimed at the cut-off itself would, for an almost quadratic profile, land a
 * rounding error inside and bracket nothing).
 */
const overshoot = 0.05;

/**
 * The point where `gap` (profile minus cut-off) changes sign, going from the
 * maximum `from` (where the gap is `fromGap` > 0) through `firstTrial` and
 * beyond. Returns the root, or null when the gap stays non-negative up to
 * `limit` (the end is open or at a bound there; the limit itself is tried)
 * or for `maxSteps` trials, or when a trial is not a number.
 *
 * Step-out: while a trial x_k is inside (gap > 0), the next aims at gap =
 * -overshoot · fromGap on the quadratic through (from, fromGap) with
 * curvature c = (fromGap - gap_k) / (x_k - from)^2, at most
 * {@link largestGrowth} times as far from `from` as x_k; at least twice as
 * far when the gap has not fallen or an aimed step stayed inside (the
 * profile flattens: stepping out by doubling then), and at least 1.1 times
 * after the first trial. Then Brent's root finder on the bracket
 * (Brent, R. P. (1973). Algorithms for Minimization without Derivatives,
 * Prentice-Hall, chapter 4), with the two end values already known.
 *
 * @example
 * // A normal-mean profile -(x - 1)^2 / 2 against the 95% cut-off 1.920729: the ends are 1 ± 1.959964.
 * profileCrossing((x) => -((x - 1) ** 2) / 2 + 1.920729410347062, 1, 1.920729410347062, 2, { tolerance: 1e-12 }); // 2.9599639845406585
 */
export function profileCrossing(gap: (x: number) => number, from: number, fromGap: number, firstTrial: number, options: CrossingOptions): number | null {
  const direction = firstTrial >= from ? 1 : -1;
  const limit = options.limit ?? direction * Number.POSITIVE_INFINITY;
  const beyond = (x: number): boolean => direction * (x - limit) >= 0;
  let inside = from;
  let insideGap = fromGap;
  let trial = beyond(firstTrial) ? limit : firstTrial;
  const maxSteps = options.maxSteps ?? 60;
  for (let step = 0; step < maxSteps; step++) {
    const trialGap = gap(trial);
    if (Number.isNaN(trialGap)) return null;
    if (trialGap < 0) return bracketedRoot(gap, inside, insideGap, trial, trialGap, options.tolerance);
    if (trial === limit) return null;
    const distance = Math.abs(trial - from);
    // After a first trial, every step aims beyond the cut-off; one that stayed inside means the profile is not
    // falling like a quadratic there (it flattens), so from then on each step at least doubles, as a plain step-out would.
    let next = 2 * distance;
    if (trialGap < fromGap) {
      const curvature = (fromGap - trialGap) / (distance * distance);
      next = Math.min(largestGrowth * distance, Math.sqrt((fromGap * (1 + overshoot)) / curvature));
    }
    inside = trial;
    insideGap = trialGap;
    trial = from + direction * Math.max(next, (step === 0 ? 1.1 : largestGrowth) * distance);
    if (beyond(trial)) trial = limit;
  }
  return null;
}

/**
 * Brent's root finder on [inside, outside], f(inside) = insideValue > 0 and
 * f(outside) = outsideValue < 0 already known (the step-out evaluated them),
 * to the tolerance of {@link CrossingOptions}. The same iteration as
 * Brent (1973), chapter 4; `findRoot` in optimise.ts evaluates the two ends
 * and then runs this. Here the two end values are not evaluated again.
 *
 * @example
 * bracketedRoot((x) => 2 - x * x, 0, 2, 2, -2, 1e-15); // 1.414213562373095
 */
export function bracketedRoot(f: (x: number) => number, inside: number, insideValue: number, outside: number, outsideValue: number, tolerance: number, maxIterations = 200): number {
  let a = inside;
  let b = outside;
  let fa = insideValue;
  let fb = outsideValue;
  if (fa === 0) return a;
  if (fb === 0) return b;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iteration = 0; iteration < maxIterations; iteration++) {
    if (fb * fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tolerance * Math.max(1, Math.abs(b));
    const middle = 0.5 * (c - b);
    if (Math.abs(middle) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      // Inverse quadratic interpolation (secant when only two points are distinct).
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * middle * s;
        q = 1 - s;
      } else {
        const r = fb / fc;
        const t = fa / fc;
        p = s * (2 * middle * t * (t - r) - (b - a) * (r - 1));
        q = (t - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * middle * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = middle;
        e = d;
      }
    } else {
      d = middle;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : middle > 0 ? tol1 : -tol1;
    fb = f(b);
    if (Number.isNaN(fb)) return Number.NaN;
  }
  return b;
}
