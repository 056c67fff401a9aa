import type { LikelihoodEvaluator } from './evaluator.js';
import type { ParameterEstimate } from './fit-model.js';
import { bootstrapCutoffs } from './intervals-bootstrap.js';
import { integratedIntervals } from './intervals-integrated.js';
import { intervalsByProfile, restrictedEstimates, type IntervalEnds, type IntervalMethod } from './intervals.js';
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
 * cut-off), `bootstrap` (plain profile, parametric-bootstrap cut-off) or
 * `integrated` (integrated likelihood; `adjusted` for models with several
 * process parameters). Returns the method actually used.
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
): IntervalMethod {
  const names = Object.keys(parameters).filter((name) => parameters[name].estimate !== null);
  if (method === 'integrated') {
    const integrated = integratedIntervals(evaluator, names);
    if (integrated) {
      for (const name of names) {
        // A variance whose maximum-likelihood estimate is 0 keeps 0 inside its interval (the prior vanishes there, the likelihood does not).
        const atZero = parameters[name].atBound === 'zero';
        parameters[name] = { ...parameters[name], ...integrated[name], ...(atZero ? { lower: 0, lowerAtBound: true } : {}) };
      }
      return 'integrated';
    }
  }
  const ends = (evaluate: (process: number[]) => number, best: readonly number[], axisIndex: number, cutoff: number): IntervalEnds =>
    processEnds(evaluate, evaluator.model, evaluator.lineage, best, axisIndex, cutoff);
  let ratioCutoff = (_name: string): number => chiSquare1At95;
  if (method === 'bootstrap') {
    // Draw from the restricted (REML) fit: an ML variance at 0 would simulate a world without that variance.
    const generator = { ...estimates, ...restrictedEstimates(evaluator) };
    const cutoffs = bootstrapCutoffs(evaluator.model, evaluator.lineage, generator, names, {
      replicates: options.bootstrapReplicates,
      seed: options.bootstrapSeed,
    });
    ratioCutoff = (name) => cutoffs.cutoff[name];
  }
  const adjusted = method === 'adjusted' || method === 'integrated';
  const replaced = intervalsByProfile(evaluator, names, { adjusted, ratioCutoff }, ends);
  for (const name of names) parameters[name] = { ...parameters[name], ...replaced[name] };
  return adjusted ? 'adjusted' : method;
}
