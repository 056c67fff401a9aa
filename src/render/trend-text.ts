import type { LineageFit } from '../fit/fit-lineage.js';
import type { TrendTest } from '../trend/trend-test.js';
import { formatNumber } from './units.js';
import { capitalised } from './words.js';

/** The cautions every trend verdict carries (text, README and report say the same). */
export const trendCaution = 'A supported trend describes the net pattern on this design; by itself it says nothing about selection versus drift, and it depends on the age model and time-averaging.';

/**
 * A p-value as printed: 2 significant digits, "< 0.001" below that.
 *
 * @example
 * formatPValue(0.04550026); // '= 0.046'
 * formatPValue(0.0004); // '< 0.001'
 */
export function formatPValue(p: number): string {
  return p < 0.001 ? '< 0.001' : `= ${Number(p.toPrecision(2))}`;
}

/** A share as a whole percentage, e.g. "18%". */
const percent = (share: number): string => `${Math.round(share * 100)}%`;

/**
 * Why ou's first place should be read with care, or null: ou ranked first
 * with a half-life longer than the span of the sequence, or with its
 * optimum's interval open (it reaches the alpha -> 0 limit).
 *
 * @example
 * const fit = { best: 'ou', lineage: { time: [0, 10], timeUnit: { label: 'Myr' } }, models: [{ id: 'ou', derived: { half_life: { estimate: 25 } }, parameters: {} }] };
 * weakOuWin(fit); // 'its half-life (25 Myr) exceeds the span of the sequence (10 Myr)'
 * weakOuWin({ ...fit, best: 'stasis' }); // null
 */
export function weakOuWin(fit: LineageFit): string | null {
  if (fit.best !== 'ou') return null;
  const ou = fit.models.find((model) => model.id === 'ou');
  if (!ou) return null;
  const span = fit.lineage.time[fit.lineage.time.length - 1];
  const halfLife = ou.derived.half_life?.estimate ?? null;
  const optimum = ou.parameters.optimum;
  if (halfLife === null || halfLife > span) return `its half-life (${halfLife === null ? 'not finite' : formatNumber(halfLife) + ' ' + fit.lineage.timeUnit.label}) exceeds the span of the sequence (${formatNumber(span)} ${fit.lineage.timeUnit.label})`;
  if (optimum && ((optimum.lower === null && optimum.lowerAtBound) || (optimum.upper === null && optimum.upperAtBound))) return "its optimum's 95% interval is open";
  return null;
}

/**
 * The lines under a lineage's table: the verdict in one sentence, then, when
 * AICc favours a trend the test does not support, or ou wins weakly, how
 * often AICc alone does so on this design without a trend.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] });
 * const fit = fitLineage(lineage, [strictStasis], { intervals: false });
 * const test = { level: 0.05, p_value: 0.005, supported: true, direction: 'increase', replicates: 398, aicc_false_trend_rate: null, aicc_ou_rate: null, null_model: 'random-walk' };
 * trendText(fit, test).length; // 2 (the verdict, then the caution every supported trend carries)
 * trendText(fit, test)[0].endsWith('398 replicates); a directional trend (increase) is supported at the 5% level.'); // true
 * trendText(fit, { ...test, p_value: null, note: 'no trend test: too few horizons' }); // ['  No trend test: too few horizons.']
 */
export function trendText(fit: LineageFit, test: TrendTest): string[] {
  const levelText = `${Number((test.level * 100).toPrecision(3))}%`;
  // The note says why no test was made ("no trend test: …"); shown as it stands.
  if (test.p_value === null) return [`  ${capitalised(test.note ?? 'no trend test')}.`];
  const verdict = test.supported
    ? `a directional trend (${test.direction ?? 'no direction'}) is supported at the ${levelText} level`
    : `no directional trend is supported at the ${levelText} level`;
  const lines = [`  Trend test: p ${formatPValue(test.p_value)} (drift against its standard error at the random walk's step variance, parametric bootstrap from the fitted non-directional models, sequential p-value, ${test.replicates} replicates); ${verdict}.`];
  if (fit.best === 'directional-walk' && !test.supported && test.aicc_false_trend_rate !== null) {
    lines.push(`  AICc ranks the directional walk first, but the test does not support a trend: on this design AICc alone picks the directional walk in ${percent(test.aicc_false_trend_rate)} of sequences simulated from the fitted ${test.null_model} (no trend).`);
  }
  const ouReason = weakOuWin(fit);
  if (ouReason && test.aicc_ou_rate !== null) {
    lines.push(`  ou ranks first but ${ouReason}: ou often wins on short unbiased walks; on this design AICc picks ou in ${percent(test.aicc_ou_rate)} of sequences simulated from the fitted ${test.null_model}.`);
  }
  if (test.supported) lines.push(`  ${trendCaution}`);
  return lines;
}

/** The trend verdicts of a batch in counts (fit --summary: the JSON `compilation.trend_tests`). */
export interface TrendSummary {
  readonly level: number;
  readonly tested: number;
  readonly supported: number;
  readonly increase: number;
  readonly decrease: number;
  /** Lineages whose AICc ranks the directional walk first. */
  readonly aicc_directional_first: number;
  /** Of those, how many the test does not support. */
  readonly aicc_first_not_supported: number;
}

/**
 * Count the verdicts of a batch.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] });
 * const fit = fitLineage(lineage, [strictStasis], { intervals: false });
 * const test = { level: 0.05, p_value: 0.005, supported: true, direction: 'increase' };
 * summariseTrends([fit, fit], [test, { ...test, p_value: null }]); // { level: 0.05, tested: 1, supported: 1, increase: 1, decrease: 0, aicc_directional_first: 0, aicc_first_not_supported: 0 }
 */
export function summariseTrends(fits: readonly LineageFit[], trends: readonly TrendTest[]): TrendSummary {
  const tested = trends.filter((test) => test.p_value !== null);
  const aiccFirst = fits.map((fit, j) => ({ fit, test: trends[j] })).filter(({ fit }) => fit.best === 'directional-walk');
  return {
    level: trends[0]?.level ?? 0.05,
    tested: tested.length,
    supported: tested.filter((test) => test.supported).length,
    increase: tested.filter((test) => test.direction === 'increase').length,
    decrease: tested.filter((test) => test.direction === 'decrease').length,
    aicc_directional_first: aiccFirst.length,
    aicc_first_not_supported: aiccFirst.filter(({ test }) => test.p_value !== null && !test.supported).length,
  };
}

/**
 * The summary's trend lines (fit --summary).
 *
 * @example
 * const summary = { level: 0.05, tested: 4, supported: 1, increase: 1, decrease: 0, aicc_directional_first: 2, aicc_first_not_supported: 1 };
 * trendSummaryText(summary).split('\n')[0]; // 'Trend test (level 5%): a directional trend is supported in 1 of 4 lineages tested (1 increase, 0 decrease).'
 */
export function trendSummaryText(summary: TrendSummary): string {
  const levelText = `${Number((summary.level * 100).toPrecision(3))}%`;
  return [
    `Trend test (level ${levelText}): a directional trend is supported in ${summary.supported} of ${summary.tested} lineages tested (${summary.increase} increase, ${summary.decrease} decrease).`,
    `AICc ranks the directional walk first in ${summary.aicc_directional_first}; the test does not support ${summary.aicc_first_not_supported} of those.`,
    trendCaution,
  ].join('\n');
}
