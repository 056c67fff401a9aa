import type { LikelihoodEvaluator } from './evaluator.js';
import type { ParameterEstimate } from './fit-model.js';
import { bootstrapCutoffs } from './intervals-bootstrap.js';
import { intervalsByProfile, type IntervalEnds, type IntervalMethod } from './intervals.js';
import { chiSquare1At95 } from './model-choice.js';

export type { IntervalMethod } from './intervals.js';

/** The fitter's own search for the ends of a process parameter's interval. */
export type ProcessEnds = (
  evaluate: (process: number[]) => number,
  model: LikelihoodEvaluator['model'],
  lineage: LikelihoodEvaluator['lineage'],
  best: readonly number[],
  axisIndex: number,
  cutoff: number,
) => IntervalEnds;

/**
 * Replace the plain profile intervals of a fit (in `parameters`, in place)
 * by those of another method: `adjusted` (restricted profile, chi-square
 * cut-off) or `bootstrap` (plain profile, parametric-bootstrap cut-off).
 * Parameters without a finite estimate keep what they have. Called by
 * `fitModel` only.
 */
export function replaceIntervals(
  method: Exclude<IntervalMethod, 'profile'>,
  evaluator: LikelihoodEvaluator,
  estimates: Readonly<Record<string, number>>,
  parameters: Record<string, ParameterEstimate>,
  processEnds: ProcessEnds,
  options: { bootstrapReplicates?: number; bootstrapSeed?: number },
): void {
  const names = Object.keys(parameters).filter((name) => parameters[name].estimate !== null);
  const ends = (evaluate: (process: number[]) => number, best: readonly number[], axisIndex: number, cutoff: number): IntervalEnds =>
    processEnds(evaluate, evaluator.model, evaluator.lineage, best, axisIndex, cutoff);
  let ratioCutoff = (_name: string): number => chiSquare1At95;
  if (method === 'bootstrap') {
    const cutoffs = bootstrapCutoffs(evaluator.model, evaluator.lineage, estimates, names, {
      replicates: options.bootstrapReplicates,
      seed: options.bootstrapSeed,
    });
    ratioCutoff = (name) => cutoffs.cutoff[name];
  }
  const replaced = intervalsByProfile(evaluator, names, { adjusted: method === 'adjusted', ratioCutoff }, ends);
  for (const name of names) parameters[name] = { ...parameters[name], ...replaced[name] };
}
