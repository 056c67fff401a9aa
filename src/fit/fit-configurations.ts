import type { Lineage } from '../lineage.js';
import { bindConfiguration, defaultMinimumSegment, type Configuration, type EvolutionModel } from '../models/model.js';
import { LikelihoodEvaluator } from './evaluator.js';
import { unfittedFit, type FitOptions, type ModelFit, type ParameterEstimate } from './fit-model.js';
import { nelderMead } from './optimise.js';
import { maximiseProcess } from './search.js';

/** Progress of a configuration search, for a progress bar. */
export interface SearchProgress {
  readonly model: string;
  /** "screen" (every configuration, fast) or "refine" (full search of the most promising). */
  readonly stage: 'screen' | 'refine';
  readonly done: number;
  readonly total: number;
}

/**
 * How many screened configurations are searched in full: every one whose
 * screen score is within {@link refineMargin} logL units of the best, at
 * least {@link refineAtLeast} and at most {@link refineAtMost}.
 */
export const refineMargin = 2;
export const refineAtLeast = 5;
export const refineAtMost = 40;

type FitPlain = (model: EvolutionModel, lineage: Lineage, options: FitOptions) => ModelFit;

/**
 * Fit a model with discrete configurations (shift positions): screen every
 * admissible configuration (the model's own closed-form screen, or a coarse
 * nested search with one O(N) filter pass per likelihood evaluation), search
 * the most promising in full, and report the best with profile intervals
 * conditional on its configuration. Exhaustive over configurations: every
 * admissible placement is scored.
 *
 * The result carries the family's id and K, the process vector with the
 * shifts appended (so the family model reproduces the fit), and `extra.shifts`
 * for the JSON: one `{ index, age | time }` per shift.
 *
 * @param fitPlain the fitter of models without configurations (fitModel)
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
  let scores: Float64Array;
  if (model.screen) {
    report('screen', 0, configurations.length);
    scores = model.screen(lineage, configurations);
    report('screen', configurations.length, configurations.length);
  } else {
    scores = new Float64Array(configurations.length);
    const step = Math.max(1, Math.floor(configurations.length / 100));
    let previous: number[] | null = null;
    configurations.forEach((configuration, c) => {
      if (model.blocks) {
        scores[c] = fitAtConfiguration(model, lineage, configuration, quick, fitPlain).logLik;
      } else {
        const screened = screenConfiguration(model, lineage, configuration, c % warmRestartEvery === 0 ? null : previous);
        scores[c] = screened.logLik;
        previous = Number.isFinite(screened.logLik) ? screened.process : null;
      }
      if (c % step === 0) report('screen', c + 1, configurations.length);
    });
    report('screen', configurations.length, configurations.length);
  }
  const order = Array.from(scores.keys()).filter((c) => Number.isFinite(scores[c])).sort((left, right) => scores[right] - scores[left] || left - right);
  if (order.length === 0) return unfittedFit(model, lineage, 'not fitted: the likelihood is not finite at any shift position');
  const bestScore = scores[order[0]];
  const candidates = order.filter((c, rank) => rank < refineAtLeast || scores[c] >= bestScore - refineMargin).slice(0, refineAtMost);
  let best: { configuration: Configuration; logLik: number } | null = null;
  candidates.forEach((c, done) => {
    const fit = fitAtConfiguration(model, lineage, configurations[c], quick, fitPlain);
    if (fit.converged && (best === null || fit.logLik > best.logLik)) best = { configuration: configurations[c], logLik: fit.logLik };
    report('refine', done + 1, candidates.length);
  });
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
      shift_search: { configurations: configurations.length, searched_in_full: candidates.length, minimum_segment: minimumSegment },
    },
  };
}

/** A warm-started screen restarts with the coarse nested search every this many configurations. */
export const warmRestartEvery = 32;

/**
 * Screen score of one configuration of a non-separable model: the coarse
 * nested search (8 grid points per axis, Brent refinement) from scratch, or,
 * given the maximum of the neighbouring configuration (shift optima move
 * little between neighbouring positions), a Nelder–Mead search on the log
 * process values started there. Each likelihood evaluation is one O(N)
 * filter pass. Only a ranking: the best configurations are searched in full.
 */
export function screenConfiguration(
  model: EvolutionModel,
  lineage: Lineage,
  configuration: Configuration,
  start: readonly number[] | null,
): { logLik: number; process: number[] } {
  const bound = bindConfiguration(model, configuration);
  const evaluator = new LikelihoodEvaluator(bound, lineage);
  const profile = (process: number[]): number => evaluator.profile(process);
  if (start === null || bound.process.length === 0) {
    const found = maximiseProcess(profile, bound.process, lineage, { points: 8 });
    return { logLik: found.logLik, process: found.process };
  }
  const floors = bound.process.map((axis, level) => axis.range(lineage, start.slice(0, level))[0]);
  const toLog = start.map((value, level) => Math.log(Math.max(value, floors[level])));
  const found = nelderMead((logs) => -profile(logs.map(Math.exp)), toLog, { step: toLog.map(() => 1), tolerance: 1e-6, maxEvaluations: 60 * bound.process.length, restarts: 0 });
  const process = found.at.map(Math.exp);
  return { logLik: -found.value, process };
}

/**
 * JSON records of shifts: 0-based index of the first horizon of the new
 * segment and its age (for ages, and for heights/depths placed by an age
 * model: age = firstAge - t, with the height or depth as read beside it), or
 * its elapsed time for "time" input.
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

