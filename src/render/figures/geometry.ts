import type { EvolutionModel } from '../../models/model.js';
import { findModel } from '../../models/registry.js';
import type { FigureLineage, FigureModel } from './figure-input.js';
import { traitUnitLabel } from '../units.js';

/**
 * Two-sided 95% quantile of the standard normal distribution, 1.959964
 * (closed form: Φ⁻¹(0.975)); the figures' intervals and envelopes are
 * mean ± this × standard deviation.
 */
export const normal95 = 1.959963984540054;

/** How the time axis of a figure is labelled and which way it runs. */
export interface TimeAxis {
  /** 'age': ages before present (older = larger); 'time': time as read; 'elapsed': time since the oldest horizon. */
  readonly kind: 'age' | 'time' | 'elapsed';
  /** Axis title with its unit, e.g. "Age (Ma)". */
  readonly title: string;
  /**
   * True when larger values are younger-to-older the wrong way for chart
   * defaults: ages grow into the past, so the age axis is reversed to put the
   * oldest horizon at the bottom (stratigraphic) or at the left (horizontal).
   */
  readonly reverse: boolean;
  /** Axis value of a lineage's elapsed time t (t = 0 at its oldest horizon). */
  toAxis(lineage: FigureLineage, elapsed: number): number;
}

/**
 * Unit label for ages before present: Myr → Ma, kyr → ka, yr → yr BP (common practice); any other label as given.
 *
 * @example
 * ageUnitLabel('Myr'); // 'Ma'
 * ageUnitLabel('yr'); // 'yr BP'
 * ageUnitLabel('varves'); // 'varves'
 */
export function ageUnitLabel(timeUnit: string): string {
  const key = timeUnit.trim().toLowerCase();
  if (key === 'myr' || key === 'ma') return 'Ma';
  if (key === 'kyr' || key === 'ka') return 'ka';
  if (key === 'yr' || key === 'a' || key === 'years') return 'yr BP';
  return timeUnit;
}

/**
 * The time axis shared by one or several lineages. Ages are drawn as read
 * (so horizons of different sections line up by age); heights and depths
 * are drawn at the ages their age model gave them (`first_age` − t) when the
 * document carries `first_age`, and as time since the oldest horizon
 * otherwise.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis], { intervals: false })));
 * timeAxisFor([view]).title; // 'Time (Myr)'
 * timeAxisFor([view]).toAxis(view, 2); // 2
 */
export function timeAxisFor(lineages: readonly FigureLineage[]): TimeAxis {
  const unit = lineages[0]?.timeUnit ?? 'Myr';
  const kinds = new Set(lineages.map((lineage) => lineage.positionKind));
  const aged = lineages.every((lineage) => lineage.positionKind === 'age' || ((lineage.positionKind === 'height' || lineage.positionKind === 'depth') && lineage.firstAge !== null));
  if (aged) {
    return {
      kind: 'age',
      title: `Age (${ageUnitLabel(unit)})`,
      reverse: true,
      // Heights and depths are placed by the age model: age_i = first_age - t_i.
      toAxis: (lineage, elapsed) => (lineage.positionKind === 'age' ? lineage.position[0] : (lineage.firstAge as number)) - elapsed,
    };
  }
  if (kinds.size === 1 && kinds.has('time')) {
    return {
      kind: 'time',
      title: `Time (${unit})`,
      reverse: false,
      toAxis: (lineage, elapsed) => lineage.position[0] + elapsed,
    };
  }
  return {
    kind: 'elapsed',
    title: `Time since oldest horizon (${unit})`,
    reverse: false,
    toAxis: (_lineage, elapsed) => elapsed,
  };
}

/**
 * Trait axis title: the trait's name (or "trait"), marked when on the
 * natural-log scale, with the trait unit when the document has one.
 *
 * @example
 * traitAxisTitle({ trait: 'shell length', transform: 'none' }); // 'Shell length (mean per horizon)'
 * traitAxisTitle({ trait: 'shell length', transform: 'none', traitUnit: 'mm' }); // 'Shell length (mm, mean per horizon)'
 * traitAxisTitle({ trait: 'shell length', transform: 'ln', traitUnit: 'mm' }); // 'ln shell length (ln mm, mean per horizon)'
 */
export function traitAxisTitle(lineage: Pick<FigureLineage, 'trait' | 'transform'> & { readonly traitUnit?: string | null }): string {
  const name = lineage.trait === '' ? 'trait' : lineage.trait;
  const capital = name.charAt(0).toUpperCase() + name.slice(1);
  const logged = lineage.transform === 'ln';
  const unit = lineage.traitUnit ? `${traitUnitLabel(lineage.traitUnit, logged, '')}, ` : '';
  return logged ? `ln ${name} (${unit}mean per horizon)` : `${capital} (${unit}mean per horizon)`;
}

/** Each horizon: its axis time, mean and 95% sampling interval mean ± 1.96 √e_i. */
export interface HorizonMark {
  readonly time: number;
  readonly mean: number;
  readonly lower: number;
  readonly upper: number;
}

/**
 * Horizon means with their 95% sampling intervals (±1.96 √e_i), on the axis' time scale.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis], { intervals: false })));
 * const [first] = horizonMarks(view, timeAxisFor([view]));
 * first.lower; // 0.6080072030919892 (to 1e-12; 1 - 1.959964 × 0.2, z of the normal 97.5% quantile)
 * first.upper; // 1.3919927969080108 (to 1e-12; 1 + 1.959964 × 0.2)
 */
export function horizonMarks(lineage: FigureLineage, axis: TimeAxis): HorizonMark[] {
  return lineage.mean.map((mean, i) => {
    const half = normal95 * Math.sqrt(Math.max(0, lineage.samplingVariance[i]));
    return { time: axis.toAxis(lineage, lineage.time[i]), mean, lower: mean - half, upper: mean + half };
  });
}

/** A model's expected trajectory with its 95% envelope, sampled along the lineage's time span. */
export interface ModelCurve {
  readonly id: string;
  readonly label: string;
  readonly isBest: boolean;
  readonly weight: number | null;
  /** Axis times of the samples, oldest first. */
  readonly time: readonly number[];
  readonly mean: readonly number[];
  readonly lower: readonly number[];
  readonly upper: readonly number[];
  /** True when the envelope has width (false for strict stasis: the line alone is drawn). */
  readonly hasEnvelope: boolean;
  /** When the fit sits at a limit the model equals another model at: what is drawn instead, in words (else null). */
  readonly limit: string | null;
  /** A dashed line the model asks for beside its trajectory (`EvolutionModel.guide`: a moving or shifting optimum), on the axis' time scale; else null. */
  readonly guide: { readonly time: readonly number[]; readonly value: readonly number[]; readonly words: string } | null;
}

/** The model's guide line at the curve's times, on the axis' time scale, or null. */
function guideOf(definition: EvolutionModel, estimates: Record<string, number>, lineage: FigureLineage, axis: TimeAxis, times: readonly number[]): ModelCurve['guide'] {
  const guide = definition.guide?.(estimates, lineage.curveOrigin === 0 ? times : times.map((t) => t + lineage.curveOrigin));
  if (!guide || !guide.value.every(Number.isFinite)) return null;
  return { time: guide.time.map((t) => axis.toAxis(lineage, t - lineage.curveOrigin)), value: guide.value, words: guide.words };
}

/** Why a model's curve cannot be drawn, or the curve. */
export type ModelCurveResult = { readonly curve: ModelCurve; readonly reason: null } | { readonly curve: null; readonly reason: string };

/** Number of samples of a model curve between the first and last horizon (besides the horizons themselves). */
export const curveSamples = 160;

/**
 * The model to draw: the one asked for, else the best-supported one.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })));
 * chosenModel(view, null).model.id; // 'strict-stasis' (the best supported)
 * chosenModel(view, 'ou'); // { model: null, reason: 'model "ou" is not in this fit' }
 */
export function chosenModel(lineage: FigureLineage, requested: string | null): { model: FigureModel | null; reason: string | null } {
  const id = requested ?? lineage.bestModel;
  if (id === null) return { model: null, reason: 'no model was compared' };
  const model = lineage.models.find((candidate) => candidate.id === id);
  if (!model) return { model: null, reason: `model "${id}" is not in this fit` };
  return { model, reason: null };
}

/**
 * The expected trajectory E[x(t)] and 95% envelope E ± 1.96 √Var of a fitted
 * model, from the model's own `expectation` (src/models): walks a + δt with
 * variance σ²t from the first horizon, stasis θ ± 1.96 √ω, OU its mean and
 * variance curves, strict stasis θ. The envelope is the model's process
 * alone (the spread of the true lineage mean), not sampling error.
 *
 * @param lineage - the lineage document
 * @param axis - the time axis the curve is drawn on
 * @param requested - model id, or null for the best-supported model
 *
 * A fitted model at a limit where its own parameters do not exist is drawn
 * as the model says (`EvolutionModel.limitDrawing`): ou at alpha = 0
 * (`alpha-zero`) as the directional walk with drift `limit_drift` =
 * (optimum − a) alpha (MODELS.md; the optimum is then infinite and fit.json
 * reports it as null).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis], { intervals: false })));
 * const { curve } = modelCurve(view, timeAxisFor([view]), null);
 * curve.id; // 'strict-stasis'
 * new Set(curve.mean); // new Set([2]) (strict stasis: the mean 2 everywhere)
 */
export function modelCurve(lineage: FigureLineage, axis: TimeAxis, requested: string | null): ModelCurveResult {
  const { model, reason } = chosenModel(lineage, requested);
  if (!model) return { curve: null, reason: reason ?? 'no model' };
  const drawing = findModel(model.id)?.limitDrawing;
  const rule = drawing && drawing.applies(model.estimates, model.derived) ? drawing : null;
  const definition = findModel(rule ? rule.drawnAs : model.id);
  if (!definition) return { curve: null, reason: `model "${model.id}" is not known to this version of the tool` };
  const estimates = rule ? rule.parameters(model.estimates, model.derived) : model.estimates;
  const missing = definition.parameters.filter((parameter) => !(parameter.name in estimates) || !Number.isFinite(estimates[parameter.name])).map((parameter) => parameter.name);
  if (missing.length > 0) return { curve: null, reason: `${model.label} was not fitted (no estimate of ${missing.join(', ')})` };
  const span = lineage.time[lineage.time.length - 1];
  const grid = new Set<number>(lineage.time);
  for (let k = 0; k <= curveSamples; k++) grid.add((span * k) / curveSamples);
  const times = [...grid].sort((a, b) => a - b);
  const expectation = definition.expectation(estimates, lineage.curveOrigin === 0 ? times : times.map((t) => t + lineage.curveOrigin));
  const mean: number[] = [];
  const lower: number[] = [];
  const upper: number[] = [];
  let hasEnvelope = false;
  for (let i = 0; i < times.length; i++) {
    const variance = Math.max(0, expectation.variance[i]);
    const half = normal95 * Math.sqrt(variance);
    if (!Number.isFinite(expectation.mean[i]) || !Number.isFinite(half)) {
      return { curve: null, reason: `${model.label}: expected trajectory is not finite at t = ${times[i]}` };
    }
    if (half > 0) hasEnvelope = true;
    mean.push(expectation.mean[i]);
    lower.push(expectation.mean[i] - half);
    upper.push(expectation.mean[i] + half);
  }
  return {
    curve: {
      id: model.id,
      label: model.label,
      isBest: model.id === lineage.bestModel,
      weight: model.weight,
      time: times.map((t) => axis.toAxis(lineage, t)),
      mean,
      lower,
      upper,
      hasEnvelope,
      limit: rule ? rule.words : null,
      guide: guideOf(definition, estimates, lineage, axis, times),
    },
    reason: null,
  };
}

/**
 * The smoothed lineage mean with its 95% band (mean ± 1.96 standard errors) at each horizon, or null.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis], { intervals: false })));
 * smoothedBand(view, timeAxisFor([view])).mean; // [2, 2, 2] (strict stasis: no process, the fitted mean)
 * smoothedBand({ ...view, smoothed: null }, timeAxisFor([view])); // null
 */
export function smoothedBand(lineage: FigureLineage, axis: TimeAxis): { model: string; time: number[]; mean: number[]; lower: number[]; upper: number[] } | null {
  const smoothed = lineage.smoothed;
  if (!smoothed) return null;
  const time = lineage.time.map((t) => axis.toAxis(lineage, t));
  const lower = smoothed.mean.map((m, i) => m - normal95 * smoothed.standardError[i]);
  const upper = smoothed.mean.map((m, i) => m + normal95 * smoothed.standardError[i]);
  return { model: smoothed.model, time, mean: [...smoothed.mean], lower, upper };
}

/**
 * Axis limits: the data's extent widened by 4% at each end (a flat extent by
 * 5% of its value, or 1), so no mark sits on the frame and no axis runs on
 * to the next round number with nothing in it. Common practice in plotting.
 *
 * @example
 * paddedLimits([0, 10]); // { min: -0.4, max: 10.4 }
 * paddedLimits([5, 5]); // { min: 4.73, max: 5.27 }
 */
export function paddedLimits(values: readonly number[]): { min: number; max: number } {
  let low = Math.min(...values);
  let high = Math.max(...values);
  if (!(high > low)) {
    const half = Math.abs(low) * 0.05 || 1;
    low -= half;
    high += half;
  }
  const pad = (high - low) * 0.04;
  return { min: low - pad, max: high + pad };
}
