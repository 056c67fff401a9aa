import type { AgeModel, TiePoint } from '../data/age-model.js';
import { InputError } from '../data/errors.js';
import { createRandom, type RandomSource } from '../random/random.js';
import { quantileOfSorted } from '../statistics/quantiles.js';

/**
 * One Monte Carlo draw of the age model: every tie's age redrawn from
 * N(age, age_sd^2) independently, the whole section redrawn until its ages
 * are again strictly decreasing upward (so the draw is from the normal
 * distribution conditioned on stratigraphic order). Ties with age_sd = 0 keep
 * their age exactly, so a model with every age_sd = 0 comes back unchanged.
 *
 * @param random seeded source (draws consumed section by section, tie by tie)
 * @param attempts redraws allowed per section before giving up (default 10000)
 * @throws InputError when no ordered draw is found (age_sd far larger than the
 *   age gaps between ties), naming the section.
 *
 * @example
 * const model = readAgeModel(readTable('section,height,age,age_sd\nA,0,10,0.1\nA,50,8,0.1\nB,0,9,0\nB,20,7,0\n', 'ties.csv'));
 * const drawn = redrawAgeModel(model, createRandom(1));
 * drawn.sections.get('A').map((tie) => tie.age); // [10.081616807010514, 7.931955547672515] (seed 1; still older below)
 * drawn.sections.get('B').map((tie) => tie.age); // [9, 7] (age_sd = 0: unchanged)
 */
export function redrawAgeModel(model: AgeModel, random: RandomSource, attempts = 10_000): AgeModel {
  const sections = new Map<string, readonly TiePoint[]>();
  for (const [section, ties] of model.sections) {
    if (!ties.some((tie) => tie.ageSd > 0)) {
      sections.set(section, ties);
      continue;
    }
    let drawn: TiePoint[] | null = null;
    for (let attempt = 0; attempt < attempts && drawn === null; attempt++) {
      const candidate = ties.map((tie) => (tie.ageSd > 0 ? { ...tie, age: tie.age + tie.ageSd * random.normal() } : tie));
      if (candidate.every((tie, k) => k === 0 || tie.age < candidate[k - 1].age)) drawn = candidate;
    }
    if (drawn === null) {
      throw new InputError(
        `${section === '' ? 'the ties' : `section "${section}"`}: no redraw of the tie ages kept them in stratigraphic order in ${attempts} tries; age_sd is too large for the age gaps between ties`,
        { file: model.file },
      );
    }
    sections.set(section, drawn);
  }
  return { ...model, sections };
}

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
 *
 * @example
 * const model = readAgeModel(readTable('section,height,age,age_sd\nA,0,10,0.1\nA,50,8,0.1\nB,0,9,0\nB,20,7,0\n', 'ties.csv'));
 * ageMonteCarlo(model, 3, 1, (drawn) => drawn.sections.size); // [2, 2, 2]
 * ageMonteCarlo(model, 3, 1, (drawn) => drawn.sections.get('A')[0].age)[0] === redrawAgeModel(model, createRandom(1)).sections.get('A')[0].age; // true (one seeded stream)
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
 * Median and central 95% of the finite values.
 *
 * @example
 * spreadOf([4, null, 2, 1, 3]); // { median: 2.5, lower: 1.075, upper: 3.925, count: 4 }
 */
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
 *
 * @example
 * const draws = [
 *   [{ key: 'a', weight: 0.7, best: true, estimates: { x: 1 } }, { key: 'b', weight: 0.3, best: false, estimates: {} }],
 *   [{ key: 'a', weight: 0.4, best: false, estimates: { x: 3 } }, { key: 'b', weight: 0.6, best: true, estimates: {} }],
 * ];
 * const [a] = summariseDraws(draws);
 * a.bestFraction; // 0.5
 * a.estimates.x; // { median: 2, lower: 1.05, upper: 2.95, count: 2 } (type-7 quantiles of [1, 3])
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
