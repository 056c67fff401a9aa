import type { Lineage } from '../lineage.js';
import type { MethodsNote } from './model.js';

/** The report's methods sentence of the covariate-tracking models (once for the family). */
export const covariateMethodsNote: MethodsNote = {
  key: 'covariate',
  sentence: (options) => {
    const file = options.covariate_file;
    return `In the covariate-tracking models the expected trait mean is a linear function of an environmental covariate measured at each horizon${typeof file === 'string' ? ` (from ${file})` : ''}.`;
  },
};

/**
 * Why a lineage's covariate cannot be used, or null: it must be present at
 * every horizon (a `covariate` column or `--covariate-file`).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * covariateProblem(lineage); // 'not fitted: no covariate (give a "covariate" column or --covariate-file)'
 * covariateProblem({ ...lineage, covariate: Float64Array.of(1, NaN, 2) }); // 'not fitted: the covariate is missing at the horizon of input line 3'
 * covariateProblem({ ...lineage, covariate: Float64Array.of(1, 1.5, 2) }); // null
 */
export function covariateProblem(lineage: Lineage): string | null {
  const covariate = lineage.covariate;
  if (!covariate) return 'not fitted: no covariate (give a "covariate" column or --covariate-file)';
  for (let i = 0; i < covariate.length; i++) {
    if (!Number.isFinite(covariate[i])) return `not fitted: the covariate is missing at the horizon of input line ${lineage.lines[i]}`;
  }
  return null;
}

/**
 * True when the covariate takes one value over the whole lineage: the slope
 * is then not identifiable and the covariate models reduce exactly to their
 * covariate-free counterparts (the slope column is dropped, slope reported
 * as not estimable).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * covariateIsConstant({ ...lineage, covariate: Float64Array.of(3, 3, 3) }); // true
 * covariateIsConstant({ ...lineage, covariate: Float64Array.of(3, 3, 4) }); // false
 */
export function covariateIsConstant(lineage: Lineage): boolean {
  const covariate = lineage.covariate;
  if (!covariate) return true;
  for (let i = 1; i < covariate.length; i++) if (covariate[i] !== covariate[0]) return false;
  return true;
}
