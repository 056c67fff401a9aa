/**
 * Formatting of comparison results (terminal table, JSON document, tidy CSV).
 * Pure: reads the plain result objects of `compareSections`, prints nothing.
 */
import type { ParameterEstimate } from '../fit/fit-model.js';
import { estimateEndsDocument, finiteOrNull } from './fit-document.js';
import { csvField } from './models-csv.js';
import { alignColumns, intervalMethodWords } from './text-table.js';
import { formatFixed, formatNumber } from './units.js';
import type { CandidateSpread, Spread } from '../compare/age-uncertainty.js';
import { candidateKey, type HypothesisFit, type LeftOutHypothesis, type TraitComparison } from '../compare/compare-sections.js';
import { commonTime } from '../compare/stack.js';
import { listWords } from './words.js';

/** Words for each hypothesis id. */
export const hypothesisWords: Record<string, string> = {
  separate: 'separate (each section its own parameters)',
  shared: 'shared process, own starting values',
  'shared-offset': 'one lineage, constant offset per section',
};

/** The interpretive caution printed under every comparison (user-facing). */
export const comparisonCaution =
  'Caution: support for a shared or separate process depends on the age model (each section\'s dating and tie points), ' +
  'sampling, and time-averaging within horizons; "shared-offset" assumes the sections sample one lineage on a correct common timescale. ' +
  'A shared process does not by itself show that the localities exchanged migrants, nor a separate one that they were isolated; ' +
  'the likelihood-ratio p-value is approximate when a variance sits at its bound 0. Weigh these results with the specialist\'s knowledge of the sections.';

/**
 * One estimate with its interval in words, as compare's table prints it:
 * "drift 0.37 [0.27, 0.5]"; an end that reaches a limit is "open", one that
 * was not computed "—".
 *
 * @example
 * estimateText('alpha', { estimate: 0.3, lower: 0, upper: null, atBound: null, lowerAtBound: false, upperAtBound: true }); // 'alpha 0.3 [0, open]'
 */
export function estimateText(name: string, estimate: ParameterEstimate): string {
  // "open" only where the interval reaches a limit (as in fit's table); an end that was not computed is "—".
  const end = (value: number | null, atBound: boolean | undefined): string => (value === null ? (atBound ? 'open' : '—') : formatNumber(value));
  const interval = estimate.lower === null && estimate.upper === null && !estimate.lowerAtBound && !estimate.upperAtBound ? '' : ` [${end(estimate.lower, estimate.lowerAtBound)}, ${end(estimate.upper, estimate.upperAtBound)}]`;
  const bound = estimate.atBound ? (estimate.atBound === 'zero' ? ' (at bound 0)' : ` (at the ${estimate.atBound} limit)`) : '';
  return `${name} ${formatNumber(estimate.estimate)}${interval}${bound}`;
}

function spreadText(spread: Spread, digits = 3): string {
  if (spread.median === null) return '—';
  const show = (value: number | null): string => (value === null ? '—' : digits === 3 ? value.toFixed(3) : formatNumber(value));
  return `${show(spread.median)} [${show(spread.lower)}, ${show(spread.upper)}]`;
}

/**
 * Horizons whose ages are extrapolated, per section, in words (empty when none).
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', trait: 'length', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] });
 * const comparison = compareSections([a, b], [strictStasis], { intervals: false });
 * extrapolatedWords(comparison); // ''
 * extrapolatedWords({ ...comparison, sections: [{ ...a, extrapolated: [false, true] }, b] }); // 'EXTRAPOLATED AGES (beyond the outermost ties) — A: 1 (input line 3)'
 */
export function extrapolatedWords(comparison: TraitComparison): string {
  const parts = comparison.sections
    .map((section) => ({ name: section.section, count: section.extrapolated.filter(Boolean).length, lines: section.lines.filter((_, i) => section.extrapolated[i]) }))
    .filter((entry) => entry.count > 0)
    .map((entry) => `${entry.name}: ${entry.count} (input line${entry.count === 1 ? '' : 's'} ${entry.lines.join(', ')})`);
  return parts.length === 0 ? '' : `EXTRAPOLATED AGES (beyond the outermost ties) — ${parts.join('; ')}`;
}

/**
 * The terminal table of one trait: every hypothesis × model family ranked by
 * AICc (K, logL, AICc, ΔAICc, weight), the likelihood-ratio tests of shared
 * against separate, the estimates of the best-supported hypothesis, and the caution.
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', trait: 'length', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] });
 * const lines = comparisonTable(compareSections([a, b], [strictStasis], { intervals: false })).split('\n');
 * lines[2]; // '  shared         strict-stasis  1  -6.676  17.352  0.000   0.982  <- best supported' (weight 1 / (1 + exp(-4)))
 * lines[7]; // '    strict-stasis  4.000   1  0.0455' (G = 4 on 1 df)
 */
export function comparisonTable(comparison: TraitComparison, ageDraws: { draws: number; seed: number; spreads: readonly CandidateSpread[]; tiedDraws?: number } | null = null): string {
  const unit = comparison.sections[0].timeUnit.label;
  const lines: string[] = [];
  const sectionList = comparison.sections.map((section) => `${section.section} (${section.mean.length})`).join(', ');
  // With --trait-unit: ", trait in mm" ("ln mm" with --log); without, the heading is as before the option.
  const traitUnit = comparison.sections[0].traitUnit;
  const traitWords = traitUnit ? `, trait in ${comparison.sections[0].logTransformed ? 'ln ' : ''}${traitUnit}` : '';
  lines.push(`Trait "${comparison.trait || 'trait'}": ${comparison.sections.length} sections — ${sectionList} — ${comparison.horizons} horizons; AICc with N = ${comparison.horizons}, time in ${unit}${traitWords}`);
  const extrapolated = extrapolatedWords(comparison);
  if (extrapolated) lines.push(`  ${extrapolated}`);
  const ranked = [...comparison.hypotheses].sort((a, b) => (a.aicc ?? Infinity) - (b.aicc ?? Infinity));
  const rows: string[][] = [['hypothesis     model', 'K', 'logL', 'AICc', 'ΔAICc', 'weight', '']];
  const tiedBest = comparison.bestGroup.length > 1;
  const inBestGroup = (hypothesis: HypothesisFit): boolean => comparison.bestGroup.some((entry) => entry.id === hypothesis.id && entry.model === hypothesis.model);
  for (const hypothesis of ranked) {
    const isBest = comparison.best !== null && comparison.best.id === hypothesis.id && comparison.best.model === hypothesis.model;
    const marker = tiedBest && inBestGroup(hypothesis)
      ? '<- best supported, tied (same fit)'
      : isBest ? '<- best supported'
        : hypothesis.aicc === null ? 'not compared'
          : hypothesis.sameFitAs.length > 0 ? `same fit as ${hypothesis.sameFitAs.join(', ')}` : '';
    rows.push([
      `${hypothesis.id.padEnd(15)}${hypothesis.model}`,
      String(hypothesis.k),
      formatFixed(hypothesis.logLik, 3),
      formatFixed(hypothesis.aicc, 3),
      formatFixed(hypothesis.deltaAicc, 3),
      hypothesis.weight === null ? '—' : hypothesis.weight.toFixed(3),
      marker,
    ]);
  }
  lines.push(...alignColumns(rows));
  const summed = (id: string): number => comparison.hypotheses.filter((h) => h.id === id).reduce((sum, h) => sum + (h.weight ?? 0), 0);
  lines.push(`  Summed weight by hypothesis: separate ${summed('separate').toFixed(3)}, shared ${summed('shared').toFixed(3)}, shared-offset ${summed('shared-offset').toFixed(3)}`);
  for (const hypothesis of comparison.hypotheses) {
    if (hypothesis.message) lines.push(`  ${hypothesis.id} ${hypothesis.model}: ${hypothesis.message}`);
  }
  lines.push(...leftOutWords(comparison.leftOut).map((line) => `  ${line}`));
  if (comparison.tests.length > 0) {
    lines.push('  Shared against separate (likelihood-ratio test; chi-square p-value):');
    const testRows = [['model', 'G', 'df', 'p']];
    for (const test of comparison.tests) {
      testRows.push([test.model, formatFixed(test.statistic, 3), String(test.degreesOfFreedom), pValueText(test.pValue)]);
    }
    lines.push(...alignColumns(testRows, '    '));
  }
  const best = comparison.hypotheses.find((h) => comparison.best && h.id === comparison.best.id && h.model === comparison.best.model);
  if (best && tiedBest) {
    const group = comparison.hypotheses.filter(inBestGroup);
    const combined = group.reduce((sum, h) => sum + (h.weight ?? 0), 0);
    lines.push(`  Best supported: cannot be told apart here — ${listWords(group.map((h) => `${h.id} ${h.model}`))} are the same fit at their estimates (K = ${best.k}, logL ${formatFixed(best.logLik, 3)} in each), so the data do not favour one over the other; together they carry Akaike weight ${combined.toFixed(3)}.`);
    const estimates = Object.entries(best.parameters).map(([name, estimate]) => estimateText(name, estimate));
    if (estimates.length > 0) lines.push(`  Estimates of ${best.id} ${best.model} (${intervalWords(best.intervalMethod)}): ${estimates.join('; ')}`);
  } else if (best) {
    lines.push(`  Best supported: ${best.id} ${best.label} — ${hypothesisWords[best.id]} (Akaike weight ${best.weight?.toFixed(3)}).`);
    const estimates = Object.entries(best.parameters).map(([name, estimate]) => estimateText(name, estimate));
    if (estimates.length > 0) lines.push(`  Its estimates (${intervalWords(best.intervalMethod)}): ${estimates.join('; ')}`);
  } else {
    lines.push('  No hypothesis could be compared.');
  }
  if (ageDraws) {
    lines.push(`  Age uncertainty: ${ageDraws.draws} redraws of the tie-point ages (seed ${ageDraws.seed}); Akaike weight median [2.5%, 97.5%] and how often best:`);
    const drawRows = [['hypothesis model', 'weight', 'best in']];
    let negligible = 0;
    for (const spread of ageDraws.spreads) {
      if (spread.bestFraction === 0 && spread.weight.upper !== null && spread.weight.upper < 0.001) {
        negligible += 1;
        continue;
      }
      drawRows.push([spread.key, spreadText(spread.weight), `${(100 * spread.bestFraction).toFixed(1)}%`]);
    }
    lines.push(...alignColumns(drawRows, '    '));
    if (negligible > 0) lines.push(`    (${negligible} other${negligible === 1 ? '' : 's'}: weight below 0.001 in 97.5% of the draws, never best)`);
    const tied = ageDraws.tiedDraws ?? 0;
    if (tied > 0) {
      lines.push(`    In ${tied} of ${ageDraws.draws} draws the best was a tie of identical fits (equal K and logL): each tied row counts that draw as best, so "best in" can add up to more than 100%.`);
    }
    const bestSpread = best ? ageDraws.spreads.find((spread) => spread.key === candidateKey(best)) : undefined;
    if (bestSpread) {
      const parts = Object.entries(bestSpread.estimates).filter(([, spread]) => spread.median !== null).map(([name, spread]) => `${name} ${spreadText(spread, 4)}`);
      if (parts.length > 0) lines.push(`    Estimates of ${best!.id} ${best!.model} over the redraws (median [2.5%, 97.5%]): ${parts.join('; ')}`);
    }
  }
  lines.push(`  ${comparisonCaution}`);
  return lines.join('\n');
}

/**
 * "95% integrated-likelihood intervals where computed", or "no intervals" for a fit without them.
 *
 * @example
 * intervalWords('profile / integrated'); // '95% profile-likelihood (asymptotic) / integrated-likelihood intervals where computed'
 * intervalWords('none'); // 'no intervals'
 */
export function intervalWords(method: string): string {
  if (method === 'none' || method === '') return 'no intervals';
  const described = method.split(' / ').map((part) => intervalMethodWords[part] ?? part).join(' / ');
  return `95% ${described} intervals where computed`;
}

/**
 * The left-out hypotheses in words, one line per reason: "Left out, never ranked — shared and shared-offset of a, b: reason".
 *
 * @example
 * const reason = 'not fitted: a shift shared by several sections is not defined here';
 * leftOutWords([{ id: 'shared', model: 'punctuated-1', reason }, { id: 'shared-offset', model: 'punctuated-1', reason }]); // ['Left out, never ranked — shared and shared-offset of punctuated-1: not fitted: a shift shared by several sections is not defined here']
 */
export function leftOutWords(leftOut: readonly LeftOutHypothesis[]): string[] {
  const byReason = new Map<string, Map<string, string[]>>();
  for (const entry of leftOut) {
    const ids = leftOut.filter((other) => other.model === entry.model && other.reason === entry.reason).map((other) => (other.id === 'every' ? 'every hypothesis' : other.id));
    const idWords = listWords(ids);
    const groups = byReason.get(entry.reason) ?? new Map<string, string[]>();
    byReason.set(entry.reason, groups);
    const models = groups.get(idWords) ?? [];
    groups.set(idWords, models);
    if (!models.includes(entry.model)) models.push(entry.model);
  }
  return [...byReason].map(([reason, groups]) => `Left out, never ranked — ${[...groups].map(([ids, models]) => `${ids} of ${models.join(', ')}`).join('; ')}: ${reason}`);
}

/**
 * A p-value for tables: 4 decimals, exponent form below 1e-4, "< 1e-15" below what the chi-square tail resolves.
 *
 * @example
 * pValueText(0.23231); // '0.2323'
 * pValueText(8.68e-9); // '8.68e-9'
 * pValueText(null); // '—'
 */
export function pValueText(value: number | null): string {
  if (value === null) return '—';
  if (value < 1e-15) return '< 1e-15';
  return value < 1e-4 ? value.toExponential(2) : value.toFixed(4);
}

function spreadDocument(spread: Spread): Record<string, unknown> {
  return { median: finiteOrNull(spread.median), lower: finiteOrNull(spread.lower), upper: finiteOrNull(spread.upper), draws: spread.count };
}

/**
 * JSON form of age-draw summaries.
 *
 * @example
 * const draws = [[{ key: 'a', weight: 0.7, best: true, estimates: { x: 1 } }], [{ key: 'a', weight: 0.4, best: false, estimates: { x: 3 } }]];
 * spreadsDocument(summariseDraws(draws))[0].estimates; // { x: { median: 2, lower: 1.05, upper: 2.95, draws: 2 } }
 */
export function spreadsDocument(spreads: readonly CandidateSpread[]): Record<string, unknown>[] {
  return spreads.map((spread) => ({
    key: spread.key,
    weight: spreadDocument(spread.weight),
    best_fraction: spread.bestFraction,
    estimates: Object.fromEntries(Object.entries(spread.estimates).map(([name, value]) => [name, spreadDocument(value)])),
  }));
}

/**
 * The JSON document of one trait's comparison:
 * `{trait, sections, horizons, best, hypotheses: [{id, model, label, k, logLik, aicc, delta_aicc, weight, ...}], tests}`.
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', trait: 'length', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] });
 * const document = comparisonDocument(compareSections([a, b], [strictStasis], { intervals: false }));
 * document.best; // { id: 'shared', model: 'strict-stasis' }
 * document.horizons; // 4
 */
export function comparisonDocument(comparison: TraitComparison, spreads: readonly CandidateSpread[] | null = null, tiedDraws = 0): Record<string, unknown> {
  const { origin, starts } = commonTime(comparison.sections);
  return {
    trait: comparison.trait,
    horizons: comparison.horizons,
    time_unit: comparison.sections[0].timeUnit.label,
    // The --trait-unit label as given (null when none), as in fit.json.
    trait_unit: comparison.sections[0].traitUnit ?? null,
    common_time_origin_age: origin,
    sections: comparison.sections.map((section, s) => ({
      section: section.section,
      horizons: section.mean.length,
      first_age: finiteOrNull(section.firstAge ?? null),
      common_time_start: starts[s],
      extrapolated: section.extrapolated,
      extrapolated_horizons: section.extrapolated.filter(Boolean).length,
      line: section.lines,
    })),
    best: comparison.best,
    // More than one entry: the best cannot be told apart from the others here (the same fit at the estimates).
    best_tied: comparison.bestGroup,
    left_out: comparison.leftOut,
    hypotheses: comparison.hypotheses.map((hypothesis) => ({
      id: hypothesis.id,
      model: hypothesis.model,
      label: hypothesis.label,
      description: hypothesisWords[hypothesis.id],
      k: hypothesis.k,
      horizons: hypothesis.horizons,
      logLik: finiteOrNull(hypothesis.logLik),
      aicc: finiteOrNull(hypothesis.aicc),
      delta_aicc: finiteOrNull(hypothesis.deltaAicc),
      weight: finiteOrNull(hypothesis.weight),
      converged: hypothesis.converged,
      compared: hypothesis.aicc !== null,
      message: hypothesis.message,
      same_fit_as: hypothesis.sameFitAs,
      interval_method: hypothesis.intervalMethod,
      params: Object.fromEntries(Object.entries(hypothesis.parameters).map(([name, estimate]) => [name, estimateEndsDocument(estimate)])),
      flags: hypothesis.flags,
    })),
    tests: comparison.tests.map((test) => ({
      model: test.model,
      restricted: test.restricted,
      full: test.full,
      statistic: finiteOrNull(test.statistic),
      df: test.degreesOfFreedom,
      p_value: finiteOrNull(test.pValue),
      distribution: 'chi-square (@stdlib/stats-base-dists-chisquare-cdf)',
    })),
    age_uncertainty: spreads ? spreadsDocument(spreads) : null,
    // Draws whose best was a tie of identical fits; every tied candidate counts such a draw in its best_fraction.
    age_draws_best_tied: spreads ? tiedDraws : null,
  };
}

/**
 * Tidy CSV of the comparison: one row per trait × hypothesis × model family,
 * with the likelihood-ratio test on the family's shared row and, after
 * `--age-draws`, the median and 2.5–97.5% range of the weight over the draws
 * and the fraction of draws in which the row was best.
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', trait: 'length', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] });
 * const rows = comparisonCsv([compareSections([a, b], [strictStasis], { intervals: false })]).split('\n');
 * rows[0]; // 'trait,hypothesis,model,k,horizons,logLik,aicc,delta_aicc,weight,best,compared,lrt_statistic,lrt_df,lrt_p_value,extrapolated_horizons,message,same_fit_as'
 * rows[2]; // 'length,shared,strict-stasis,1,4,-6.675754132818691,17.35150826563738,0,0.9820137900379085,true,true,4,1,0.04550026389635842,0,,'
 */
export function comparisonCsv(comparisons: readonly TraitComparison[], spreads: ReadonlyMap<string, readonly CandidateSpread[]> | null = null): string {
  const withDraws = spreads !== null && spreads.size > 0;
  const header = ['trait', 'hypothesis', 'model', 'k', 'horizons', 'logLik', 'aicc', 'delta_aicc', 'weight', 'best', 'compared', 'lrt_statistic', 'lrt_df', 'lrt_p_value', 'extrapolated_horizons', 'message', 'same_fit_as',
    ...(withDraws ? ['draws_weight_median', 'draws_weight_lower', 'draws_weight_upper', 'draws_best_fraction'] : [])];
  const rows = [header.join(',')];
  for (const comparison of comparisons) {
    const extrapolated = comparison.sections.reduce((sum, section) => sum + section.extrapolated.filter(Boolean).length, 0);
    for (const h of comparison.hypotheses) {
      const test = h.id === 'shared' ? comparison.tests.find((entry) => entry.model === h.model) : undefined;
      const best = comparison.best !== null && comparison.best.id === h.id && comparison.best.model === h.model;
      rows.push([
        comparison.trait, h.id, h.model, h.k, h.horizons, finiteOrNull(h.logLik), finiteOrNull(h.aicc), finiteOrNull(h.deltaAicc), finiteOrNull(h.weight),
        best, h.aicc !== null, test ? finiteOrNull(test.statistic) : null, test ? test.degreesOfFreedom : null, test ? finiteOrNull(test.pValue) : null,
        extrapolated, h.message, h.sameFitAs.join('; '),
        ...(withDraws ? drawColumns(spreads.get(comparison.trait)?.find((spread) => spread.key === candidateKey(h))) : []),
      ].map(csvField).join(','));
    }
  }
  return rows.join('\n') + '\n';
}

function drawColumns(spread: CandidateSpread | undefined): (number | null)[] {
  if (!spread) return [null, null, null, null];
  return [finiteOrNull(spread.weight.median), finiteOrNull(spread.weight.lower), finiteOrNull(spread.weight.upper), spread.bestFraction];
}

/**
 * Tidy CSV of the estimates: one row per trait × hypothesis × model × parameter.
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', trait: 'length', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] });
 * estimatesCsv([compareSections([a, b], [strictStasis], { intervals: false })]).split('\n'); // ['trait,hypothesis,model,parameter,estimate,lower,upper,at_bound', 'length,separate,strict-stasis,stasis_mean[A],2,,,', 'length,separate,strict-stasis,stasis_mean[B],4,,,', 'length,shared,strict-stasis,stasis_mean,3,,,', '']
 */
export function estimatesCsv(comparisons: readonly TraitComparison[]): string {
  const rows = ['trait,hypothesis,model,parameter,estimate,lower,upper,at_bound'];
  for (const comparison of comparisons) {
    for (const h of comparison.hypotheses) {
      for (const [name, estimate] of Object.entries(h.parameters)) {
        rows.push([comparison.trait, h.id, h.model, name, finiteOrNull(estimate.estimate), finiteOrNull(estimate.lower), finiteOrNull(estimate.upper), estimate.atBound].map(csvField).join(','));
      }
    }
  }
  return rows.join('\n') + '\n';
}
