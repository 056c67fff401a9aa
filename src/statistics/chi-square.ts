import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';

/**
 * Upper tail of the chi-square distribution, P(X >= x) = 1 - F(x; df), with
 * F from the stdlib distributions library
 * (`@stdlib/stats-base-dists-chisquare-cdf`, the regularised lower incomplete
 * gamma function P(df/2, x/2)); 1 for x <= 0 (and for NaN). Accurate to
 * about 1e-16 absolute, so p-values below that print as 0. The asymptotic
 * p-value of a likelihood-ratio statistic (Wilks 1938, Annals of
 * Mathematical Statistics 9:60-62). The one place the project computes it:
 * the likelihood-ratio tests of `compare` and the chi-square p-value of
 * `bootstrap` both call this.
 *
 * @param statistic x, the observed statistic (e.g. G = 2 ΔlogL).
 * @param degreesOfFreedom df > 0.
 * @example
 * chiSquareSurvival(3.841458820694124, 1); // 0.05 (to 1e-15)
 * chiSquareSurvival(2, 2); // 0.36787944117144233 (= exp(-1))
 * chiSquareSurvival(0, 3); // 1
 */
export function chiSquareSurvival(statistic: number, degreesOfFreedom: number): number {
  if (!(statistic > 0)) return 1;
  return Math.max(0, 1 - chisquareCdf(statistic, degreesOfFreedom));
}
