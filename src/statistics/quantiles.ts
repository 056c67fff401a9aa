import { quantileSorted } from 'simple-statistics';

/**
 * Quantile of ascending sorted values by linear interpolation between order
 * statistics, h = (n - 1) p, Q = x_(floor h) + (h - floor h)(x_(floor h + 1)
 * - x_(floor h)) (Hyndman & Fan 1996, definition 7: the default of R and
 * numpy). This is the quantile the tool documents for every spread it
 * prints (age draws, compilation quartiles, report medians). It is
 * simple-statistics' `quantileSorted`, which computes definition 7 with the
 * same arithmetic (checked in `test/statistics/quantiles.test.ts`).
 *
 * Hyndman, R. J. & Fan, Y. (1996). Sample quantiles in statistical packages.
 * The American Statistician 50:361-365.
 *
 * @param sorted finite values in ascending order, at least one.
 * @param probability p in [0, 1].
 * @throws Error (from the library) on an empty list or p outside [0, 1].
 * @example
 * quantileOfSorted([1, 2, 3, 4], 0.5); // 2.5
 * quantileOfSorted([1, 2, 3, 4], 0.025); // 1.075
 */
export function quantileOfSorted(sorted: readonly number[], probability: number): number {
  return quantileSorted(sorted as number[], probability);
}

/**
 * The ceil(level (B + 1))-th smallest of B sorted values (capped at the
 * largest, at least the smallest): the order statistic used as a bootstrap
 * critical value, so that with the observed statistic counted among the
 * draws a test at `level` rejects no more often than 1 - level (Davison &
 * Hinkley 1997, Bootstrap Methods and their Application, section 4.2).
 * Deliberately not the interpolated definition 7 of {@link quantileOfSorted}.
 *
 * @example
 * orderQuantile([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19], 0.95); // 19
 * orderQuantile([1, 2, 3], 0.5); // 2
 */
export function orderQuantile(sorted: readonly number[], level: number): number {
  const rank = Math.min(sorted.length, Math.max(1, Math.ceil(level * (sorted.length + 1))));
  return sorted[rank - 1];
}
