/**
 * Small-sample Akaike information criterion:
 * AICc = -2 logL + 2K + 2K(K + 1) / (N - K - 1).
 * Returns null when N - K - 1 <= 0 (the model is not compared).
 *
 * Hurvich, C. M. & Tsai, C.-L. (1989). Regression and time series model
 * selection in small samples. Biometrika 76:297-307.
 *
 * @example
 * aicc(-10, 2, 10); // 25.714285714285715 (20 + 4 + 12/7)
 * aicc(-10, 2, 3); // null (N - K - 1 = 0)
 */
export function aicc(logLik: number, parameterCount: number, horizons: number): number | null {
  const denominator = horizons - parameterCount - 1;
  if (denominator <= 0 || !Number.isFinite(logLik)) return null;
  return -2 * logLik + 2 * parameterCount + (2 * parameterCount * (parameterCount + 1)) / denominator;
}

/**
 * Akaike weights over the compared models: w_j = exp(-Delta_j / 2) /
 * sum_k exp(-Delta_k / 2), Delta_j = AICc_j - min AICc. Models not compared
 * (null) get null.
 *
 * Burnham, K. P. & Anderson, D. R. (2002). Model Selection and Multimodel
 * Inference, 2nd ed. Springer.
 *
 * @example
 * akaikeWeights([10, 12, null]).weight; // [0.7310585786300049, 0.2689414213699951, null] (1 / (1 + e^-1), e^-1 / (1 + e^-1))
 * akaikeWeights([10, 12, null]).delta; // [0, 2, null]
 */
export function akaikeWeights(criteria: readonly (number | null)[]): { delta: (number | null)[]; weight: (number | null)[] } {
  const compared = criteria.filter((value): value is number => value !== null);
  if (compared.length === 0) return { delta: criteria.map(() => null), weight: criteria.map(() => null) };
  const minimum = Math.min(...compared);
  const delta = criteria.map((value) => (value === null ? null : value - minimum));
  const relative = delta.map((value) => (value === null ? 0 : Math.exp(-value / 2)));
  const total = relative.reduce((sum, value) => sum + value, 0);
  return { delta, weight: delta.map((value, j) => (value === null ? null : relative[j] / total)) };
}

/**
 * Index of the best-supported candidate: the lowest AICc among those
 * compared (null criteria are skipped); on an exact tie the first listed
 * wins. -1 when none is compared. The one ranking rule of `fit` (models)
 * and `compare` (hypotheses); ties of identical fits are named separately
 * (`sameFit` in compare-sections.ts).
 *
 * @example
 * lowestCriterion([12, 10, null, 10]); // 1
 * lowestCriterion([null, null]); // -1
 */
export function lowestCriterion(criteria: readonly (number | null)[]): number {
  let best = -1;
  criteria.forEach((value, index) => {
    if (value !== null && (best === -1 || value < (criteria[best] as number))) best = index;
  });
  return best;
}

/** 0.95 quantile of the chi-square distribution with 1 degree of freedom (closed form: 1.959963984540054^2). */
export const chiSquare1At95 = 3.841458820694124;
