import type { Lineage } from '../lineage.js';
import { bindConfiguration, defaultMinimumSegment, type Configuration, type EvolutionModel } from '../models/model.js';
import { LikelihoodEvaluator } from './evaluator.js';
import { unfittedFit, type FitOptions, type ModelFit, type ParameterEstimate, type SearchProgress } from './fit-results.js';

export type { SearchProgress } from './fit-results.js';

/**
 * A configuration is left out when its upper bound is below the best full
 * fit by more than this (relative to |logL|, at least this absolute): room
 * for the rounding of the bound's sums.
 */
export const boundSlack = 1e-7;

type FitPlain = (model: EvolutionModel, lineage: Lineage, options: FitOptions) => ModelFit;

/**
 * Fit a model with discrete configurations (shift positions) and report the
 * best with profile intervals conditional on its configuration. Never leaves
 * out the best configuration (issue 25): a model with `screenBound` (an upper
 * bound of each configuration's maximum, e.g. the punctuated models' closed
 * form) has its configurations searched in full from the highest bound down
 * until the next bound is below the best full fit; every other model has
 * every configuration searched in full.
 *
 * The result carries the family's id and K, the process vector with the
 * shifts appended (so the family model reproduces the fit), and `extra.shifts`
 * for the JSON: one `{ index, age | time }` per shift.
 *
 * @param fitPlain the fitter of models without configurations (fitModel)
 *
 * @example
 * // Two flat stretches, 0 then 2: the best single shift starts the second segment at horizon 4.
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 0.1, -0.1, 0, 2, 2.1, 1.9, 2], samplingVariance: Array(8).fill(0.01) });
 * fitOverConfigurations(punctuatedOne, lineage, { intervals: false, minimumSegment: 3 }, fitModel).extra.shifts; // [{ index: 4, time: 4 }]
 */
export function fitOverConfigurations(model: EvolutionModel, lineage: Lineage, options: FitOptions, fitPlain: FitPlain): ModelFit {
  const configurations = model.configurations?.(lineage, { minimumSegment: options.minimumSegment }) ?? [];
  const minimumSegment = options.minimumSegment ?? defaultMinimumSegment;
  if (configurations.length === 0) {
    return unfittedFit(
      model,
      lineage,
      `not fitted: ${lineage.mean.length} horizons leave no admissible shift position with segments of at least ${minimumSegment} horizons (--min-segment)`,
    );
  }
  const quick: FitOptions = { ...options, intervals: false, onProgress: undefined };
  const report = (stage: SearchProgress['stage'], done: number, total: number): void => options.onProgress?.({ model: model.id, stage, done, total });
  let order = Array.from(configurations.keys());
  let bounds: Float64Array | null = null;
  if (model.screenBound) {
    report('screen', 0, configurations.length);
    const found = model.screenBound(lineage, configurations);
    bounds = found;
    // NaN bounds (no bound known) go first, as +infinity.
    const key = (c: number): number => (Number.isNaN(found[c]) ? Number.POSITIVE_INFINITY : found[c]);
    order = order.sort((left, right) => key(right) - key(left) || left - right);
    report('screen', configurations.length, configurations.length);
  }
  let best: { configuration: Configuration; logLik: number } | null = null;
  let searched = 0;
  const step = Math.max(1, Math.floor(order.length / 100));
  for (const c of order) {
    if (bounds !== null && best !== null && bounds[c] < best.logLik - boundSlack * Math.max(1, Math.abs(best.logLik))) break;
    const fit = fitAtConfiguration(model, lineage, configurations[c], quick, fitPlain);
    searched += 1;
    if (fit.converged && (best === null || fit.logLik > best.logLik)) best = { configuration: configurations[c], logLik: fit.logLik };
    if (searched % step === 0) report('refine', searched, order.length);
  }
  report('refine', order.length, order.length);
  const chosen = best as { configuration: Configuration; logLik: number } | null;
  if (chosen === null) return unfittedFit(model, lineage, 'not fitted: no shift position gave a converged fit');
  const final = fitAtConfiguration(model, lineage, chosen.configuration, options, fitPlain);
  // The shift times go with the parameters (no interval: the positions are discrete), so that readers of the
  // JSON params alone (figures) can rebuild the model's expectation.
  const shiftParameters: Record<string, ParameterEstimate> = {};
  for (const [name, value] of Object.entries(final.estimates)) {
    if (/^shift_\d+_(previous_)?time$/.test(name)) {
      shiftParameters[name] = { estimate: value, lower: null, upper: null, atBound: null, lowerAtBound: false, upperAtBound: false };
    }
  }
  return {
    ...final,
    parameters: { ...final.parameters, ...shiftParameters },
    extra: {
      ...(final.extra ?? {}),
      shifts: shiftRecords(lineage, chosen.configuration.shifts),
      shift_search: { configurations: configurations.length, searched_in_full: searched, minimum_segment: minimumSegment },
    },
  };
}

/**
 * JSON records of shifts: 0-based index of the first horizon of the new
 * segment and its age (for ages, and for heights/depths placed by an age
 * model: age = firstAge - t, with the height or depth as read beside it), or
 * its elapsed time for "time" input.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5], mean: [0, 0, 0, 1, 1, 1], samplingVariance: Array(6).fill(0.1) });
 * shiftRecords(lineage, [3]); // [{ index: 3, time: 3 }]
 */
export function shiftRecords(lineage: Lineage, shifts: readonly number[]): Record<string, number>[] {
  return shifts.map((index) => {
    const record: Record<string, number> = { index };
    if (lineage.positionKind === 'age') record.age = lineage.position[index];
    else if (lineage.positionKind === 'time' || lineage.firstAge === undefined) record.time = lineage.time[index];
    else {
      record.age = lineage.firstAge - lineage.time[index];
      record[lineage.positionKind] = lineage.position[index];
    }
    return record;
  });
}

/**
 * Fit a configured model at one configuration: block by block when its
 * likelihood separates (each block a plain model on its own horizons),
 * otherwise the bound model in full. The result speaks for the family model
 * (its id, K, and a process vector with the shifts appended).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 0.1, -0.1, 0, 2, 2.1, 1.9, 2], samplingVariance: Array(8).fill(0.01) });
 * const fit = fitAtConfiguration(punctuatedOne, lineage, { shifts: [4] }, { intervals: false }, fitModel);
 * fit.estimates.segment_1_mean; // 0 (to 1e-12; the mean of 0, 0.1, -0.1, 0)
 * fit.estimates.segment_2_mean; // 2 (to 1e-12; the mean of 2, 2.1, 1.9, 2)
 * fit.estimates.shift_1_time; // 4
 */
export function fitAtConfiguration(
  model: EvolutionModel,
  lineage: Lineage,
  configuration: Configuration,
  options: FitOptions,
  fitPlain: FitPlain,
): ModelFit {
  const k = model.parameterCount(lineage);
  if (!model.blocks) {
    const fit = fitPlain(bindConfiguration(model, configuration), lineage, options);
    return { ...fit, id: model.id, label: model.label, k, process: fit.converged ? [...fit.process, ...configuration.shifts] : fit.process };
  }
  const blocks = model.blocks(lineage, configuration);
  const fits = blocks.map((block) => fitPlain(block.model, block.lineage, options));
  const failed = fits.findIndex((fit) => !fit.converged);
  if (failed >= 0) return unfittedFit(model, lineage, `segment ${failed + 1}: ${fits[failed].message ?? 'not fitted'}`);
  const parameters: Record<string, ParameterEstimate> = {};
  const derived: Record<string, ParameterEstimate> = {};
  const flags: string[] = [];
  blocks.forEach((block, b) => {
    const rename = (name: string): string => block.names[name] ?? name;
    for (const [name, estimate] of Object.entries(fits[b].parameters)) parameters[rename(name)] = estimate;
    for (const [name, estimate] of Object.entries(fits[b].derived)) derived[rename(name)] = estimate;
    for (const flag of fits[b].flags) {
      const [first, ...rest] = flag.split(' ');
      flags.push([rename(first), ...rest].join(' '));
    }
  });
  const process = [...fits.flatMap((fit) => fit.process), ...configuration.shifts];
  // The family's own filter at the block estimates: the reported logL is exactly the likelihood at the reported estimates.
  const evaluator = new LikelihoodEvaluator(model, lineage);
  const details = evaluator.details(process);
  return {
    id: model.id,
    label: model.label,
    k,
    horizons: lineage.mean.length,
    logLik: details.logLik,
    converged: Number.isFinite(details.logLik),
    message: Number.isFinite(details.logLik) ? null : 'not fitted: the likelihood is not finite at the block estimates',
    parameters,
    derived,
    process,
    estimates: model.toParameters(details.coefficients, process, lineage),
    flags,
    intervalMethod: fits[0].intervalMethod,
    evaluations: fits.reduce((total, fit) => total + fit.evaluations, 1),
  };
}

