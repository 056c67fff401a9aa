import { redrawAgeModel, type AgeModel } from '../data/age-model.js';
import { createRandom } from '../simulate/random.js';

/**
 * Monte Carlo over the age model: `draws` times, redraw every tie-point age
 * from N(age, age_sd^2) keeping the ties in stratigraphic order
 * (`redrawAgeModel`), and run `refit` on the drawn model. The draws come from
 * one seeded stream (`createRandom(seed)`), so the same seed gives the same
 * draws and results on every machine. With every age_sd = 0 each draw is the
 * age model itself, so every result equals the plain fit exactly.
 *
 * @param refit fits everything under one age model (pure: no printing)
 * @param onDraw called after each draw with the number done (a progress bar; changes nothing)
 * @returns one result per draw, in draw order
 * @throws InputError from `redrawAgeModel` when no ordered draw exists
 */
export function ageMonteCarlo<T>(ageModel: AgeModel, draws: number, seed: number, refit: (model: AgeModel) => T, onDraw?: (done: number, total: number) => void): T[] {
  const random = createRandom(seed);
  const results: T[] = [];
  for (let draw = 0; draw < draws; draw++) {
    results.push(refit(redrawAgeModel(ageModel, random)));
    onDraw?.(draw + 1, draws);
  }
  return results;
}

/** Spread of one quantity over the draws: median and the central 95% (2.5% and 97.5% quantiles). */
export interface Spread {
  readonly median: number | null;
  readonly lower: number | null;
  readonly upper: number | null;
  /** Draws in which the quantity was finite. */
  readonly count: number;
}

/**
 * Quantile of sorted values by linear interpolation between order statistics,
 * h = (n - 1) p (the default of R and numpy, "type 7"; common practice).
 *
 * @example
 * quantileOfSorted([1, 2, 3, 4], 0.5); // 2.5
 */
export function quantileOfSorted(sorted: readonly number[], probability: number): number {
  const position = (sorted.length - 1) * probability;
  const below = Math.floor(position);
  const above = Math.ceil(position);
  if (below === above) return sorted[below];
  return sorted[below] + (position - below) * (sorted[above] - sorted[below]);
}

/** Median and central 95% of the finite values. */
export function spreadOf(values: readonly (number | null | undefined)[]): Spread {
  const finite = values.filter((value): value is number => value !== null && value !== undefined && Number.isFinite(value)).sort((a, b) => a - b);
  if (finite.length === 0) return { median: null, lower: null, upper: null, count: 0 };
  return { median: quantileOfSorted(finite, 0.5), lower: quantileOfSorted(finite, 0.025), upper: quantileOfSorted(finite, 0.975), count: finite.length };
}

/** One ranked candidate (a model, or a hypothesis × model) in one draw. */
export interface RankedCandidate {
  readonly key: string;
  readonly weight: number | null;
  readonly best: boolean;
  readonly estimates: Readonly<Record<string, number>>;
}

/** How one candidate fared over the draws. */
export interface CandidateSpread {
  readonly key: string;
  readonly weight: Spread;
  /** Fraction of draws in which this candidate had the lowest AICc. */
  readonly bestFraction: number;
  /** Spread of each point estimate over the draws (age uncertainty only; not a confidence interval). */
  readonly estimates: Readonly<Record<string, Spread>>;
}

/**
 * Summarise the draws of one ranked set (one lineage's models, or one
 * trait's hypotheses): per candidate, the spread of its Akaike weight, how
 * often it was best, and the spread of its point estimates.
 */
export function summariseDraws(draws: readonly (readonly RankedCandidate[])[]): CandidateSpread[] {
  const keys: string[] = [];
  for (const draw of draws) for (const candidate of draw) if (!keys.includes(candidate.key)) keys.push(candidate.key);
  return keys.map((key) => {
    const entries = draws.map((draw) => draw.find((candidate) => candidate.key === key));
    const names: string[] = [];
    for (const entry of entries) for (const name of Object.keys(entry?.estimates ?? {})) if (!names.includes(name)) names.push(name);
    return {
      key,
      weight: spreadOf(entries.map((entry) => entry?.weight)),
      bestFraction: draws.length === 0 ? 0 : entries.filter((entry) => entry?.best).length / draws.length,
      estimates: Object.fromEntries(names.map((name) => [name, spreadOf(entries.map((entry) => entry?.estimates[name]))])),
    };
  });
}
