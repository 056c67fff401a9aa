import type { LineageFit } from '../fit/fit-lineage.js';
import { neutraliseFormula } from '../data/names.js';
import { finiteOrNull } from './fit-document.js';
import type { TrendTest } from '../trend/trend-test.js';

/** The trend verdict's columns (fit with the trend test): lineage-level, repeated on each of the lineage's model rows like `horizons`. */
export const trendColumns = ['trend_statistic', 'trend_p_value', 'trend_level', 'trend_supported', 'trend_direction', 'trend_replicates', 'trend_seed', 'trend_aicc_false_trend_rate'] as const;

/**
 * One CSV field: numbers and booleans as written by `String`, null as an
 * empty field, text neutralised against formulas ({@link neutraliseFormula}),
 * then quoted when it needs it (RFC 4180).
 *
 * @example
 * csvField('shared, offset'); // '"shared, offset"'
 * csvField('=1+2'); // "'=1+2" (a formula neutralised)
 * csvField(null); // ''
 * csvField(0.1); // '0.1'
 */
export function csvField(value: string | number | boolean | null): string {
  if (value === null) return '';
  const text = typeof value === 'string' ? neutraliseFormula(value) : String(value);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * Tidy model table: one row per lineage × model, one column per quantity;
 * parameters as `NAME_estimate`, `NAME_lower`, `NAME_upper` over the union
 * of parameter names, empty where a model lacks a parameter. Numbers are
 * written in full precision. `extrapolated_horizons` counts the lineage's
 * horizons whose age an age model extrapolated beyond its outermost ties
 * (0 when none; fit.json's `extrapolated_horizons`). With `trends` (one per
 * fit), the trend verdict's {@link trendColumns} follow the parameters.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] });
 * const csv = modelsCsv([fitLineage(lineage, [strictStasis], { intervals: false })]).split('\n');
 * csv[0]; // 'section,trait,horizons,extrapolated_horizons,time_unit,model,k,logLik,aicc,delta_aicc,weight,best,compared,flags,stasis_mean_estimate,stasis_mean_lower,stasis_mean_upper'
 * csv[1]; // 'A,length,3,0,Myr,strict-stasis,1,-3.7568155996140176,13.513631199228035,0,1,true,true,,2,,' (logL = -1.5 ln 2 pi - 1)
 */
export function modelsCsv(fits: readonly LineageFit[], trends?: readonly TrendTest[] | null): string {
  const parameterNames: string[] = [];
  for (const fit of fits) {
    for (const model of fit.models) {
      for (const name of [...Object.keys(model.parameters), ...Object.keys(model.derived)]) {
        if (!parameterNames.includes(name)) parameterNames.push(name);
      }
    }
  }
  const header = [
    'section', 'trait', 'horizons', 'extrapolated_horizons', 'time_unit', 'model', 'k', 'logLik', 'aicc', 'delta_aicc', 'weight', 'best', 'compared', 'flags',
    ...parameterNames.flatMap((name) => [`${name}_estimate`, `${name}_lower`, `${name}_upper`]),
    ...(trends ? trendColumns : []),
  ];
  const rows = [header.join(',')];
  fits.forEach((fit, j) => {
    const test = trends?.[j];
    const trendCells = test
      ? [finiteOrNull(test.statistic), finiteOrNull(test.p_value), test.level, test.p_value === null ? null : test.supported, test.direction, test.replicates, test.seed, finiteOrNull(test.aicc_false_trend_rate)]
      : [];
    for (const model of fit.models) {
      const estimates = { ...model.parameters, ...model.derived };
      rows.push([
        fit.lineage.section, fit.lineage.trait, fit.lineage.mean.length, fit.lineage.extrapolated.filter(Boolean).length, fit.lineage.timeUnit.label, model.id, model.k,
        finiteOrNull(model.logLik), finiteOrNull(model.aicc), finiteOrNull(model.deltaAicc), finiteOrNull(model.weight),
        model.id === fit.best, model.aicc !== null, model.flags.join('; '),
        ...parameterNames.flatMap((name) => {
          const estimate = estimates[name];
          return estimate ? [finiteOrNull(estimate.estimate), finiteOrNull(estimate.lower), finiteOrNull(estimate.upper)] : [null, null, null];
        }),
        ...trendCells,
      ].map(csvField).join(','));
    }
  });
  return rows.join('\n') + '\n';
}
