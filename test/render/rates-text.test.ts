/**
 * The rates text of `fit --rates` with and without `--trait-unit`. Model-based
 * rates from a walk's drift and step variance are in trait units (trait per
 * time, trait² per time: the units the models declare for drift and step_variance), so with a
 * unit they name it; darwins (Haldane 1949, Evolution 3:51-56), haldanes and
 * Lynch's Delta (Gingerich 1993, Am. J. Sci. 293-A:453-478; Lynch 1990, Am.
 * Nat. 136:727-741) are unit-free by definition and must not change.
 * Without a unit the text must be byte for byte what it was before the option
 * reached the rates.
 */
import { describe, expect, it } from 'vitest';
import type { LineageFit, RankedFit } from '../../src/fit/fit-lineage.js';
import { lineageRates } from '../../src/fit/rates.js';
import { lineageFromArrays, timeUnit, type Lineage } from '../../src/lineage.js';
import { ratesText } from '../../src/render/extensions-text.js';

/** A fitted model with fixed estimates (no search: the text only formats them), Akaike weight 1 so its rates are shown. */
function rankedFit(id: string, parameters: Record<string, number>): RankedFit {
  return {
    id, label: id, k: Object.keys(parameters).length, horizons: 4, logLik: 0, converged: true, message: null,
    parameters: Object.fromEntries(Object.entries(parameters).map(([name, estimate]) => [name, { estimate, lower: null, upper: null, atBound: null, lowerAtBound: false, upperAtBound: false }])),
    derived: {}, process: [], estimates: parameters, flags: [], intervalMethod: 'profile', evaluations: 0,
    aicc: 10, deltaAicc: 0, weight: 1, notCompared: null,
  } as RankedFit;
}

/** An invented lineage: four horizons 1 Myr apart, means 10 → 12.4 (mm, say), 12 specimens each, sd 0.8. */
function baseLineage(): Lineage {
  return lineageFromArrays({
    time: [0, 1, 2, 3], mean: [10, 10.9, 11.5, 12.4], count: [12, 12, 12, 12],
    samplingVariance: [0.64 / 12, 0.64 / 12, 0.64 / 12, 0.64 / 12], timeUnit: timeUnit('Myr'), section: 'Tarn Ledge', trait: 'rib length',
  });
}

/** The lineage's fit with a directional walk (drift 0.8, step variance 0.02 per Myr) and its rates at a generation time of 2 years. */
function textOf(lineage: Lineage, logged = false): string {
  const used: Lineage = logged ? { ...lineage, logTransformed: true, mean: Float64Array.from(lineage.mean, Math.log), withinVariance: Float64Array.from(lineage.withinVariance, (v, i) => v / lineage.mean[i] ** 2) } : lineage;
  const walk = rankedFit('directional-walk', logged ? { ancestral_mean: 2.3, drift: 0.07, step_variance: 0.002 } : { ancestral_mean: 10, drift: 0.8, step_variance: 0.02 });
  const fit: LineageFit = { lineage: used, models: [walk], best: 'directional-walk', smoothed: null };
  return ratesText(fit, lineageRates(used, [walk], 2));
}

/** The lineage as built before `--trait-unit` existed: no `traitUnit` property at all. */
function withoutUnitKey(lineage: Lineage): Lineage {
  const { traitUnit: _dropped, ...rest } = lineage;
  return rest as Lineage;
}

/** The line of the model-based table for one parameter. */
const rowOf = (text: string, parameter: string): string => text.split('\n').find((line) => line.includes('directional-walk') && line.includes(` ${parameter} `))!;

describe('rates text and the trait unit', () => {
  it('without a unit: the same bytes as a lineage with no traitUnit property, and as the text printed before the option reached the rates', () => {
    const withNull = textOf(baseLineage());
    const withoutKey = textOf(withoutUnitKey(baseLineage()));
    expect(withNull).toBe(withoutKey);
    // The text the code printed before the change (regression reference, see BEFORE_PLAIN below).
    expect(withNull).toBe(BEFORE_PLAIN);
    expect(withNull).not.toMatch(/mm/);
    // The same for the logged trait.
    expect(textOf(baseLineage(), true)).toBe(textOf(withoutUnitKey(baseLineage()), true));
    expect(textOf(baseLineage(), true)).toBe(BEFORE_LOGGED);
  });

  it('with --trait-unit mm: drift in mm per Myr and step variance in mm² per Myr (the parameters\' units); darwins, haldanes and Delta unchanged', () => {
    const plain = textOf(baseLineage());
    const labelled = textOf({ ...baseLineage(), traitUnit: 'mm' });
    expect(rowOf(labelled, 'drift')).toMatch(/ 0\.8 mm per Myr /);
    expect(rowOf(labelled, 'step_variance')).toMatch(/ 0\.02 mm² per Myr /);
    // The header no longer claims one unit for the column: each cell carries its own.
    expect(labelled).toMatch(/parameter +estimate +per Myr/);
    // Unit-free columns keep their values and words: the per-generation cells of each row are the same text.
    // Cells: model, parameter, estimate, per Myr, per generation, neutral range (absent for a drift).
    const tail = (line: string): string[] => line.trim().split(/\s{2,}/).slice(3);
    expect(tail(rowOf(labelled, 'drift'))).toEqual(tail(rowOf(plain, 'drift')));
    expect(tail(rowOf(labelled, 'step_variance'))).toEqual(tail(rowOf(plain, 'step_variance')));
    // The interval table (darwins, haldanes), the notes and the caution are the same lines.
    const outsideModelTable = (text: string): string[] => text.split('\n').filter((line) => !line.includes('directional-walk') && !line.startsWith('    model '));
    expect(outsideModelTable(labelled)).toEqual(outsideModelTable(plain));
  });

  it('with --trait-unit mm and --log: ln mm per Myr, (ln mm)² per Myr; darwins still darwins', () => {
    const plain = textOf(baseLineage(), true);
    const labelled = textOf({ ...baseLineage(), traitUnit: 'mm' }, true);
    expect(rowOf(labelled, 'drift')).toMatch(/ 0\.07 ln mm per Myr +0\.07 darwins /);
    expect(rowOf(labelled, 'step_variance')).toMatch(/ 0\.002 \(ln mm\)² per Myr +0\.002 \(ln mm\)² /);
    expect(rowOf(plain, 'drift')).toMatch(/ 0\.07 +0\.07 darwins /);
    const outsideModelTable = (text: string): string[] => text.split('\n').filter((line) => !line.includes('directional-walk') && !line.startsWith('    model '));
    expect(outsideModelTable(labelled)).toEqual(outsideModelTable(plain));
  });
});

/**
 * Printed by src/render/extensions-text.ts at commit 0bd9b85 (before the trait unit reached the rates) for `textOf(baseLineage())`.
 * Its darwins check by hand (closed form, Haldane 1949): ln(10.9 / 10) / 1 Myr = 0.08618, ln(12.4 / 10) / 3 Myr = 0.0717.
 */
const BEFORE_PLAIN = [
  "  Rates (ln trait: ln of the means; generation time 2 yr):",
  "    interval                       length (Myr)  ln change  darwins  haldanes",
  "    whole sequence (horizons 0-3)             3     0.2151   0.0717  1.973e-6",
  "    horizons 0-1                              1    0.08618  0.08618  2.245e-6",
  "    horizons 1-2                              1    0.05358  0.05358  1.499e-6",
  "    horizons 2-3                              1    0.07535  0.07535  2.246e-6",
  "  Model-based rates (best model and models with Akaike weight >= 0.05):",
  "    model                 parameter  estimate (per Myr)  per Myr     per generation         neutral range",
  "    directional-walk          drift                 0.8        —  2.000e-6 haldanes",
  "    directional-walk  step_variance                0.02        —   6.250e-8 (Delta)  below 0.0002 to 0.02",
  "    Delta = step variance per generation / pooled within-horizon variance, against the neutral range. Assumptions:",
  "      - Under neutrality the variance among lineages grows by 2 sigma2_m per generation (sigma2_m",
  "      the mutational variance); with mutational heritability sigma2_m / V_E between 1e-4 and 1e-2,",
  "      Delta = (variance increase per generation) / V_E lies between 2e-4 and 2e-2 (Lynch 1990, Am.",
  "      Nat. 136:727-741).",
  "      - The pooled within-horizon variance stands in for the environmental variance V_E (it also",
  "      holds genetic variance and, in time-averaged samples, change within the horizon, which make",
  "      Delta too small).",
  "      - The step variance of a walk is taken as the rate of increase of the variance among replicate",
  "      lineages; one lineage gives one realisation, so Delta is estimated with wide error.",
  "      - The generation time is assumed constant over the sequence.",
  "    A rate below the neutral range is consistent with stabilising selection or constraint, one above",
  "    it with selection; neither is shown by the rate alone.",
  "    Note: The models were fitted to the untransformed trait, so model-based rates per Myr are not in",
  "    darwins (fit with --log for that); per-generation rates are in within-horizon sd units.",
  "    Caution: Measured rates depend on the interval over which they are measured: over longer",
  "    intervals measured rates are lower, because fluctuations cancel and long intervals include",
  "    stasis (Gingerich 1983, Science 222:159-161; Gingerich 1993, Am. J. Sci. 293-A:453-478; Hunt",
  "    2012, Paleobiology 38:351-373). Compare rates only over similar interval lengths, and prefer the",
  "    model-based rates, which do not depend on the spacing of the horizons in the same way.",
].join('\n');

/** The same, for `textOf(baseLineage(), true)` (logged trait). */
const BEFORE_LOGGED = [
  "  Rates (ln trait: logged input; generation time 2 yr):",
  "    interval                       length (Myr)  ln change  darwins  haldanes",
  "    whole sequence (horizons 0-3)             3     0.2151   0.0717  1.973e-6",
  "    horizons 0-1                              1    0.08618  0.08618  2.245e-6",
  "    horizons 1-2                              1    0.05358  0.05358  1.499e-6",
  "    horizons 2-3                              1    0.07535  0.07535  2.246e-6",
  "  Model-based rates (best model and models with Akaike weight >= 0.05):",
  "    model                 parameter  estimate (per Myr)       per Myr     per generation         neutral range",
  "    directional-walk          drift                0.07  0.07 darwins  1.942e-6 haldanes",
  "    directional-walk  step_variance               0.002         0.002   7.697e-7 (Delta)  below 0.0002 to 0.02",
  "    Delta = step variance per generation / pooled within-horizon variance, against the neutral range. Assumptions:",
  "      - Under neutrality the variance among lineages grows by 2 sigma2_m per generation (sigma2_m",
  "      the mutational variance); with mutational heritability sigma2_m / V_E between 1e-4 and 1e-2,",
  "      Delta = (variance increase per generation) / V_E lies between 2e-4 and 2e-2 (Lynch 1990, Am.",
  "      Nat. 136:727-741).",
  "      - The pooled within-horizon variance stands in for the environmental variance V_E (it also",
  "      holds genetic variance and, in time-averaged samples, change within the horizon, which make",
  "      Delta too small).",
  "      - The step variance of a walk is taken as the rate of increase of the variance among replicate",
  "      lineages; one lineage gives one realisation, so Delta is estimated with wide error.",
  "      - The generation time is assumed constant over the sequence.",
  "    A rate below the neutral range is consistent with stabilising selection or constraint, one above",
  "    it with selection; neither is shown by the rate alone.",
  "    Caution: Measured rates depend on the interval over which they are measured: over longer",
  "    intervals measured rates are lower, because fluctuations cancel and long intervals include",
  "    stasis (Gingerich 1983, Science 222:159-161; Gingerich 1993, Am. J. Sci. 293-A:453-478; Hunt",
  "    2012, Paleobiology 38:351-373). Compare rates only over similar interval lengths, and prefer the",
  "    model-based rates, which do not depend on the spacing of the horizons in the same way.",
].join('\n');
