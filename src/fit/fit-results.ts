import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import type { IntervalMethod } from './intervals.js';

// The results of fitting (issue 13/22: results types in a module of their own,
// statsmodels' habit): plain data every output reads. The fitter
// (fit-model.ts), the configuration search (fit-configurations.ts) and the
// interval methods import them from here, so none of them imports another
// for its types.

/** A parameter estimate with its 95% profile-likelihood interval. */
export interface ParameterEstimate {
  /** Maximum-likelihood estimate, or null when it is not finite (e.g. the optimum at the alpha -> 0 limit). */
  readonly estimate: number | null;
  /** Interval ends; null when the interval is open (reaches a limit). */
  readonly lower: number | null;
  readonly upper: number | null;
  /** "zero" when the estimate sits on the bound 0; a limit name ("alpha-zero", "alpha-infinite") when at a limit. */
  readonly atBound: string | null;
  /** The interval reaches the parameter's bound or limit at this end. */
  readonly lowerAtBound: boolean;
  readonly upperAtBound: boolean;
}

/** One model fitted to one lineage: plain, immutable, read by every output format. */
export interface ModelFit {
  readonly id: string;
  readonly label: string;
  /** K, number of estimated parameters. */
  readonly k: number;
  /** N, number of horizons. */
  readonly horizons: number;
  /** Maximised log-likelihood (the supremum when at a bound or limit). */
  readonly logLik: number;
  readonly converged: boolean;
  /** Why the model was not fitted or not converged, in words. */
  readonly message: string | null;
  readonly parameters: Readonly<Record<string, ParameterEstimate>>;
  /** Derived quantities (half_life of a model with alpha; ou's limit_drift at alpha = 0). */
  readonly derived: Readonly<Record<string, ParameterEstimate>>;
  /** Process values at the maximum (search space) and design coefficients. */
  readonly process: readonly number[];
  readonly estimates: Readonly<Record<string, number>>;
  /** Estimates at a bound or a limit, in words, for warnings. */
  readonly flags: readonly string[];
  /** Which interval method produced lower/upper. */
  readonly intervalMethod: string;
  readonly evaluations: number;
  /** Model-specific extra fields for the JSON (e.g. `shifts` of a shift model). */
  readonly extra?: Readonly<Record<string, unknown>>;
}

/** Options of {@link fitModel}. */
export interface FitOptions {
  /** Compute 95% profile-likelihood intervals (default true). */
  intervals?: boolean;
  /** Grid points per process axis of the search (default 24). */
  gridPoints?: number;
  /** How intervals are made (default 'profile'; see `intervals.ts`). */
  intervalMethod?: IntervalMethod;
  /** Replicates and seed of the 'bootstrap' interval method (default 199 and 1). */
  bootstrapReplicates?: number;
  bootstrapSeed?: number;
  /** Fewest horizons per segment of a shift model (default `defaultMinimumSegment`, 5). */
  minimumSegment?: number;
  /** Only these parameters get intervals (default all); the others keep their estimate with no ends. For coverage studies. */
  intervalParameters?: readonly string[];
  /** Called during the configuration search of shift models (screen, then refine). */
  onProgress?: (progress: SearchProgress) => void;
}

/** Progress of a configuration search, for a progress bar. */
export interface SearchProgress {
  readonly model: string;
  /** "screen" (the bounds of every configuration, fast) or "refine" (full searches). */
  readonly stage: 'screen' | 'refine';
  readonly done: number;
  readonly total: number;
}

/**
 * A model that could not be fitted to this lineage, with the reason in words.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const fit = unfittedFit(randomWalk, lineage, 'too few horizons');
 * [fit.converged, fit.logLik, fit.message, fit.k]; // [false, -Infinity, 'too few horizons', 2]
 */
export const unfittedFit = (model: EvolutionModel, lineage: Lineage, message: string): ModelFit => ({
  id: model.id,
  label: model.label,
  k: model.parameterCount(lineage),
  horizons: lineage.mean.length,
  logLik: Number.NEGATIVE_INFINITY,
  converged: false,
  message,
  parameters: {},
  derived: {},
  process: [],
  estimates: {},
  flags: [],
  intervalMethod: 'profile',
  evaluations: 0,
});
