import { chiSquareSurvival } from '../statistics/chi-square.js';

/** A likelihood-ratio test of a restricted hypothesis against a fuller one that contains it. */
export interface LikelihoodRatioTest {
  /** G = 2 (logL_full - logL_restricted), never below 0. */
  readonly statistic: number;
  /** Degrees of freedom: K_full - K_restricted. */
  readonly degreesOfFreedom: number;
  /** P(chi-square(df) >= G), or null when df <= 0 or a logL is not finite. */
  readonly pValue: number | null;
}

/**
 * Likelihood-ratio test of nested hypotheses (Wilks 1938): G = 2 (logL_full -
 * logL_restricted) is referred to chi-square with K_full - K_restricted
 * degrees of freedom. When the restriction puts a variance on its bound 0
 * the reference distribution is a chi-square mixture and this p-value is
 * conservative (Self & Liang 1987).
 *
 * Wilks, S. S. (1938). The large-sample distribution of the likelihood ratio
 * for testing composite hypotheses. Annals of Mathematical Statistics 9:60-62.
 * Self, S. G. & Liang, K.-Y. (1987). Asymptotic properties of maximum
 * likelihood estimators and likelihood ratio tests under nonstandard
 * conditions. Journal of the American Statistical Association 82:605-610.
 *
 * @example
 * likelihoodRatioTest(-10, 3, -8, 5); // { statistic: 4, degreesOfFreedom: 2, pValue: 0.1353352832366127 } (= exp(-2))
 */
export function likelihoodRatioTest(restrictedLogLik: number, restrictedK: number, fullLogLik: number, fullK: number): LikelihoodRatioTest {
  const degreesOfFreedom = fullK - restrictedK;
  if (!Number.isFinite(restrictedLogLik) || !Number.isFinite(fullLogLik) || degreesOfFreedom <= 0) {
    return { statistic: Number.NaN, degreesOfFreedom, pValue: null };
  }
  const statistic = Math.max(0, 2 * (fullLogLik - restrictedLogLik));
  return { statistic, degreesOfFreedom, pValue: chiSquareSurvival(statistic, degreesOfFreedom) };
}
