import type { LineageFit } from '../fit/fit-lineage.js';
import { lineageName } from '../lineage.js';
import { findModel } from '../models/registry.js';
import { formatFixed, formatNumber, traitUnitLabel, unitLabel } from './units.js';

/** Each interval method (`ModelFit.intervalMethod`) as the tables name it: "95% <words> intervals". */
export const intervalMethodWords: Readonly<Record<string, string>> = {
  profile: 'profile-likelihood (asymptotic)',
  adjusted: 'restricted (REML-type) profile-likelihood',
  bootstrap: 'bootstrap-calibrated profile-likelihood',
  integrated: 'integrated-likelihood',
};

/**
 * Pad a row of cells to column widths (first column left-aligned, the rest right-aligned).
 *
 * @example
 * alignColumns([['model', 'K'], ['strict stasis', '1'], ['ou', '4']]); // ['  model          K', '  strict stasis  1', '  ou             4']
 */
export function alignColumns(rows: readonly (readonly string[])[], indent = '  '): string[] {
  const widths = rows[0].map((_, column) => Math.max(...rows.map((row) => [...row[column]].length)));
  return rows.map((row) => indent + row.map((cell, column) => {
    const padding = ' '.repeat(widths[column] - [...cell].length);
    return column === 0 ? cell + padding : padding + cell;
  }).join('  ').trimEnd());
}

/**
 * How the lineage's numbers were made, in words, for the table heading.
 *
 * @example
 * const lineage = { ...lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1], traitUnit: 'mm' }), logTransformed: true };
 * treatmentWords(fitLineage(lineage, [strictStasis], { intervals: false })); // 'per-horizon sampling variance, natural-log trait in ln mm'
 */
export function treatmentWords(fit: LineageFit): string {
  const { lineage } = fit;
  const variance = lineage.pooled ? 'pooled within-horizon variance' : 'per-horizon sampling variance';
  const transform = lineage.logTransformed ? 'natural-log trait' : 'untransformed trait';
  // With --trait-unit: "untransformed trait in mm" / "natural-log trait in ln mm"; without, today's words.
  const measured = lineage.traitUnit ? ` in ${traitUnitLabel(lineage.traitUnit, lineage.logTransformed, '')}` : '';
  return `${variance}, ${transform}${measured}`;
}

/**
 * The terminal table for one lineage: one row per model (K, logL, AICc,
 * ΔAICc, Akaike weight), the best-supported model marked in words, then the
 * estimates with their 95% intervals and units.
 *
 * @example
 * // Strict stasis with unit sampling variances: mean 2, logL = -1.5 ln 2 pi - 1, AICc = -2 logL + 2 + 4 (closed forms).
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] });
 * const lines = lineageTable(fitLineage(lineage, [strictStasis], { intervals: false })).split('\n');
 * lines[0]; // 'Lineage "A / length": 3 horizons over 2 Myr (per-horizon sampling variance, untransformed trait)'
 * lines[2]; // '  strict stasis  1  -3.757  13.514  0.000   1.000  <- best supported'
 * lines[4]; // '    strict stasis: stasis_mean 2 [—, —]' (no intervals asked for)
 */
export function lineageTable(fit: LineageFit): string {
  const { lineage } = fit;
  const unit = lineage.timeUnit.label;
  // "trait units" when no --trait-unit was given (the wording before the option existed).
  const traitLabel = traitUnitLabel(lineage.traitUnit, lineage.logTransformed, 'trait units');
  const span = lineage.time[lineage.time.length - 1];
  const lines: string[] = [];
  lines.push(`Lineage "${lineageName(lineage)}": ${lineage.mean.length} horizons over ${formatNumber(span)} ${unit} (${treatmentWords(fit)})`);
  const rows: string[][] = [['model', 'K', 'logL', 'AICc', 'ΔAICc', 'weight', '']];
  for (const model of fit.models) {
    rows.push([
      model.label,
      String(model.k),
      formatFixed(model.logLik, 3),
      formatFixed(model.aicc, 3),
      formatFixed(model.deltaAicc, 3),
      model.weight === null ? '—' : model.weight.toFixed(3),
      model.id === fit.best ? '<- best supported' : model.notCompared ? 'not compared' : '',
    ]);
  }
  lines.push(...alignColumns(rows));
  const methods = [...new Set(fit.models.filter((model) => model.converged).map((model) => model.intervalMethod))];
  const described = methods.map((method) => intervalMethodWords[method] ?? method).join(' / ');
  lines.push(methods.includes('none') && methods.length === 1 ? `  Estimates (time in ${unit}):` : `  Estimates with 95% ${described || 'profile-likelihood'} intervals (time in ${unit}):`);
  for (const model of fit.models) {
    if (!model.converged) {
      lines.push(`    ${model.label}: ${model.message}`);
      continue;
    }
    const specs = findModel(model.id)?.parameters ?? [];
    const parts = specs.map((spec) => {
      const estimate = model.parameters[spec.name];
      if (!estimate) return `${spec.name} —`;
      const unitText = unitLabel(spec.unit, unit, traitLabel);
      const interval = `[${estimate.lowerAtBound && estimate.lower === null ? 'open' : formatNumber(estimate.lower)}, ${estimate.upperAtBound && estimate.upper === null ? 'open' : formatNumber(estimate.upper)}]`;
      const bound = estimate.atBound ? (estimate.atBound === 'zero' ? ' (at bound 0)' : ` (at the ${estimate.atBound} limit)`) : '';
      // Without a trait unit, means and variances stay bare (the words "trait units" add nothing there).
      const shown = unitText !== '' && (spec.unit.time !== 0 || Boolean(lineage.traitUnit));
      return `${spec.name} ${formatNumber(estimate.estimate)}${shown ? ' ' + unitText : ''} ${interval}${bound}`;
    });
    for (const [name, estimate] of Object.entries(model.derived)) {
      // half_life is a time; a quantity reported at a limit (ou's limit_drift at alpha = 0) has the unit its parameter's `runaway` gives.
      const runaway = specs.find((spec) => spec.runaway?.derived === name)?.runaway;
      const derivedUnit = runaway ? unitLabel(runaway.unit, unit, traitLabel) : unit;
      // "open" only where the interval reaches a limit (half_life as alpha -> 0); limit_drift has no interval at all.
      parts.push(`${name} ${formatNumber(estimate.estimate)} ${derivedUnit} [${formatNumber(estimate.lower)}, ${estimate.upper === null && estimate.upperAtBound ? 'open' : formatNumber(estimate.upper)}]`);
    }
    // Shift models: where each new segment starts (0-based horizon index, with its age or time).
    const shifts = model.extra?.shifts as readonly Record<string, number>[] | undefined;
    shifts?.forEach((shift, k) => {
      const position = shift.height !== undefined ? `, height ${formatNumber(shift.height)}` : shift.depth !== undefined ? `, depth ${formatNumber(shift.depth)}` : '';
      const at = shift.age !== undefined ? `age ${formatNumber(shift.age)}${position}` : `time ${formatNumber(shift.time)} ${unit}`;
      parts.push(`shift ${k + 1} at horizon ${shift.index} (${at})`);
    });
    lines.push(`    ${model.label}: ${parts.join('; ')}`);
  }
  for (const model of fit.models) {
    if (model.converged && model.notCompared) lines.push(`  ${model.label}: ${model.notCompared}`);
  }
  const best = fit.models.find((model) => model.id === fit.best);
  lines.push(best ? `  Best supported: ${best.label} (Akaike weight ${best.weight?.toFixed(3)}).` : '  No model could be compared.');
  return lines.join('\n');
}
