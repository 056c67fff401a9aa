import { buildCovariance, type EvolutionModel } from './model.js';
import { fillAttractionDynamics, ornsteinUhlenbeck, relaxedTime } from './ou.js';

/**
 * (t - (1 - exp(-alpha t)) / alpha) / alpha, the design column of the
 * optimum's drift: equal to t^2 / 2 at alpha = 0 and computed from its
 * series where alpha t is small (the difference cancels there).
 *
 * @example
 * driftResponse(0, 2); // 2 (t^2 / 2 at alpha = 0)
 * driftResponse(1, 2); // 1.1353352832366128 (to 1e-15; 2 - (1 - exp(-2)))
 */
export function driftResponse(alpha: number, t: number): number {
  const x = alpha * t;
  if (Math.abs(x) < 1e-3) return t * t * (0.5 - x / 6 + (x * x) / 24 - (x * x * x) / 120);
  return (t - relaxedTime(alpha, t)) / alpha;
}

/** Mean straight from the definition: theta(t) - b / alpha + (a - theta_0 + b / alpha) exp(-alpha t), theta(t) = theta_0 + b t. */
function definedMean(parameters: Record<string, number>, t: number): number {
  const { ancestral_mean: start, optimum, optimum_drift: drift, alpha } = parameters;
  const lag = drift / alpha;
  return optimum + drift * t - lag + (start - optimum + lag) * Math.exp(-alpha * t);
}

/**
 * Ornstein–Uhlenbeck evolution toward an optimum that moves linearly in
 * time, theta(t) = theta_0 + b t (t from the oldest horizon):
 * E z(t) = theta(t) - b / alpha + (a - theta_0 + b / alpha) exp(-alpha t),
 * covariance as ou, sigma2 / (2 alpha) (exp(-alpha |t_i - t_j|) - exp(-alpha (t_i + t_j))).
 * The lineage ends up trailing the optimum by b / alpha.
 *
 * Parameters: ancestral_mean a, optimum theta_0 (at the oldest horizon;
 * trait units), optimum_drift b (trait per time unit), alpha (per time
 * unit, >= 0), step_variance sigma2 (trait^2 per time unit, >= 0); K = 5.
 * Derived: half_life = ln 2 / alpha.
 *
 * The mean is linear in (a, theta_0 alpha, b alpha) with the columns
 * exp(-alpha t), (1 - exp(-alpha t)) / alpha and {@link driftResponse},
 * which tend to 1, t and t^2 / 2 as alpha -> 0: there the model is a walk
 * whose mean is a + c_1 t + c_2 t^2 / 2 (the optimum and its drift run off
 * to infinity), reported as `limit_drift` c_1 (trait per time) and
 * `limit_acceleration` c_2 (trait per time^2). b = 0 is ou.
 *
 * Hansen, T. F., Pienaar, J. & Orzack, S. H. (2008). A comparative method
 * for studying adaptation to a randomly evolving environment. Evolution
 * 62:1965-1977. Estes, S. & Arnold, S. J. (2007). Resolving the paradox of
 * stasis: models with stabilizing selection explain evolutionary
 * divergence on all timescales. American Naturalist 169:227-244. Voje, K. L.
 * (2023). Fitting and evaluating univariate and multivariate models of
 * within-lineage evolution. Paleobiology 49:747-764.
 */
export const movingOptimum: EvolutionModel = {
  id: 'moving-optimum',
  label: 'moving optimum (Ornstein–Uhlenbeck toward a linearly moving optimum)',
  summary: 'The lineage mean is pulled at rate alpha toward an optimum that moves by optimum_drift per time unit, while wandering with step variance; it starts at the ancestral mean.',
  citation: 'Hansen, T. F., Pienaar, J. & Orzack, S. H. (2008). A comparative method for studying adaptation to a randomly evolving environment. Evolution 62:1965-1977.',
  referenceKeys: ['hansenPienaarOrzack2008', 'estesArnold2007', 'voje2023'],
  plainWords: 'the trait mean followed an optimum that moved steadily in one direction',
  nests: { model: 'ou', condition: 'optimum_drift = 0' },
  methodsNotes: [{
    key: 'moving-optimum',
    sentence: () => 'In the moving-optimum model the lineage mean is attracted toward an optimum that moves linearly in time, which it follows with a lag of (drift of the optimum)/α; with a fixed optimum it is the Ornstein–Uhlenbeck model.',
  }],
  help: {
    heading: 'moving-optimum',
    lines: [
      'ou toward an optimum moving linearly in time, optimum + optimum_drift x t; the',
      'lineage trails it by optimum_drift / alpha (K = 5; optimum_drift = 0 is ou)',
    ],
  },
  limitDrawing: {
    applies: (estimates, derived) => estimates.alpha === 0 && 'limit_drift' in derived && 'limit_acceleration' in derived,
    drawnAs: 'moving-optimum',
    // The expectation reads the limit's coefficients at alpha = 0; the optimum and its drift are not finite there (0 stands in).
    parameters: (estimates, derived) => ({
      ancestral_mean: estimates.ancestral_mean, optimum: 0, optimum_drift: 0, alpha: 0, step_variance: estimates.step_variance,
      limit_drift: derived.limit_drift, limit_acceleration: derived.limit_acceleration,
    }),
    words: 'alpha at its limit 0, drawn as the walk it equals there, with a quadratic trend',
  },
  guide: (parameters, time) => (Number.isFinite(parameters.optimum) && Number.isFinite(parameters.optimum_drift) && parameters.alpha > 0
    ? { time, value: Array.from(movingOptimumPath(parameters, time)), words: 'Moving optimum' }
    : null),
  parameters: [
    { name: 'ancestral_mean', label: 'ancestral mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    {
      name: 'optimum', label: 'optimum at the oldest horizon', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY,
      runaway: { coefficient: 1, derived: 'limit_drift', unit: { trait: 1, time: -1 }, limit: 'alpha-zero' },
    },
    {
      name: 'optimum_drift', label: 'drift of the optimum', role: 'location', unit: { trait: 1, time: -1 }, lowerBound: Number.NEGATIVE_INFINITY,
      runaway: { coefficient: 2, derived: 'limit_acceleration', unit: { trait: 1, time: -2 }, limit: 'alpha-zero' },
    },
    { name: 'alpha', label: 'alpha (strength of attraction)', role: 'rate', unit: { trait: 0, time: -1 }, lowerBound: 0, halfLife: true },
    { name: 'step_variance', label: 'step variance', role: 'variance', unit: { trait: 2, time: -1 }, lowerBound: 0, rate: 'step-variance' },
  ],
  // The same searched axes as ou (alpha from its random-walk to its stasis-like limit, then the step variance).
  process: ornsteinUhlenbeck.process,
  minimumHorizons: 5,
  width: () => 3,
  parameterCount: () => 5,
  fillSpace(lineage, process, space) {
    const alpha = process[0];
    fillAttractionDynamics(lineage, alpha, process[1], space);
    const time = lineage.time;
    for (let i = 0; i < space.size; i++) {
      space.design[3 * i] = Math.exp(-alpha * time[i]);
      space.design[3 * i + 1] = relaxedTime(alpha, time[i]);
      space.design[3 * i + 2] = driftResponse(alpha, time[i]);
    }
  },
  toParameters: (coefficients, process) => ({
    ancestral_mean: coefficients[0],
    optimum: process[0] === 0 ? Number.NaN : coefficients[1] / process[0],
    optimum_drift: process[0] === 0 ? Number.NaN : coefficients[2] / process[0],
    alpha: process[0],
    step_variance: process[1],
  }),
  constantCoefficients: (process) => Float64Array.of(1, process[0], 0),
  fixLocation: (name, value, process) =>
    name === 'optimum' ? { index: 1, coefficient: value * process[0] } : name === 'optimum_drift' ? { index: 2, coefficient: value * process[0] } : { index: 0, coefficient: value },
  processFrom: (parameters) => [parameters.alpha, parameters.step_variance],
  coefficientsFrom: (parameters) => [parameters.ancestral_mean, parameters.optimum * parameters.alpha, parameters.optimum_drift * parameters.alpha],
  meanCovariance(lineage, parameters) {
    const time = lineage.time;
    const { alpha, step_variance: stepVariance } = parameters;
    return {
      mean: Float64Array.from(time, (t) => definedMean(parameters, t)),
      covariance: buildCovariance(time.length, (i, j) =>
        (stepVariance / (2 * alpha)) * (Math.exp(-alpha * Math.abs(time[i] - time[j])) - Math.exp(-alpha * (time[i] + time[j])))),
    };
  },
  expectation(parameters, time) {
    const { ancestral_mean: start, alpha, step_variance: stepVariance } = parameters;
    const atLimit = alpha === 0 && 'limit_drift' in parameters;
    return {
      mean: Float64Array.from(time, (t) => (atLimit ? start + parameters.limit_drift * t + parameters.limit_acceleration * (t * t) / 2 : definedMean(parameters, t))),
      variance: Float64Array.from(time, (t) => stepVariance * relaxedTime(2 * alpha, t)),
    };
  },
};

/**
 * The optimum theta(t) = optimum + optimum_drift t of a fitted moving-optimum model at given times (figures draw it dashed).
 *
 * @example
 * movingOptimumPath({ optimum: 1, optimum_drift: 0.5 }, [0, 2]); // Float64Array.of(1, 2)
 */
export function movingOptimumPath(parameters: Record<string, number>, time: ArrayLike<number>): Float64Array {
  return Float64Array.from(time, (t) => parameters.optimum + parameters.optimum_drift * t);
}
