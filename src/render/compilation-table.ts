import type { CompilationSummary, Distribution } from '../compare/compilation.js';
import type { TrendSummary } from './trend-text.js';
import { alignColumns } from './text-table.js';
import { formatNumber } from './units.js';

/** The caution printed with every compilation summary. */
export const compilationCaution =
  'Counts of wins summarise model support, not mechanism: a good fit to a random walk says nothing by itself about drift versus selection, ' +
  'and support depends on sampling, time-averaging and the age model of each sequence. Drift estimates are on the scale of each trait, ' +
  'so pooling them across traits or units compares unlike things. Defer to the specialist’s judgement of the sequences.';

function percent(share: number): string {
  return `${(100 * share).toFixed(1)}%`;
}

function spread(value: Distribution, format: (x: number | null) => string = (x) => formatNumber(x, 3)): string {
  return value.count === 0 ? '—' : `${format(value.median)} [${format(value.lowerQuartile)}, ${format(value.upperQuartile)}]`;
}

/**
 * The terminal table of a compilation: one row per model with its wins, its
 * share of the lineages, and the median [quartiles] and mean of its Akaike
 * weight; then the drift estimates' distribution.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] });
 * const fit = fitLineage(lineage, [strictStasis], { intervals: false });
 * const lines = compilationTable(summariseCompilation([fit, fit])).split('\n');
 * lines[0]; // 'Compilation of 2 lineages (2 with models compared by AICc)'
 * lines[3]; // '  strict stasis     2  100.0%          1.00 [1.00, 1.00]         1.00         2'
 */
export function compilationTable(summary: CompilationSummary): string {
  const weight = (x: number | null): string => (x === null ? '—' : x.toFixed(2));
  const lines: string[] = [];
  lines.push(`Compilation of ${summary.lineages} lineage${summary.lineages === 1 ? '' : 's'} (${summary.compared} with models compared by AICc)`);
  lines.push('');
  lines.push(
    ...alignColumns([
      ['model', 'wins', 'share', 'weight median [quartiles]', 'mean weight', 'compared'],
      ...summary.models.map((model) => [model.label, String(model.wins), percent(model.winShare), spread(model.weight, weight), weight(model.weight.mean), String(model.compared)]),
    ]),
  );
  const drift = summary.drift;
  if (drift && drift.estimate.count > 0) {
    // One --trait-unit for every lineage: "mm per Myr"; none given (or mixed): "trait units" as before the option.
    const traitUnits = drift.traitUnits ?? [null];
    const trait = traitUnits.length === 1 && traitUnits[0] !== null ? traitUnits[0] : 'trait units';
    const mixedTraits = traitUnits.length > 1 ? ` (mixed trait units: ${traitUnits.map((unit) => unit ?? 'none given').join(', ')})` : '';
    const unit = (drift.timeUnits.length === 1 ? `${trait} per ${drift.timeUnits[0]}` : `${trait} per time unit (mixed units: ${drift.timeUnits.join(', ')})`) + mixedTraits;
    lines.push('');
    lines.push(`Drift of the ${drift.model} model (${unit}), over ${drift.estimate.count} lineages:`);
    lines.push(
      ...alignColumns([
        ['lineages', 'median [quartiles]', 'mean', 'range'],
        ['all fitted', spread(drift.estimate), formatNumber(drift.estimate.mean, 3), `${formatNumber(drift.estimate.minimum, 3)} to ${formatNumber(drift.estimate.maximum, 3)}`],
        [
          `where ${drift.model} wins (${drift.winnersEstimate.count})`,
          spread(drift.winnersEstimate),
          formatNumber(drift.winnersEstimate.mean, 3),
          drift.winnersEstimate.count === 0 ? '—' : `${formatNumber(drift.winnersEstimate.minimum, 3)} to ${formatNumber(drift.winnersEstimate.maximum, 3)}`,
        ],
      ]),
    );
    lines.push(
      drift.withInterval === 0
        ? '  (no drift intervals: fitted without intervals)'
        : `  95% interval wholly above 0 in ${drift.positive} lineage${drift.positive === 1 ? '' : 's'}, wholly below 0 in ${drift.negative} (of ${drift.withInterval} with an interval).`,
    );
  }
  lines.push('');
  lines.push(compilationCaution);
  return lines.join('\n');
}

/**
 * The JSON form of a compilation summary (snake_case like fit.json), with the
 * batch's trend verdicts in counts (`trend_tests`, last) when given.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] });
 * const fit = fitLineage(lineage, [strictStasis], { intervals: false });
 * const document = compilationDocument(summariseCompilation([fit, fit]));
 * document.models[0]; // { id: 'strict-stasis', label: 'strict stasis', wins: 2, win_share: 1, compared: 2, weight: { count: 2, mean: 1, minimum: 1, lower_quartile: 1, median: 1, upper_quartile: 1, maximum: 1 } }
 */
export function compilationDocument(summary: CompilationSummary, trends: TrendSummary | null = null) {
  const distributionDocument = (value: Distribution) => ({
    count: value.count,
    mean: value.mean,
    minimum: value.minimum,
    lower_quartile: value.lowerQuartile,
    median: value.median,
    upper_quartile: value.upperQuartile,
    maximum: value.maximum,
  });
  return {
    lineages: summary.lineages,
    compared: summary.compared,
    models: summary.models.map((model) => ({
      id: model.id,
      label: model.label,
      wins: model.wins,
      win_share: model.winShare,
      compared: model.compared,
      weight: distributionDocument(model.weight),
    })),
    drift: summary.drift
      ? {
          model: summary.drift.model,
          time_units: summary.drift.timeUnits,
          estimate: distributionDocument(summary.drift.estimate),
          where_best: distributionDocument(summary.drift.winnersEstimate),
          interval_above_zero: summary.drift.positive,
          interval_below_zero: summary.drift.negative,
          with_interval: summary.drift.withInterval,
        }
      : null,
    per_lineage: summary.names.map((name, index) => ({
      lineage: name,
      best: summary.best[index],
      weights: Object.fromEntries(summary.models.map((model) => [model.id, model.weights[index]])),
      drift: summary.drift ? summary.drift.estimates[index] : null,
    })),
    caution: compilationCaution,
    ...(trends ? { trend_tests: trends } : {}),
  };
}

/** fit.json's `compilation` block (`fit --summary`). */
export type CompilationDocument = ReturnType<typeof compilationDocument>;
