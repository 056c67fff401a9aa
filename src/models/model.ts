import type { SpaceDerivative } from '../engine/kalman-score.js';
import type { StateSpace } from '../engine/state-space.js';
import type { Lineage } from '../lineage.js';

/** Role of a parameter: a location (enters the mean linearly), a variance, or a rate such as alpha. */
export type ParameterRole = 'location' | 'variance' | 'rate';

/** Unit of a parameter as powers of the trait unit and the time unit (drift: trait^1 time^-1). */
export interface UnitPowers {
  readonly trait: number;
  readonly time: number;
}

/** One reported parameter of a model. */
export interface ParameterSpec {
  /** Name exactly as in MODELS.md (snake_case, used in JSON and CSV). */
  readonly name: string;
  /** Words for tables and figures. */
  readonly label: string;
  readonly role: ParameterRole;
  readonly unit: UnitPowers;
  /** Lower bound of the parameter (0 for variances and alpha; -Infinity for locations). */
  readonly lowerBound: number;
  /**
   * What kind of rate of the lineage mean this parameter is, for `--rates`
   * (darwins, haldanes, Lynch's Delta): a drift (trait per time) or a step
   * variance (trait^2 per time). Left out for parameters that are not a rate
   * of the lineage itself (e.g. the movement of an optimum).
   */
  readonly rate?: 'drift' | 'step-variance';
  /** Set on a rate parameter such as alpha: the fit also reports half_life = ln 2 / value, with its interval. */
  readonly halfLife?: boolean;
  /**
   * A location parameter that is not finite where the first process axis
   * sits at its lower limit 0 (ou's optimum as alpha -> 0): there the
   * parameter is reported as null, design coefficient `coefficient` is
   * reported instead as the derived quantity `derived` (unit `unit`), and its
   * sign tells on which side the parameter's interval is open.
   */
  readonly runaway?: RunawayAtLimit;
  /**
   * A parameter that may take either sign, searched through a positive axis
   * of another name (searched on a log scale like every axis) of which it
   * is an increasing function: its estimate comes from `toParameters`, its
   * profile interval is the axis's, mapped (an end at the axis's range is
   * open).
   */
  readonly searchedAs?: SearchedAs;
}

/** The positive axis a signed parameter is searched through (see {@link ParameterSpec.searchedAs}). */
export interface SearchedAs {
  readonly axis: string;
  /** The parameter's value at an axis value (increasing). */
  fromAxis(value: number, lineage: Lineage): number;
  /** The axis value at a parameter value. */
  toAxis(value: number, lineage: Lineage): number;
}

/**
 * Index of the searched axis behind parameter `name` (the axis of that name,
 * or the one it is searched through), or -1 for a location parameter.
 *
 * @example
 * axisIndexOf(randomWalk, 'step_variance'); // 0
 * axisIndexOf(randomWalk, 'ancestral_mean'); // -1 (a location: never searched)
 * axisIndexOf(acceleratingWalk, 'rate_change'); // 0 (searched through variance_growth)
 */
export function axisIndexOf(model: Pick<EvolutionModel, 'process' | 'parameters'>, name: string): number {
  const own = model.process.findIndex((axis) => axis.name === name);
  if (own >= 0) return own;
  const through = model.parameters.find((spec) => spec.name === name)?.searchedAs?.axis;
  return through === undefined ? -1 : model.process.findIndex((axis) => axis.name === through);
}

/** How a location parameter runs off to ±∞ at the zero limit of the first process axis (see {@link ParameterSpec.runaway}). */
export interface RunawayAtLimit {
  /** Index of the design coefficient that stays finite at the limit. */
  readonly coefficient: number;
  /** Name of the derived quantity reporting that coefficient (e.g. `limit_drift`). */
  readonly derived: string;
  readonly unit: UnitPowers;
  /** Name of the limit the derived quantity is reported at (e.g. `alpha-zero`). */
  readonly limit: string;
}

/** A model's entry in `stratotrend fit --help`; a family of models shares one entry, given by one of them. */
export interface HelpEntry {
  /** The id, or the ids or pattern the entry covers (e.g. "punctuated-1, punctuated-2"). */
  readonly heading: string;
  /** The text, already wrapped; a heading of up to 16 characters has the first line beside it. */
  readonly lines: readonly string[];
}

/**
 * The classic model a newer model reduces to when one of its parameters
 * takes a fixed value (e.g. accelerating-walk at rate_change = 0 is
 * random-walk): `bootstrap --models` tests the model against it by a
 * parametric-bootstrap likelihood ratio.
 */
export interface NestedModel {
  /** Id of the nested (null) model. */
  readonly model: string;
  /** The restriction in words, e.g. "rate_change = 0". */
  readonly condition: string;
  /**
   * Why the chi-square(1) reference of the likelihood ratio is not exact
   * even asymptotically (e.g. a parameter that exists only under the
   * alternative), or absent when it is (a regular interior restriction).
   */
  readonly chiSquareCaveat?: string;
}

/** A sentence the report's methods paragraph adds when a model is fitted; models sharing `key` add it once. */
export interface MethodsNote {
  readonly key: string;
  /** The sentence, given the run's recorded options (e.g. `min_segment`, `covariate_file`). */
  sentence(options: Readonly<Record<string, unknown>>): string;
}

/**
 * How a fit at a limit where some parameters are not finite is drawn:
 * with the expected trajectory of model `drawnAs` (the model the fit equals
 * there) at `parameters`.
 */
export interface LimitDrawing {
  applies(estimates: Readonly<Record<string, number>>, derived: Readonly<Record<string, number>>): boolean;
  readonly drawnAs: string;
  parameters(estimates: Readonly<Record<string, number>>, derived: Readonly<Record<string, number>>): Record<string, number>;
  /** Words for the figure's note. */
  readonly words: string;
}

/**
 * One searched (nonlinear) parameter. Searched on a log scale between the
 * model's range; `allowZero` adds the bound value 0 as a candidate, because a
 * variance maximum at 0 is a legitimate answer.
 */
export interface ProcessAxis {
  readonly name: string;
  readonly allowZero: boolean;
  /**
   * Search range in natural units for this lineage, given the values already
   * chosen for the axes before it (a nested search goes axis by axis).
   */
  range(lineage: Lineage, before: readonly number[]): readonly [number, number];
  /** Name of the limit reached at each end of the range, when an end is a limit rather than a bound. */
  readonly limitNames?: readonly [string | null, string | null];
}

/** Mean vector and process covariance C of the dense form (without sampling error). */
export interface MeanCovariance {
  readonly mean: Float64Array;
  readonly covariance: number[][];
}

/** A dashed guide line of a figure: points (elapsed time, trait value), and words for the legend. */
export interface Guide {
  readonly time: readonly number[];
  readonly value: readonly number[];
  readonly words: string;
}

/** Expected trajectory of a model and the variance about it, at given times. */
export interface Expectation {
  readonly mean: Float64Array;
  readonly variance: Float64Array;
}

/**
 * Everything the engine, fitter, simulator and renderer need to know about a
 * model. Adding a model means one file implementing this, plus an entry in the
 * registry and its tests.
 */
export interface EvolutionModel {
  readonly id: string;
  /** Name in words, e.g. "directional walk (general random walk)". */
  readonly label: string;
  /** The label of a fit at these estimates, when it depends on them (e.g. "decelerating" for a negative rate). */
  labelFor?(estimates: Readonly<Record<string, number>>): string;
  /** One-sentence definition for `--help` and the README. */
  readonly summary: string;
  /** Where the model's likelihood comes from. */
  readonly citation: string;
  /**
   * Keys of the report's reference catalogue (`render/report/references.ts`)
   * the model cites; without them the report cites `citation` itself.
   */
  readonly referenceKeys?: readonly string[];
  /** What the model says in plain words when best supported, for the report's summary ("the trait mean …"). */
  readonly plainWords?: string;
  /** Its entry in `stratotrend fit --help` (a family's other members leave it out). */
  readonly help?: HelpEntry;
  /** The classic model this one reduces to under a restriction, for `bootstrap --models` (absent: it nests none). */
  readonly nests?: NestedModel;
  /** Sentences the report's methods paragraph adds when the model is fitted (each once per key, shared by a family). */
  readonly methodsNotes?: readonly MethodsNote[];
  /** The report's reading caution when this model is best supported: a trend, or a form of stasis. */
  readonly caution?: 'directional' | 'stasis';
  /**
   * Why `compare` cannot fit this model as one process shared by sections
   * that each keep their own times (the "shared" hypothesis), or absent when
   * it can; the model is then compared as separate and shared-offset only.
   */
  readonly notShared?: string;
  /** How figures draw a fit at a limit where some parameters are not finite. */
  readonly limitDrawing?: LimitDrawing;
  /**
   * A line the trajectory figure draws dashed beside the expected
   * trajectory (e.g. a moving or shifting optimum), at given elapsed times;
   * null when there is none at these estimates.
   */
  guide?(parameters: Record<string, number>, time: readonly number[]): Guide | null;
  readonly parameters: readonly ParameterSpec[];
  /** Searched parameters in search order; the remaining location parameters are profiled by GLS. */
  readonly process: readonly ProcessAxis[];
  /** Number of design columns for this lineage. */
  width(lineage: Lineage): number;
  /** K: the number of estimated parameters counted in AICc. */
  parameterCount(lineage: Lineage): number;
  /** Fewest horizons for which the model can be fitted at all. */
  readonly minimumHorizons: number;
  /** Fill transition, process variance and design for the given process values. */
  fillSpace(lineage: Lineage, process: ArrayLike<number>, space: StateSpace): void;
  /**
   * Fill the derivatives of what {@link EvolutionModel.fillSpace} fills with
   * respect to each process value (natural units, one entry of `derivatives`
   * per axis), for the score recursions of `engine/kalman-score.ts`. Models
   * without it are searched on values only.
   */
  fillSpaceDerivatives?(lineage: Lineage, process: ArrayLike<number>, derivatives: readonly SpaceDerivative[]): void;
  /** Natural parameters from design coefficients and process values. */
  toParameters(coefficients: ArrayLike<number>, process: ArrayLike<number>, lineage: Lineage): Record<string, number>;
  /** Design coefficients that reproduce the constant mean 1 (so the trait can be centred). */
  constantCoefficients(process: ArrayLike<number>, lineage: Lineage): Float64Array;
  /**
   * For a location parameter held at `value`: which design coefficient that
   * fixes and at what value, given the process values.
   */
  fixLocation(name: string, value: number, process: ArrayLike<number>, lineage: Lineage): { index: number; coefficient: number };
  /** Process values from natural parameters (inverse of the process part of toParameters). */
  processFrom(parameters: Record<string, number>, lineage: Lineage): number[];
  /** Design coefficients from natural parameters. */
  coefficientsFrom(parameters: Record<string, number>, lineage: Lineage): number[];
  /** Dense mean and covariance straight from the MODELS.md table (reference and simulation). */
  meanCovariance(lineage: Lineage, parameters: Record<string, number>): MeanCovariance;
  /** Expected trajectory and its variance about the start, for figures. */
  expectation(parameters: Record<string, number>, time: ArrayLike<number>): Expectation;
  /**
   * Why the model cannot be fitted to this lineage at all (e.g. no covariate),
   * or null. Optional; a model without it is always available. A named set
   * such as `extended` leaves out models that are unavailable.
   */
  unavailable?(lineage: Lineage): string | null;
  /**
   * Discrete configurations searched exhaustively (shift positions), for
   * models with a discrete part. When present, every process vector the
   * model receives (fillSpace, toParameters, constantCoefficients,
   * fixLocation) carries the configuration's `shifts` after the searched
   * process values, and processFrom returns them in the same place; `width`
   * must not depend on the configuration. See {@link bindConfiguration}.
   */
  configurations?(lineage: Lineage, options: ConfigurationOptions): readonly Configuration[];
  /**
   * How many shifts each of its configurations places (models with
   * `configurations` only): the search visits every placement, C(N − (k+1)m + k, k)
   * of them for k shifts, N horizons and segments of at least m, so the CLI
   * states the cost and refuses what cannot be done before fitting.
   */
  readonly shiftCount?: number;
  /**
   * Optional: an upper bound, provably at or above the maximised logL, of
   * each configuration (same order). The fitter searches configurations in
   * full from the highest bound down and stops when the next bound is below
   * the best full fit, so the best configuration is never left out. Without
   * it every configuration is searched in full.
   */
  screenBound?(lineage: Lineage, configurations: readonly Configuration[]): Float64Array;
  /**
   * Optional, for a model with one shift: the state-space rows before the
   * shift (i < s) depend only on the first `prefixAxes` process values, and
   * are the same at every shift position (rows i < s of the fill at s equal
   * those of the fill at any later position). The likelihood evaluator then
   * keeps the filter's state after those rows per value of those axes and
   * resumes from it (`fit/prefix-filter.ts`; issue 14), which gives the same
   * sums bit for bit. Carried to the bound model as {@link EvolutionModel.sharedPrefix}.
   */
  readonly prefixAxes?: number;
  /**
   * Set by {@link bindConfiguration} on a model declaring `prefixAxes`:
   * rows 0 .. rows - 1 depend only on the first `axes` process values.
   */
  readonly sharedPrefix?: { readonly rows: number; readonly axes: number };
  /**
   * Optional: when the likelihood at a configuration is a sum over
   * independent blocks (block-diagonal covariance, no shared parameters),
   * each block as a plain model on a sub-lineage, in process-axis order.
   */
  blocks?(lineage: Lineage, configuration: Configuration): readonly LikelihoodBlock[];
}

/** A discrete choice of a model: where each new segment starts. */
export interface Configuration {
  /** 0-based index, from the oldest horizon, of the first horizon of each new segment; increasing. */
  readonly shifts: readonly number[];
}

/** Options of the configuration search. */
export interface ConfigurationOptions {
  /** Fewest horizons in a segment (default {@link defaultMinimumSegment}). */
  readonly minimumSegment?: number;
}

/**
 * Default fewest horizons per segment of a shift model: 5, so that each
 * segment's own mean and variance (or step variance) rest on several
 * horizons (our choice; settable with `--min-segment`).
 */
export const defaultMinimumSegment = 5;

/** One independent block of a separable likelihood. */
export interface LikelihoodBlock {
  /** A model without configurations, fitted to `lineage`. */
  readonly model: EvolutionModel;
  /** The block's horizons as a lineage of their own (time restarted at 0). */
  readonly lineage: Lineage;
  /** The block model's parameter names mapped to the family model's names. */
  readonly names: Readonly<Record<string, string>>;
}

/**
 * A model with its configuration fixed: a plain model (no configurations)
 * whose process vectors are the searched values only, the shifts appended
 * before the family model sees them.
 *
 * @example
 * const fixed = bindConfiguration(punctuatedOne, { shifts: [12] });
 * fixed.process.length; // 1 (the shared stasis variance)
 */
export function bindConfiguration(model: EvolutionModel, configuration: Configuration): EvolutionModel {
  const searched = model.process.length;
  const full = (process: ArrayLike<number>): number[] => {
    const values = Array.from(process).slice(0, searched);
    return values.concat(configuration.shifts);
  };
  // fillSpace runs at every likelihood evaluation of the shift search: one process vector per bound model, refilled (issue 14).
  const filled = new Float64Array(searched + configuration.shifts.length);
  filled.set(configuration.shifts, searched);
  return {
    ...model,
    configurations: undefined,
    screenBound: undefined,
    blocks: undefined,
    prefixAxes: undefined,
    sharedPrefix: model.prefixAxes !== undefined && configuration.shifts.length === 1 ? { rows: configuration.shifts[0], axes: model.prefixAxes } : undefined,
    fillSpace: (lineage, process, space) => {
      for (let k = 0; k < searched; k++) filled[k] = process[k];
      model.fillSpace(lineage, filled, space);
    },
    toParameters: (coefficients, process, lineage) => model.toParameters(coefficients, full(process), lineage),
    constantCoefficients: (process, lineage) => model.constantCoefficients(full(process), lineage),
    fixLocation: (name, value, process, lineage) => model.fixLocation(name, value, full(process), lineage),
    processFrom: (parameters, lineage) => model.processFrom(parameters, lineage).slice(0, searched),
  };
}

/**
 * The horizons [start, end) of a lineage as a lineage of their own, time restarted at 0.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * Array.from(sliceLineage(lineage, 1, 3).time); // [0, 2] (time restarted at the slice's first horizon)
 * Array.from(sliceLineage(lineage, 1, 3).mean); // [2, 4]
 */
export function sliceLineage(lineage: Lineage, start: number, end: number): Lineage {
  const origin = lineage.time[start];
  return {
    ...lineage,
    time: Float64Array.from(lineage.time.subarray(start, end), (t) => t - origin),
    position: lineage.position.slice(start, end),
    mean: lineage.mean.slice(start, end),
    count: lineage.count.slice(start, end),
    withinVariance: lineage.withinVariance.slice(start, end),
    samplingVariance: lineage.samplingVariance.slice(start, end),
    covariate: lineage.covariate ? lineage.covariate.slice(start, end) : null,
    lines: lineage.lines.slice(start, end),
    extrapolated: lineage.extrapolated.slice(start, end),
  };
}

/**
 * A scale for searching variances: the larger of the variance of the means
 * and the average sampling variance (never 0 unless the data are constant).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * varianceScale(lineage); // 2.333333333333333 (to 1e-15; the variance of 1, 2, 4 is 7/3, above the mean sampling variance 0.1)
 */
export function varianceScale(lineage: Lineage): number {
  // The searches ask for it on every range lookup (an O(N) pass each): kept per pair of arrays, which nothing writes to after a lineage is built.
  const kept = varianceScales.get(lineage.mean);
  if (kept !== undefined && kept.samplingVariance === lineage.samplingVariance) return kept.scale;
  const scale = computeVarianceScale(lineage);
  varianceScales.set(lineage.mean, { samplingVariance: lineage.samplingVariance, scale });
  return scale;
}

const varianceScales = new WeakMap<Float64Array, { samplingVariance: Float64Array; scale: number }>();

function computeVarianceScale(lineage: Lineage): number {
  const n = lineage.mean.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += lineage.mean[i];
  mean /= n;
  let spread = 0;
  let sampling = 0;
  for (let i = 0; i < n; i++) {
    spread += (lineage.mean[i] - mean) ** 2;
    sampling += lineage.samplingVariance[i];
  }
  const scale = Math.max(spread / Math.max(1, n - 1), sampling / n);
  if (scale > 0) return scale;
  const magnitude = Math.abs(mean);
  return magnitude > 0 ? (magnitude * 1e-8) ** 2 : 1;
}

/**
 * Search range for a stasis (or segment) variance, in trait^2: from far below
 * anything the data could resolve to far above the spread of the means.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] });
 * stasisVarianceRange(lineage); // [2.333333333333333e-9, 2333.333333333333] (1e-9 and 1e3 × varianceScale)
 */
export function stasisVarianceRange(lineage: Lineage): readonly [number, number] {
  const scale = varianceScale(lineage);
  return [1e-9 * scale, 1e3 * scale];
}

/**
 * Total time span t_m and the shortest interval between horizons.
 *
 * @example
 * timeSpan(lineageFromArrays({ time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.1, 0.1, 0.1] })); // { span: 3, shortest: 1 }
 */
export function timeSpan(lineage: Lineage): { span: number; shortest: number } {
  // Kept per time array, like varianceScale.
  const kept = timeSpans.get(lineage.time);
  if (kept !== undefined) return { span: kept.span, shortest: kept.shortest };
  const found = computeTimeSpan(lineage);
  timeSpans.set(lineage.time, found);
  return { span: found.span, shortest: found.shortest };
}

const timeSpans = new WeakMap<Float64Array, { span: number; shortest: number }>();

function computeTimeSpan(lineage: Lineage): { span: number; shortest: number } {
  const time = lineage.time;
  let shortest = Number.POSITIVE_INFINITY;
  for (let i = 1; i < time.length; i++) shortest = Math.min(shortest, time[i] - time[i - 1]);
  return { span: time[time.length - 1], shortest };
}

/**
 * A process covariance matrix built entry by entry.
 *
 * @example
 * buildCovariance(2, (i, j) => Math.min(i, j) + 1); // [[1, 1], [1, 2]]
 */
export function buildCovariance(size: number, entry: (i: number, j: number) => number): number[][] {
  return Array.from({ length: size }, (_, i) => Array.from({ length: size }, (_, j) => entry(i, j)));
}
