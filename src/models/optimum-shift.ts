import { buildCovariance, type EvolutionModel } from './model.js';
import { ornsteinUhlenbeck, relaxedTime } from './ou.js';
import { minimumSegmentOf, shiftEstimates, shiftIndicesFrom, shiftMethodsNote, shiftPlacements, shiftsOf } from './punctuated-shifts.js';

/** The alpha- and shift-dependent factors of the state space over one time axis (see {@link shiftFactors}). */
interface ShiftFactors {
  alpha: number;
  shift: number;
  /** Transition exp(-alpha dt_i) and process variance per unit step variance (1 - exp(-2 alpha dt_i)) / (2 alpha), as ou's `fillAttractionDynamics`. */
  readonly transition: Float64Array;
  readonly varianceTime: Float64Array;
  /**
   * Design rows, row-major: the columns of the ancestral mean, of
   * optimum_before · alpha and of optimum_after · alpha at elapsed time t,
   * given t_p (the time of the last horizon before the shift):
   * exp(-alpha t), (1 - exp(-alpha min(t, t_p))) / alpha · exp(-alpha max(0, t - t_p))
   * and (1 - exp(-alpha max(0, t - t_p))) / alpha. At alpha = 0 they are 1,
   * min(t, t_p) and max(0, t - t_p).
   */
  readonly design: Float64Array;
}

const shiftFactorsByTime = new WeakMap<Float64Array, ShiftFactors>();

/**
 * The factors at the last alpha and shift asked for, per time axis (issue
 * 14): the search holds alpha and the shift fixed while it varies the step
 * variance, so most fills reuse the exponentials of the previous one. The
 * same operations as ou's `fillAttractionDynamics` and the design row, so
 * the same numbers bit for bit, computed once and without an array per row.
 */
function shiftFactors(time: Float64Array, alpha: number, shift: number): ShiftFactors {
  let factors = shiftFactorsByTime.get(time);
  const size = time.length;
  if (factors === undefined || factors.transition.length !== size) {
    factors = { alpha: Number.NaN, shift: -1, transition: new Float64Array(size), varianceTime: new Float64Array(size), design: new Float64Array(3 * size) };
    shiftFactorsByTime.set(time, factors);
  } else if (Object.is(factors.alpha, alpha) && factors.shift === shift) return factors;
  if (!Object.is(factors.alpha, alpha)) {
    for (let i = 1; i < size; i++) {
      const interval = time[i] - time[i - 1];
      factors.transition[i] = Math.exp(-alpha * interval);
      factors.varianceTime[i] = relaxedTime(2 * alpha, interval);
    }
  }
  const previousTime = time[shift - 1];
  const design = factors.design;
  for (let i = 0; i < size; i++) {
    const t = time[i];
    design[3 * i] = Math.exp(-alpha * t);
    if (t <= previousTime) {
      design[3 * i + 1] = relaxedTime(alpha, t);
      design[3 * i + 2] = 0;
    } else {
      const since = t - previousTime;
      design[3 * i + 1] = relaxedTime(alpha, previousTime) * Math.exp(-alpha * since);
      design[3 * i + 2] = relaxedTime(alpha, since);
    }
  }
  factors.alpha = alpha;
  factors.shift = shift;
  return factors;
}

/** Mean straight from the definition (alpha > 0): ou toward theta_1 up to t_p, then ou toward theta_2 from where the lineage is expected at t_p. */
function definedMean(parameters: Record<string, number>, t: number, previousTime: number): number {
  const { ancestral_mean: start, optimum_before: before, optimum_after: after, alpha } = parameters;
  const early = (time: number): number => before + (start - before) * Math.exp(-alpha * time);
  if (t <= previousTime) return early(t);
  return after + (early(previousTime) - after) * Math.exp(-alpha * (t - previousTime));
}

/**
 * Ornstein–Uhlenbeck evolution whose optimum shifts once: the optimum is
 * optimum_before theta_1 up to t_p, the time of the last horizon before the
 * shift, and optimum_after theta_2 from then on (horizon s, the shift index,
 * is the first of the new segment, as in the other shift models); one alpha
 * and one step variance throughout, the latent lineage mean continuous.
 *
 * E z(t) = theta_1 + (a - theta_1) exp(-alpha t) for t <= t_p, and
 * theta_2 + (m_p - theta_2) exp(-alpha (t - t_p)) after, m_p = E z(t_p);
 * covariance as ou. Parameters: ancestral_mean a, optimum_before,
 * optimum_after (trait units), alpha (per time unit, >= 0), step_variance
 * sigma2 (trait^2 per time unit, >= 0); K = 5 + 1 for the shift position,
 * found by exhaustive search. Equal optima give ou. Derived: half_life.
 * As alpha -> 0 the model is a walk whose drift changes at the shift,
 * a + c_1 min(t, t_p) + c_2 max(0, t - t_p) (the optima run off to
 * infinity), reported as `limit_drift_before` c_1 and `limit_drift_after` c_2.
 *
 * After Voje, K. L. (2023). Fitting and evaluating univariate and
 * multivariate models of within-lineage evolution. Paleobiology 49:747-764
 *, and Hansen, T. F.
 * (1997). Stabilizing selection and the comparative analysis of adaptation.
 * Evolution 51:1341-1351.
 */
export const optimumShift: EvolutionModel = {
  id: 'optimum-shift',
  label: 'optimum shift (Ornstein–Uhlenbeck whose optimum moves once)',
  summary: 'The lineage mean is pulled at rate alpha toward optimum_before, then, from the last horizon before the shift, toward optimum_after; one alpha and step variance; shift position searched exhaustively.',
  citation: 'Hansen, T. F. (1997). Stabilizing selection and the comparative analysis of adaptation. Evolution 51:1341-1351.',
  referenceKeys: ['voje2023', 'hansen1997'],
  plainWords: 'the trait mean moved toward an optimum that shifted once during the sequence',
  nests: {
    model: 'ou',
    condition: 'optimum_before = optimum_after',
    // Davies, R. B. (1987). Hypothesis testing when a nuisance parameter is present only under the alternative. Biometrika 74:33-43.
    chiSquareCaveat: 'not exact: the shift position exists only under the alternative and is searched, so the chi-square(1) p-value is too small (Davies 1987)',
  },
  methodsNotes: [shiftMethodsNote, {
    key: 'optimum-shift',
    sentence: () => 'In the optimum-shift model the optimum of the Ornstein–Uhlenbeck process moves once, at the last horizon before the shift, with one strength of attraction α and one step variance throughout.',
  }],
  help: {
    heading: 'optimum-shift',
    lines: [
      'ou whose optimum moves from optimum_before to optimum_after at the last horizon',
      'before the shift; one alpha and step_variance (K = 6; equal optima are ou)',
    ],
  },
  limitDrawing: {
    applies: (estimates, derived) => estimates.alpha === 0 && 'limit_drift_before' in derived && 'limit_drift_after' in derived,
    drawnAs: 'optimum-shift',
    // The expectation reads the limit's drifts at alpha = 0; the optima are not finite there (0 stands in).
    parameters: (estimates, derived) => ({
      ...estimates, optimum_before: 0, optimum_after: 0,
      limit_drift_before: derived.limit_drift_before, limit_drift_after: derived.limit_drift_after,
    }),
    words: 'alpha at its limit 0, drawn as the walk it equals there, whose drift changes at the shift',
  },
  // The optimum as a step at t_p, so the figure marks the time of the shift.
  guide: (parameters, time) => {
    const { optimum_before: before, optimum_after: after, shift_1_previous_time: previousTime } = parameters;
    if (!Number.isFinite(before) || !Number.isFinite(after) || !(parameters.alpha > 0) || time.length === 0) return null;
    const first = time[0];
    const last = time[time.length - 1];
    return { time: [first, previousTime, previousTime, last], value: [before, before, after, after], words: 'Optimum, shifting after the last horizon before the shift' };
  },
  parameters: [
    { name: 'ancestral_mean', label: 'ancestral mean', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    {
      name: 'optimum_before', label: 'optimum before the shift', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY,
      runaway: { coefficient: 1, derived: 'limit_drift_before', unit: { trait: 1, time: -1 }, limit: 'alpha-zero' },
    },
    {
      name: 'optimum_after', label: 'optimum after the shift', role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY,
      runaway: { coefficient: 2, derived: 'limit_drift_after', unit: { trait: 1, time: -1 }, limit: 'alpha-zero' },
    },
    { name: 'alpha', label: 'alpha (strength of attraction)', role: 'rate', unit: { trait: 0, time: -1 }, lowerBound: 0, halfLife: true },
    { name: 'step_variance', label: 'step variance', role: 'variance', unit: { trait: 2, time: -1 }, lowerBound: 0, rate: 'step-variance' },
  ],
  process: ornsteinUhlenbeck.process,
  minimumHorizons: 6,
  width: () => 3,
  parameterCount: () => 6,
  configurations: (lineage, options) => shiftPlacements(lineage.mean.length, 1, minimumSegmentOf(options, 3)),
  shiftCount: 1,
  fillSpace(lineage, process, space) {
    const alpha = process[0];
    const stepVariance = process[1];
    const factors = shiftFactors(lineage.time, alpha, Math.round(process[2]));
    space.transition[0] = 0;
    space.processVariance[0] = 0;
    for (let i = 1; i < space.size; i++) {
      space.transition[i] = factors.transition[i];
      space.processVariance[i] = stepVariance * factors.varianceTime[i];
    }
    space.design.set(factors.design.subarray(0, 3 * space.size));
  },
  toParameters: (coefficients, process, lineage) => ({
    ancestral_mean: coefficients[0],
    optimum_before: process[0] === 0 ? Number.NaN : coefficients[1] / process[0],
    optimum_after: process[0] === 0 ? Number.NaN : coefficients[2] / process[0],
    alpha: process[0],
    step_variance: process[1],
    ...shiftEstimates(lineage, shiftsOf(process, 2, 1)),
  }),
  constantCoefficients: (process) => Float64Array.of(1, process[0], process[0]),
  fixLocation: (name, value, process) =>
    name === 'optimum_before' ? { index: 1, coefficient: value * process[0] } : name === 'optimum_after' ? { index: 2, coefficient: value * process[0] } : { index: 0, coefficient: value },
  processFrom: (parameters, lineage) => [parameters.alpha, parameters.step_variance, ...shiftIndicesFrom(parameters, 1, lineage)],
  coefficientsFrom: (parameters) => [parameters.ancestral_mean, parameters.optimum_before * parameters.alpha, parameters.optimum_after * parameters.alpha],
  meanCovariance(lineage, parameters) {
    const time = lineage.time;
    const { alpha, step_variance: stepVariance, shift_1_previous_time: previousTime } = parameters;
    return {
      mean: Float64Array.from(time, (t) => definedMean(parameters, t, previousTime)),
      covariance: buildCovariance(time.length, (i, j) =>
        (stepVariance / (2 * alpha)) * (Math.exp(-alpha * Math.abs(time[i] - time[j])) - Math.exp(-alpha * (time[i] + time[j])))),
    };
  },
  expectation(parameters, time) {
    const { ancestral_mean: start, alpha, step_variance: stepVariance, shift_1_previous_time: previousTime } = parameters;
    const atLimit = alpha === 0 && 'limit_drift_before' in parameters;
    const limitMean = (t: number): number => start + parameters.limit_drift_before * Math.min(t, previousTime) + parameters.limit_drift_after * Math.max(0, t - previousTime);
    return {
      mean: Float64Array.from(time, (t) => (atLimit ? limitMean(t) : definedMean(parameters, t, previousTime))),
      variance: Float64Array.from(time, (t) => stepVariance * relaxedTime(2 * alpha, t)),
    };
  },
};
