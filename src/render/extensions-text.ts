import type { AdequacyResult } from '../fit/adequacy.js';
import type { LineageFit } from '../fit/fit-lineage.js';
import { neutralAssumptions, neutralDivergenceRange, type LineageRates } from '../fit/rates.js';
import { alignColumns } from './text-table.js';
import { formatNumber, squaredLabel, traitUnitLabel, unitLabel } from './units.js';

/**
 * Wrap words to lines of at most `width` characters, each line indented.
 *
 * @example
 * wrapWords('one two three four', '  ', 11); // ['  one two', '  three', '  four']
 */
export function wrapWords(text: string, indent: string, width = 100): string[] {
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    if (line !== '' && indent.length + line.length + 1 + word.length > width) {
      lines.push(indent + line);
      line = word;
    } else line = line === '' ? word : `${line} ${word}`;
  }
  if (line !== '') lines.push(indent + line);
  return lines;
}

/** Models whose model-based rates are printed: the best and any with Akaike weight >= 0.05. */
function shownModels(fit: LineageFit): Set<string> {
  return new Set(fit.models.filter((model) => model.id === fit.best || (model.weight ?? 0) >= 0.05).map((model) => model.id));
}

/**
 * Rates of one lineage as text: whole sequence and each interval in darwins
 * and haldanes, model-based rates with Lynch's neutral range and its
 * assumptions, and the caution about interval dependence.
 *
 * With a trait unit on the lineage (`--trait-unit`, `Lineage.traitUnit`) the
 * model-based estimates carry it ("0.32 mm per Myr", "0.087 mm² per Myr";
 * "ln mm" with `--log`) and a step variance per Myr on the ln scale reads
 * "(ln mm)²"; darwins, haldanes and Delta are unit-free by definition
 * (Haldane 1949, Evolution 3:51-56; Gingerich 1993, Am. J. Sci.
 * 293-A:453-478; Lynch 1990, Am. Nat. 136:727-741) and stay as they are.
 * Without a unit the text is what it was before the option existed.
 *
 * @example
 * // Means already on the ln scale rising by 1 per Myr: 1 darwin over every interval (Haldane 1949's unit, ln change per Myr).
 * const lineage = { ...lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] }), logTransformed: true };
 * const fit = fitLineage(lineage, [strictStasis], { intervals: false });
 * const lines = ratesText(fit, lineageRates(lineage, fit.models, null)).split('\n');
 * lines[2]; // '    whole sequence (horizons 0-2)             2          2        1         —'
 * lines[3]; // '    horizons 0-1                              1          1        1         —'
 */
export function ratesText(fit: LineageFit, rates: LineageRates): string {
  const lines: string[] = [];
  const unit = rates.timeUnit;
  const traitUnit = fit.lineage.traitUnit || null;
  const traitLabel = traitUnitLabel(traitUnit, fit.lineage.logTransformed, '');
  // A model-based estimate in the trait unit: drift is trait per time, a step variance trait² per time.
  const estimateCell = (rate: LineageRates['model'][number]): string =>
    traitUnit === null ? formatNumber(rate.estimate) : `${formatNumber(rate.estimate)} ${unitLabel({ trait: rate.kind === 'drift' ? 1 : 2, time: -1 }, unit, traitLabel)}`;
  const perMillionYearsSuffix = (rate: LineageRates['model'][number]): string =>
    rate.kind === 'drift' ? ' darwins' : traitUnit === null ? '' : ` ${squaredLabel(traitLabel)}`;
  lines.push(`  Rates (ln trait: ${rates.scale}; generation time ${rates.generationTime === null ? 'not given' : `${formatNumber(rates.generationTime)} yr`}):`);
  const rows: string[][] = [['interval', `length (${unit})`, 'ln change', 'darwins', 'haldanes']];
  const row = (name: string, rate: LineageRates['whole']): string[] => [
    name,
    formatNumber(rate.interval),
    formatNumber(rate.lnChange),
    formatNumber(rate.darwins),
    formatNumber(rate.haldanes),
  ];
  rows.push(row(`whole sequence (horizons 0-${rates.whole.to})`, rates.whole));
  for (const rate of rates.intervals) rows.push(row(`horizons ${rate.from}-${rate.to}`, rate));
  lines.push(...alignColumns(rows, '    '));
  const shown = shownModels(fit);
  const modelRates = rates.model.filter((rate) => shown.has(rate.model));
  if (modelRates.length > 0) {
    lines.push('  Model-based rates (best model and models with Akaike weight >= 0.05):');
    const modelRows: string[][] = [['model', 'parameter', traitUnit === null ? `estimate (per ${unit})` : 'estimate', 'per Myr', 'per generation', 'neutral range']];
    for (const rate of modelRates) {
      modelRows.push([
        rate.model,
        rate.parameter,
        estimateCell(rate),
        rate.perMillionYears === null ? '—' : `${formatNumber(rate.perMillionYears)}${perMillionYearsSuffix(rate)}`,
        rate.perGeneration === null ? '—' : `${formatNumber(rate.perGeneration)}${rate.kind === 'drift' ? ' haldanes' : ' (Delta)'}`,
        rate.neutral === null ? '' : `${rate.neutral} ${neutralDivergenceRange.lower} to ${neutralDivergenceRange.upper}`,
      ]);
    }
    lines.push(...alignColumns(modelRows, '    '));
    if (modelRates.some((rate) => rate.neutral !== null)) {
      lines.push('    Delta = step variance per generation / pooled within-horizon variance, against the neutral range. Assumptions:');
      for (const assumption of neutralAssumptions) lines.push(...wrapWords(`- ${assumption}`, '      '));
      lines.push(...wrapWords('A rate below the neutral range is consistent with stabilising selection or constraint, one above it with selection; neither is shown by the rate alone.', '    '));
    }
  }
  for (const note of rates.notes) lines.push(...wrapWords(`Note: ${note}`, '    '));
  lines.push(...wrapWords(`Caution: ${rates.caution}`, '    '));
  return lines.join('\n');
}

/**
 * Adequacy of the best model as text: one line per check with its p-value and verdict.
 *
 * @example
 * const row = { label: 'autocorrelation', statistic: 0.12, pValue: 0.4, adequate: true };
 * const result = { model: 'stasis', draws: 99, seed: 1, level: 0.05, checks: [row], failedDraws: 0, adequate: true, note: 'One check shown.' };
 * adequacyText(result).split('\n').slice(0, 3); // ['  Adequacy of stasis (parametric bootstrap, 99 draws, seed 1; not adequate when p < 0.05):', '    check            statistic  p-value   verdict', '    autocorrelation       0.12    0.400  adequate']
 */
export function adequacyText(result: AdequacyResult): string {
  const lines: string[] = [`  Adequacy of ${result.model} (parametric bootstrap, ${result.draws} draws, seed ${result.seed}; not adequate when p < ${result.level}):`];
  const rows: string[][] = [['check', 'statistic', 'p-value', 'verdict']];
  for (const check of result.checks) rows.push([check.label, formatNumber(check.statistic), Number.isFinite(check.pValue) ? check.pValue.toFixed(3) : '—', Number.isFinite(check.pValue) ? (check.adequate ? 'adequate' : 'NOT adequate') : 'not checked']);
  lines.push(...alignColumns(rows, '    '));
  if (result.failedDraws > 0) lines.push(`    ${result.failedDraws} simulated data sets could not be refitted and were left out.`);
  const checked = result.checks.every((check) => Number.isFinite(check.pValue));
  if (checked) lines.push(`    Overall: ${result.adequate ? 'adequate on every check' : 'not adequate on at least one check'}. With four checks at 0.05, one failure by chance is not rare (about 1 in 5).`);
  lines.push(...wrapWords(result.note, '    '));
  lines.push(...wrapWords('Voje, Starrfelt & Liow (2018), Am. Nat. 191:509-523. Adequacy, like model support, depends on sampling, time-averaging and the age model; weigh it with specialist judgement.', '    '));
  return lines.join('\n');
}
