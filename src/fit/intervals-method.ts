import type { LikelihoodEvaluator } from './evaluator.js';
import type { ParameterEstimate } from './fit-results.js';
import { bootstrapCutoffs, type Refit } from './intervals-bootstrap.js';
import { integratedIntervals } from './intervals-integrated.js';
import { intervalsByProfile, restrictedEstimates, type IntervalEnds, type IntervalMethod } from './intervals.js';
import { chiSquare1At95 } from './model-choice.js';
import { axisIndexOf } from '../models/model.js';

export type { IntervalMethod } from './intervals.js';

/** The fitter's own search for the ends of a process parameter's interval. */
export type ProcessEnds = (
  evaluate: (process: number[]) => number,
  model: LikelihoodEvaluator['model'],
  lineage: LikelihoodEvaluator['lineage'],
  best: readonly number[],
  axisIndex: number,
  cutoff: number,
  gradient?: (process: number[]) => ArrayLike<number>,
) => IntervalEnds;

/** What {@link replaceIntervals} did: the method used, or why the fit must fall back to the plain profile. */
export interface ReplacedIntervals {
  /** The method whose intervals are now in `parameters` ('integrated' may become 'adjusted'). */
  readonly method: IntervalMethod;
  /** Non-null when the method cannot serve this fit (the words say why); `parameters` is then left as it was. */
  readonly fallback: string | null;
}

/**
 * Smallest bootstrap cut-off (on 2 × the profile drop) taken as a real
 * quantile. Below it at least 95% of the replicates gave a likelihood-ratio
 * statistic of 0, which happens when their fits sit on the same bound as
 * the truth they were drawn from: the interval would shrink to the estimate.
 */
export const degenerateCutoff = 0.01;

/**
 * Names of the parameters whose interval leaves out their own finite
 * estimate. An estimate at a bound or limit is inside when the interval
 * reaches it (an end equal to it, or open on that side); ends are compared
 * with a relative tolerance of 1e-9 (root-finder precision).
 *
 * @example
 * strayIntervals({ alpha: { estimate: 0, lower: 1206, upper: null, atBound: 'alpha-zero', lowerAtBound: false, upperAtBound: true } }); // ['alpha']
 */
export function strayIntervals(parameters: Readonly<Record<string, ParameterEstimate>>): string[] {
  const stray: string[] = [];
  for (const [name, { estimate, lower, upper }] of Object.entries(parameters)) {
    if (estimate === null) continue;
    const slack = (end: number): number => 1e-9 * Math.max(Math.abs(end), Math.abs(estimate));
    if ((lower !== null && estimate < lower - slack(lower)) || (upper !== null && estimate > upper + slack(upper))) stray.push(name);
  }
  return stray;
}

/**
 * The fall-back reason when intervals of `method` leave out estimates (`strayIntervals`).
 *
 * @example
 * strayReason('adjusted', ['alpha']); // 'the adjusted intervals left out the estimate of alpha'
 */
export function strayReason(method: string, stray: readonly string[]): string {
  return `the ${method} intervals left out the estimate of ${stray.join(', ')}`;
}

/**
 * Replace the plain profile intervals of a fit (in `parameters`, in place)
 * by those of another method: `adjusted` (restricted profile, chi-square
 * cut-off), `bootstrap` (plain profile, parametric-bootstrap cut-off) or
 * `integrated` (integrated likelihood; `adjusted` for models with several
 * process parameters). Returns the method actually used.
 *
 * The bootstrap cannot calibrate anything when the fit it draws from (the
 * restricted one) has a process parameter at its bound 0 or at a limit:
 * every replicate then describes a lineage without that variance (its fits
 * sit at the bound too, their statistics are 0, and the interval collapses
 * onto the estimate, e.g. step_variance 0 [0, 7.1e-6] where the profile gives
 * [0, 101.7], issue 20), and the other cut-offs come from a world without
 * process noise. Such fits, and cut-offs below {@link degenerateCutoff} or
 * made from fewer than 19 replicates, come back with a `fallback` reason and
 * `parameters` untouched.
 * Parameters without a finite estimate keep what they have. Called by
 * `fitModel` only, which hands its own fitter in as `options.refit` (the
 * bootstrap refits each replicate) so this file need not import it.
 *
 * @example
 * // The integrated method on strict stasis: the same normal interval, 2 ± 1.959964 × sqrt(1/2) (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const fit = fitModel(strictStasis, lineage);
 * const parameters = { ...fit.parameters };
 * const refit = (model, data) => fitModel(model, data, { intervals: false });
 * replaceIntervals('integrated', new LikelihoodEvaluator(strictStasis, lineage), fit.estimates, parameters, processInterval, { refit }); // { method: 'integrated', fallback: null }
 * parameters.stasis_mean.lower; // 0.6140961756503224 (to 1e-6)
 */
export function replaceIntervals(
  method: Exclude<IntervalMethod, 'profile'>,
  evaluator: LikelihoodEvaluator,
  estimates: Readonly<Record<string, number>>,
  parameters: Record<string, ParameterEstimate>,
  processEnds: ProcessEnds,
  options: { bootstrapReplicates?: number; bootstrapSeed?: number; intervalParameters?: readonly string[]; refit: Refit },
): ReplacedIntervals {
  const names = Object.keys(parameters).filter((name) => parameters[name].estimate !== null && (!options.intervalParameters || options.intervalParameters.includes(name)));
  if (method === 'integrated') {
    const integrated = integratedIntervals(evaluator, names);
    if (integrated) {
      for (const name of names) {
        // A variance whose maximum-likelihood estimate is 0 keeps 0 inside its interval (the prior vanishes there, the likelihood does not).
        const atZero = parameters[name].atBound === 'zero';
        parameters[name] = { ...parameters[name], ...integrated[name], ...(atZero ? { lower: 0, lowerAtBound: true } : {}) };
      }
      return { method: 'integrated', fallback: null };
    }
  }
  const ends = (evaluate: (process: number[]) => number, best: readonly number[], axisIndex: number, cutoff: number, gradient?: (process: number[]) => ArrayLike<number>): IntervalEnds =>
    processEnds(evaluate, evaluator.model, evaluator.lineage, best, axisIndex, cutoff, gradient);
  let ratioCutoff = (_name: string): number => chiSquare1At95;
  if (method === 'bootstrap') {
    // Draw from the restricted (REML) fit: an ML variance at 0 would simulate a world without that variance.
    const restricted = restrictedEstimates(evaluator);
    const onBound = evaluator.model.process.find((axis) => axis.allowZero && restricted[axis.name] === 0);
    if (onBound) {
      const where = onBound.limitNames?.[0] ? `the ${onBound.limitNames[0]} limit` : 'its bound 0';
      return { method, fallback: `the bootstrap would draw from a fit with ${onBound.name} at ${where}, whose replicates cannot calibrate values away from it` };
    }
    const generator = { ...estimates, ...restricted };
    const cutoffs = bootstrapCutoffs(evaluator.model, evaluator.lineage, generator, names, {
      replicates: options.bootstrapReplicates,
      seed: options.bootstrapSeed,
      refit: options.refit,
    });
    const few = names.find((name) => cutoffs.used[name] < 19);
    if (few) return { method, fallback: `only ${cutoffs.used[few]} bootstrap replicates gave a statistic for ${few} (at least 19 are needed)` };
    const collapsed = names.find((name) => cutoffs.cutoff[name] < degenerateCutoff);
    if (collapsed) return { method, fallback: `the bootstrap cut-off of ${collapsed} is ${cutoffs.cutoff[collapsed].toPrecision(3)} (95% of its replicates sit at a bound), which would shrink the interval onto the estimate` };
    ratioCutoff = (name) => cutoffs.cutoff[name];
  }
  const adjusted = method === 'adjusted' || method === 'integrated';
  const used: IntervalMethod = adjusted ? 'adjusted' : method;
  // The process parameters first: when one of their intervals leaves out its own estimate (ou's alpha, whose restricted
  // maximum can sit at the opposite limit: more than half of the bench's ou fits) the fit falls back to the plain
  // profile anyway, so the location parameters' intervals are not searched (issue 14). The reason then names the
  // process parameters left out.
  const model = evaluator.model;
  const replaced: Record<string, ParameterEstimate> = {};
  const search = (some: readonly string[]): void => {
    const found = intervalsByProfile(evaluator, some, { adjusted, ratioCutoff }, ends);
    for (const name of some) replaced[name] = { ...parameters[name], ...found[name] };
  };
  search(names.filter((name) => axisIndexOf(model, name) >= 0));
  const stray = strayIntervals(replaced);
  if (stray.length > 0) return { method: used, fallback: strayReason(used, stray) };
  search(names.filter((name) => axisIndexOf(model, name) < 0));
  for (const name of names) parameters[name] = replaced[name];
  return { method: used, fallback: null };
}
