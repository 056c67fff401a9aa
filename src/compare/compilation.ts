import type { LineageFit } from '../fit/fit-lineage.js';
import { lineageName } from '../lineage.js';
import { quantileOfSorted } from '../statistics/quantiles.js';

/** Five-number summary plus the mean of a list of values (quantiles by linear interpolation, type 7). */
export interface Distribution {
  readonly count: number;
  readonly mean: number | null;
  readonly minimum: number | null;
  readonly lowerQuartile: number | null;
  readonly median: number | null;
  readonly upperQuartile: number | null;
  readonly maximum: number | null;
}

/** How one model fared across the lineages of a compilation. */
export interface ModelTally {
  readonly id: string;
  readonly label: string;
  /** Lineages where this model has the lowest AICc. */
  readonly wins: number;
  /** wins / lineages with at least one compared model. */
  readonly winShare: number;
  /** Lineages where this model was compared (has an Akaike weight). */
  readonly compared: number;
  /** Distribution of its Akaike weight over the lineages where it was compared. */
  readonly weight: Distribution;
  /** Its Akaike weight in each lineage, in input order (null where not compared). */
  readonly weights: readonly (number | null)[];
}

/** The drift estimates of the directional walk across the compilation. */
export interface DriftSummary {
  /** Model whose drift is summarised. */
  readonly model: string;
  /** Time units of the lineages (drift is in trait units per this unit); more than one means the values are not on one scale. */
  readonly timeUnits: readonly string[];
  /**
   * Trait units of the lineages as printed ("mm", "ln mm" with --log; null
   * for a lineage without --trait-unit); optional so summaries built elsewhere need not give it.
   */
  readonly traitUnits?: readonly (string | null)[];
  readonly estimate: Distribution;
  /** Estimates per lineage in input order (null where not fitted). */
  readonly estimates: readonly (number | null)[];
  /** Lineages whose 95% drift interval lies wholly above 0 / wholly below 0. */
  readonly positive: number;
  readonly negative: number;
  /** Lineages with both ends of a drift interval (0 when fitted without intervals). */
  readonly withInterval: number;
  /** The drift estimates among the lineages where the directional walk wins. */
  readonly winnersEstimate: Distribution;
}

/** What a compilation study reports about many lineages fitted at once. */
export interface CompilationSummary {
  readonly lineages: number;
  /** Lineages with at least one compared model. */
  readonly compared: number;
  readonly names: readonly string[];
  readonly best: readonly (string | null)[];
  readonly models: readonly ModelTally[];
  readonly drift: DriftSummary | null;
}


/**
 * Mean, extremes and quartiles of the finite values of a list. Quartiles
 * interpolate linearly between order statistics (Hyndman & Fan 1996,
 * definition 7, the default of R and numpy).
 *
 * Hyndman, R. J. & Fan, Y. (1996). Sample quantiles in statistical packages.
 * The American Statistician 50:361-365.
 *
 * @example
 * distribution([1, 2, 3, 4]).median; // 2.5
 */
export function distribution(values: readonly (number | null)[]): Distribution {
  const finite = values.filter((value): value is number => value !== null && Number.isFinite(value)).sort((a, b) => a - b);
  if (finite.length === 0) return { count: 0, mean: null, minimum: null, lowerQuartile: null, median: null, upperQuartile: null, maximum: null };
  const mean = finite.reduce((sum, value) => sum + value, 0) / finite.length;
  return {
    count: finite.length,
    mean,
    minimum: finite[0],
    lowerQuartile: quantileOfSorted(finite, 0.25),
    median: quantileOfSorted(finite, 0.5),
    upperQuartile: quantileOfSorted(finite, 0.75),
    maximum: finite[finite.length - 1],
  };
}

/**
 * Cross-lineage summary of a batch fit (a compilation of many sequences):
 * how many lineages each model wins (lowest AICc), the distribution of each
 * model's Akaike weight, and the distribution of the directional walk's
 * drift estimates with how many 95% intervals exclude 0. Model order is that
 * of the first lineage's table.
 *
 * Counting wins is what compilation studies of fossil sequences report, but
 * a win by a small AICc margin is weak support; the weight distribution says
 * how decisive the wins are.
 *
 * @example
 * const rising = lineageFromArrays({ section: 'A', time: [0, 1, 2, 3, 4], mean: [0, 1, 2, 3, 4], samplingVariance: [0.01, 0.01, 0.01, 0.01, 0.01] });
 * const level = lineageFromArrays({ section: 'B', time: [0, 1, 2, 3, 4], mean: [0, 0.1, -0.1, 0, 0.1], samplingVariance: [0.01, 0.01, 0.01, 0.01, 0.01] });
 * const fits = [rising, level].map((lineage) => fitLineage(lineage, [stasis, directionalWalk], { intervals: false }));
 * const summary = summariseCompilation(fits);
 * summary.best; // ['directional-walk', 'stasis']
 * summary.models.map((model) => model.wins); // [1, 1]
 * summary.drift.estimates[0]; // 1 (to 1e-9; the means rise by exactly 1 per step)
 */
export function summariseCompilation(fits: readonly LineageFit[], driftModel = 'directional-walk'): CompilationSummary {
  const ids: string[] = [];
  const labels = new Map<string, string>();
  for (const fit of fits) {
    for (const model of fit.models) {
      if (!labels.has(model.id)) {
        ids.push(model.id);
        labels.set(model.id, model.label);
      }
    }
  }
  const compared = fits.filter((fit) => fit.best !== null).length;
  const models: ModelTally[] = ids.map((id) => {
    const weights = fits.map((fit) => fit.models.find((model) => model.id === id)?.weight ?? null);
    const wins = fits.filter((fit) => fit.best === id).length;
    return {
      id,
      label: labels.get(id) as string,
      wins,
      winShare: compared > 0 ? wins / compared : 0,
      compared: weights.filter((weight) => weight !== null).length,
      weight: distribution(weights),
      weights,
    };
  });
  let drift: DriftSummary | null = null;
  if (ids.includes(driftModel)) {
    const parameterOf = (fit: LineageFit) => fit.models.find((model) => model.id === driftModel)?.parameters.drift ?? null;
    const estimates = fits.map((fit) => parameterOf(fit)?.estimate ?? null);
    const positive = fits.filter((fit) => {
      const value = parameterOf(fit);
      return value !== null && value.lower !== null && value.lower > 0;
    }).length;
    const negative = fits.filter((fit) => {
      const value = parameterOf(fit);
      return value !== null && value.upper !== null && value.upper < 0;
    }).length;
    const withInterval = fits.filter((fit) => {
      const value = parameterOf(fit);
      return value !== null && value.lower !== null && value.upper !== null;
    }).length;
    drift = {
      model: driftModel,
      withInterval,
      timeUnits: [...new Set(fits.map((fit) => fit.lineage.timeUnit.label))],
      traitUnits: [...new Set(fits.map((fit) => (fit.lineage.traitUnit ? `${fit.lineage.logTransformed ? 'ln ' : ''}${fit.lineage.traitUnit}` : null)))],
      estimate: distribution(estimates),
      estimates,
      positive,
      negative,
      winnersEstimate: distribution(fits.map((fit, index) => (fit.best === driftModel ? estimates[index] : null))),
    };
  }
  return { lineages: fits.length, compared, names: fits.map((fit) => lineageName(fit.lineage)), best: fits.map((fit) => fit.best), models, drift };
}
