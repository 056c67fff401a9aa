import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';

/**
 * Upper-tail probability P(X >= x) of the chi-square distribution with
 * `degrees` degrees of freedom, from the stdlib distributions library
 * (`@stdlib/stats-base-dists-chisquare-cdf`). The asymptotic p-value of a
 * likelihood-ratio statistic (Wilks 1938, Ann. Math. Stat. 9:60-62).
 *
 * @example
 * chiSquareSurvival(3.841458820694124, 1); // 0.05 (to 1e-15)
 */
export function chiSquareSurvival(x: number, degrees: number): number {
  if (!(x > 0)) return 1;
  return Math.max(0, 1 - chisquareCdf(x, degrees));
}
