import type { Lineage } from '../lineage.js';
import { findModel } from '../models/registry.js';
import type { ModelFit } from './fit-model.js';

/**
 * The caution printed with every rate: measured rates depend on the interval
 * over which they are measured.
 */
export const rateCaution =
  'Measured rates depend on the interval over which they are measured: over longer intervals measured rates are lower, ' +
  'because fluctuations cancel and long intervals include stasis (Gingerich 1983, Science 222:159-161; Gingerich 1993, ' +
  'Am. J. Sci. 293-A:453-478; Hunt 2012, Paleobiology 38:351-373). Compare rates only over similar interval lengths, ' +
  'and prefer the model-based rates, which do not depend on the spacing of the horizons in the same way.';

/**
 * Lynch's neutral range of the rate of divergence Delta (per generation):
 * 2 h2_m with mutational heritability h2_m between 1e-4 and 1e-2.
 *
 * Lynch, M. (1990). The rate of morphological evolution in mammals from the
 * standpoint of the neutral expectation. American Naturalist 136:727-741.
 */
export const neutralDivergenceRange = { lower: 2e-4, upper: 2e-2 } as const;

/** Assumptions behind the comparison with the neutral range, printed with it. */
export const neutralAssumptions: readonly string[] = [
  'Under neutrality the variance among lineages grows by 2 sigma2_m per generation (sigma2_m the mutational variance); with mutational heritability sigma2_m / V_E between 1e-4 and 1e-2, Delta = (variance increase per generation) / V_E lies between 2e-4 and 2e-2 (Lynch 1990, Am. Nat. 136:727-741).',
  'The pooled within-horizon variance stands in for the environmental variance V_E (it also holds genetic variance and, in time-averaged samples, change within the horizon, which make Delta too small).',
  'The step variance of a walk is taken as the rate of increase of the variance among replicate lineages; one lineage gives one realisation, so Delta is estimated with wide error.',
  'The generation time is assumed constant over the sequence.',
];

/** A rate between two horizons (or over the whole sequence). */
export interface IntervalRate {
  /** 0-based horizon indices, oldest first. */
  readonly from: number;
  readonly to: number;
  /** Elapsed time between them, in the lineage's time unit. */
  readonly interval: number;
  /** Change in ln trait (signed: positive is an increase). */
  readonly lnChange: number | null;
  /** Darwins: change in ln trait per million years (Haldane 1949); null when not computable. */
  readonly darwins: number | null;
  /** Generations in the interval (needs a generation time and a time unit in years). */
  readonly generations: number | null;
  /** Haldanes: change in pooled within-sample sd of ln trait per generation (Gingerich 1993). */
  readonly haldanes: number | null;
}

/** A rate implied by a fitted model's parameter. */
export interface ModelRate {
  readonly model: string;
  readonly parameter: string;
  /** "drift" or "step variance". */
  readonly kind: 'drift' | 'step-variance';
  readonly estimate: number;
  /** For a drift on the ln scale: darwins; for a step variance on the ln scale: ln-units^2 per Myr. */
  readonly perMillionYears: number | null;
  /** For a drift: haldanes (sd per generation); for a step variance: Delta, sd^2 per generation (Lynch's rate of divergence). */
  readonly perGeneration: number | null;
  /** Where Delta falls against the neutral range (step variances only). */
  readonly neutral: 'below' | 'within' | 'above' | null;
}

/** Every rate of one lineage, with what could not be computed and why. */
export interface LineageRates {
  /** How ln trait was obtained: the input was logged (--log), or ln of the means with the delta-method sd. */
  readonly scale: 'logged input' | 'ln of the means';
  readonly generationTime: number | null;
  readonly timeUnit: string;
  readonly intervals: readonly IntervalRate[];
  readonly whole: IntervalRate;
  readonly model: readonly ModelRate[];
  /** Pooled within-horizon variance on the fitted scale (the standardiser of model-based per-generation rates). */
  readonly pooledWithinVariance: number;
  readonly notes: readonly string[];
  readonly caution: string;
}

/**
 * Darwins from a change in ln trait over an elapsed time in million years:
 * r = (ln x_2 - ln x_1) / dt (Haldane 1949).
 *
 * Haldane, J. B. S. (1949). Suggestions as to quantitative measurement of
 * rates of evolution. Evolution 3:51-56.
 *
 * @example
 * darwins(Math.log(12) - Math.log(10), 2); // 0.0911607783969773 (to 1e-15; ln 1.2 / 2)
 */
export function darwins(lnChange: number, millionYears: number): number {
  return lnChange / millionYears;
}

/**
 * Haldanes: the change in mean ln trait in units of the pooled within-sample
 * sd of ln trait, per generation, h = ((ln x_2 - ln x_1) / s_p) / g, with
 * s_p^2 = ((n_1 - 1) s_1^2 + (n_2 - 1) s_2^2) / (n_1 + n_2 - 2) (Gingerich 1993).
 *
 * Gingerich, P. D. (1993). Quantification and comparison of evolutionary
 * rates. American Journal of Science 293-A:453-478.
 *
 * @example
 * haldanes(Math.log(1.2), 0.1, 2e6); // 9.11607783969773e-7 (to 1e-20; ln 1.2 / 0.1 / 2e6)
 */
export function haldanes(lnChange: number, pooledSd: number, generations: number): number {
  return lnChange / pooledSd / generations;
}

/**
 * Pooled variance of two samples, (n_1 - 1) v_1 + (n_2 - 1) v_2 over n_1 + n_2 - 2 (the plain average when both n are 1).
 *
 * @example
 * pooledPair(3, 1, 5, 2); // 1.6666666666666667 ((2 × 1 + 4 × 2) / 6)
 * pooledPair(1, 1, 1, 3); // 2 (both n 1: the plain average)
 */
export function pooledPair(n1: number, v1: number, n2: number, v2: number): number {
  const degrees = n1 + n2 - 2;
  return degrees > 0 ? ((n1 - 1) * v1 + (n2 - 1) * v2) / degrees : (v1 + v2) / 2;
}

/**
 * Interval and whole-sequence rates of a lineage in darwins and haldanes,
 * and model-based rates from fitted models' drift and step-variance
 * parameters, with the caution about interval dependence.
 *
 * ln trait: the means as given when the input was logged (`--log`);
 * otherwise ln of each mean with the within-sample variance of ln trait
 * taken as v / mean^2 (delta method, common practice), which needs positive
 * means. Darwins need a time unit convertible to years; haldanes also a
 * generation time (years).
 *
 * @param fits fitted models whose rate parameters (`ParameterSpec.rate`: drift, step_variance and their segment forms) are converted
 * @param generationTime generation time in years, or null
 *
 * @example
 * // Means 10, 11, 12: the changes are measured on ln of the means, ln 1.1 then ln(12/11), ln 1.2 over the whole (closed forms).
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [10, 11, 12], samplingVariance: [0.01, 0.01, 0.01], count: [5, 5, 5] });
 * const result = lineageRates(lineage, [], null);
 * result.whole.lnChange; // 0.1823215567939546 (to 1e-12; ln 1.2)
 * result.intervals.map((rate) => rate.interval); // [1, 1]
 * result.whole.haldanes; // null (no generation time given)
 */
export function lineageRates(lineage: Lineage, fits: readonly ModelFit[], generationTime: number | null): LineageRates {
  const size = lineage.mean.length;
  const notes: string[] = [];
  const logged = lineage.logTransformed;
  const positive = lineage.mean.every((value) => value > 0);
  const lnMean = logged ? lineage.mean : positive ? Float64Array.from(lineage.mean, Math.log) : null;
  const lnVariance = logged ? lineage.withinVariance : positive ? Float64Array.from(lineage.withinVariance, (v, i) => v / lineage.mean[i] ** 2) : null;
  if (!lnMean) notes.push('Some means are not positive, so ln trait (darwins, haldanes) cannot be formed; fit a positive trait or give --log.');
  const yearsPerUnit = lineage.timeUnit.years;
  if (yearsPerUnit === null) notes.push(`The time unit "${lineage.timeUnit.label}" has no known length in years, so darwins and haldanes cannot be computed.`);
  if (generationTime === null) notes.push('No generation time given (--generation-time YEARS), so haldanes and per-generation rates are left out.');
  const rate = (from: number, to: number): IntervalRate => {
    const interval = lineage.time[to] - lineage.time[from];
    const lnChange = lnMean ? lnMean[to] - lnMean[from] : null;
    const millionYears = yearsPerUnit === null ? null : (interval * yearsPerUnit) / 1e6;
    const generations = yearsPerUnit === null || generationTime === null ? null : (interval * yearsPerUnit) / generationTime;
    const pooledSd = lnVariance ? Math.sqrt(pooledPair(lineage.count[from], lnVariance[from], lineage.count[to], lnVariance[to])) : null;
    return {
      from,
      to,
      interval,
      lnChange,
      darwins: lnChange === null || millionYears === null ? null : darwins(lnChange, millionYears),
      generations,
      haldanes: lnChange === null || generations === null || !pooledSd ? null : haldanes(lnChange, pooledSd, generations),
    };
  };
  const intervals = Array.from({ length: size - 1 }, (_, i) => rate(i, i + 1));
  const pooledWithinVariance = pooledOverLineage(lineage);
  const model: ModelRate[] = [];
  for (const fit of fits) {
    if (!fit.converged) continue;
    // Which parameters are rates of the lineage, and of which kind, each model says (`ParameterSpec.rate`).
    const specs = findModel(fit.id)?.parameters ?? [];
    for (const [name, estimate] of Object.entries(fit.parameters)) {
      const value = estimate.estimate;
      if (value === null) continue;
      const kind = specs.find((spec) => spec.name === name)?.rate ?? null;
      if (kind === null) continue;
      const perUnitToMyr = yearsPerUnit === null ? null : 1e6 / yearsPerUnit;
      const unitsPerGeneration = yearsPerUnit === null || generationTime === null ? null : generationTime / yearsPerUnit;
      let perMillionYears: number | null = null;
      let perGeneration: number | null = null;
      let neutral: ModelRate['neutral'] = null;
      if (kind === 'drift') {
        perMillionYears = logged && perUnitToMyr !== null ? value * perUnitToMyr : null;
        perGeneration = unitsPerGeneration === null || !(pooledWithinVariance > 0) ? null : (value * unitsPerGeneration) / Math.sqrt(pooledWithinVariance);
      } else {
        perMillionYears = logged && perUnitToMyr !== null ? value * perUnitToMyr : null;
        perGeneration = unitsPerGeneration === null || !(pooledWithinVariance > 0) ? null : (value * unitsPerGeneration) / pooledWithinVariance;
        if (perGeneration !== null) {
          neutral = perGeneration < neutralDivergenceRange.lower ? 'below' : perGeneration > neutralDivergenceRange.upper ? 'above' : 'within';
        }
      }
      model.push({ model: fit.id, parameter: name, kind, estimate: value, perMillionYears, perGeneration, neutral });
    }
  }
  if (!logged && model.length > 0) notes.push('The models were fitted to the untransformed trait, so model-based rates per Myr are not in darwins (fit with --log for that); per-generation rates are in within-horizon sd units.');
  return {
    scale: logged ? 'logged input' : 'ln of the means',
    generationTime,
    timeUnit: lineage.timeUnit.label,
    intervals,
    whole: rate(0, size - 1),
    model,
    pooledWithinVariance,
    notes,
    caution: rateCaution,
  };
}

/**
 * Pooled within-horizon variance over a lineage: sum (n_i - 1) v_i / sum (n_i - 1), or the plain average when every n is 1.
 *
 * @example
 * // Sampling variances 0.5 with n = 3 and 5 are within variances 1.5 and 2.5: pooled (2 × 1.5 + 4 × 2.5) / 6.
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [0.5, 0.5], count: [3, 5] });
 * pooledOverLineage(lineage); // 2.1666666666666665 (to 1e-15)
 */
export function pooledOverLineage(lineage: Lineage): number {
  let weighted = 0;
  let degrees = 0;
  let plain = 0;
  for (let i = 0; i < lineage.mean.length; i++) {
    weighted += (lineage.count[i] - 1) * lineage.withinVariance[i];
    degrees += lineage.count[i] - 1;
    plain += lineage.withinVariance[i];
  }
  return degrees > 0 ? weighted / degrees : plain / lineage.mean.length;
}
