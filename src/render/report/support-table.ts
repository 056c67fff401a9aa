import { findModel } from '../../models/registry.js';
import { formatFixed, formatNumber, traitUnitLabel, unitLabel } from '../units.js';
import type { EstimateView, LineageView, ModelView } from './document-view.js';
import { intervalCaution } from './cautions.js';
import { escapeHtml, exactValue } from './html.js';

function numberCell(field: string, value: number | null, text: string): string {
  return `<td class="number" data-field="${field}" data-value="${exactValue(value)}">${escapeHtml(text)}</td>`;
}

/**
 * The model-support table of one lineage: K, logL, AICc, ΔAICc and Akaike
 * weight per model, with a weight bar, the best model marked in words and
 * models not compared shown as such. Every number cell carries
 * `data-field` and `data-value` (the exact double from fit.json) so the
 * page can be checked against the document.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * supportTable(document.lineages[0]).startsWith('<table class="support" aria-label="model support">'); // true
 */
export function supportTable(lineage: LineageView): string {
  const rows = lineage.models.map((model) => {
    const best = model.id === lineage.best_model;
    const weight = model.weight;
    const bar = weight === null ? '' : `<span class="bar-track" aria-hidden="true"><span class="bar" style="width:${(weight * 100).toFixed(1)}%"></span></span>`;
    const status = best ? '<strong>best supported</strong>' : model.compared ? '' : escapeHtml(model.not_compared_reason ?? 'not compared');
    return `<tr data-model="${escapeHtml(model.id)}" class="${best ? 'best' : model.compared ? '' : 'not-compared'}">`
      + `<td>${escapeHtml(model.label)}</td>`
      + numberCell('k', model.k, String(model.k))
      + numberCell('logLik', model.logLik, formatFixed(model.logLik, 3))
      + numberCell('aicc', model.aicc, formatFixed(model.aicc, 3))
      + numberCell('delta_aicc', model.delta_aicc, formatFixed(model.delta_aicc, 3))
      + `<td class="number" data-field="weight" data-value="${exactValue(weight)}">${weight === null ? '—' : weight.toFixed(3)}${bar}</td>`
      + `<td>${status}</td></tr>`;
  });
  return `<table class="support" aria-label="model support">
<thead><tr><th>model</th><th class="number">K</th><th class="number">logL</th><th class="number">AICc</th><th class="number">ΔAICc</th><th class="number">Akaike weight</th><th></th></tr></thead>
<tbody>
${rows.join('\n')}
</tbody></table>`;
}

function intervalText(estimate: EstimateView): string {
  const lower = estimate.lower === null ? (estimate.lower_at_bound ? 'open' : '—') : formatNumber(estimate.lower);
  const upper = estimate.upper === null ? (estimate.upper_at_bound ? 'open' : '—') : formatNumber(estimate.upper);
  return `[${lower}, ${upper}]`;
}

function boundText(estimate: EstimateView): string {
  if (!estimate.at_bound) return '';
  return estimate.at_bound === 'zero' ? 'at the bound 0' : `at the ${estimate.at_bound} limit`;
}

function unitOf(modelId: string, name: string, lineage: LineageView): string {
  const parameters = findModel(modelId)?.parameters ?? [];
  const spec = parameters.find((parameter) => parameter.name === name);
  // A quantity reported at a limit (ou's limit_drift at alpha = 0) has the unit its parameter's `runaway` declares.
  const unit = spec?.unit ?? parameters.find((parameter) => parameter.runaway?.derived === name)?.runaway?.unit;
  const logged = lineage.transform === 'ln';
  // Without a trait unit: "ln units" / "trait units", as before --trait-unit existed.
  const traitLabel = traitUnitLabel(lineage.trait_unit, logged, logged ? 'ln units' : 'trait units');
  if (!unit) return name === 'half_life' ? lineage.time_unit : '';
  return unitLabel(unit, lineage.time_unit, traitLabel);
}

/**
 * A shift as a reader wants it: the horizon where the new segment starts, with its age (and height or depth).
 *
 * @example
 * shiftWords({ index: 4, age: 12.5, height: 30 }, 0, { time_unit: 'Myr' }); // 'shift 1 at horizon 5 of the sequence, counted from the oldest (age 12.5 Ma, height 30 m)'
 */
export function shiftWords(shift: Record<string, unknown>, k: number, lineage: Pick<LineageView, 'time_unit'>): string {
  const unit = lineage.time_unit;
  const ageUnit = unit === 'Myr' ? 'Ma' : unit === 'kyr' ? 'ka' : `${unit} before present`;
  const places: string[] = [];
  if (typeof shift.age === 'number') places.push(`age ${formatNumber(shift.age)} ${ageUnit}`);
  else if (typeof shift.time === 'number') places.push(`time ${formatNumber(shift.time)} ${unit}`);
  for (const kind of ['height', 'depth']) if (typeof shift[kind] === 'number') places.push(`${kind} ${formatNumber(shift[kind] as number)} m`);
  const index = typeof shift.index === 'number' ? shift.index : null;
  return `shift ${k + 1} at horizon ${index === null ? '—' : index + 1} of the sequence, counted from the oldest${places.length > 0 ? ` (${places.join(', ')})` : ''}`;
}

function extraText(model: ModelView, lineage: LineageView): string {
  const known = new Set(['id', 'label', 'k', 'logLik', 'aicc', 'delta_aicc', 'weight', 'converged', 'compared', 'not_compared_reason', 'interval_method', 'params', 'derived', 'flags']);
  const parts: string[] = [];
  for (const [key, value] of Object.entries(model)) {
    if (known.has(key)) continue;
    if (key === 'shifts' && Array.isArray(value)) {
      parts.push(...value.map((shift, k) => shiftWords(shift as Record<string, unknown>, k, lineage)));
      parts.push('shift positions are estimated by exhaustive search and have no interval; the other intervals are conditional on them');
    } else if (key === 'shift_search' && value !== null && typeof value === 'object') {
      const search = value as { configurations?: number; searched_in_full?: number; minimum_segment?: number };
      parts.push(`${search.configurations ?? '—'} placements scored, ${search.searched_in_full ?? '—'} searched in full, at least ${search.minimum_segment ?? '—'} horizons per segment`);
    } else parts.push(`${key}: ${typeof value === 'string' ? value : JSON.stringify(value)}`);
  }
  return parts.join('; ');
}

/** Parameters that place a shift (its time and the time of the horizon before it): shown as the shift's position, not as estimates with intervals. */
const shiftPlacement = /^shift_\d+_(previous_)?time$/;

/**
 * The estimates of every fitted model with their 95% intervals, units and bound flags.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * estimatesTable(document.lineages[0]).includes('<tr data-model="strict-stasis"'); // true
 */
export function estimatesTable(lineage: LineageView): string {
  const rows: string[] = [];
  for (const model of lineage.models) {
    if (!model.converged) {
      rows.push(`<tr data-model="${escapeHtml(model.id)}"><td>${escapeHtml(model.label)}</td><td colspan="5">${escapeHtml(model.not_compared_reason ?? 'not fitted')}</td></tr>`);
      continue;
    }
    const entries = [...Object.entries(model.params), ...Object.entries(model.derived)].filter(([name]) => !(Array.isArray(model.shifts) && shiftPlacement.test(name)));
    entries.forEach(([name, estimate], index) => {
      rows.push(`<tr data-model="${escapeHtml(model.id)}" data-parameter="${escapeHtml(name)}">`
        + (index === 0 ? `<td rowspan="${entries.length}">${escapeHtml(model.label)}</td>` : '')
        + `<td><code>${escapeHtml(name)}</code></td>`
        + numberCell('estimate', estimate.estimate, formatNumber(estimate.estimate))
        + `<td class="number">${escapeHtml(intervalText(estimate))}</td>`
        + `<td>${escapeHtml(unitOf(model.id, name, lineage))}</td>`
        + `<td>${escapeHtml(boundText(estimate))}</td></tr>`);
    });
    const extra = extraText(model, lineage);
    if (extra) rows.push(`<tr data-model="${escapeHtml(model.id)}"><td></td><td colspan="5" class="note">${escapeHtml(extra)}</td></tr>`);
  }
  const methods = [...new Set(lineage.models.filter((model) => model.converged).map((model) => model.interval_method))];
  return `<table class="estimates" aria-label="estimates">
<thead><tr><th>model</th><th>parameter</th><th class="number">estimate</th><th class="number">95% interval</th><th>unit</th><th>note</th></tr></thead>
<tbody>
${rows.join('\n')}
</tbody></table>
<p class="note">Intervals: ${escapeHtml(methods.join(', ') || 'none')}; "open" means the interval reaches a bound or limit of the parameter at that end. ${escapeHtml(intervalCaution)}</p>`;
}
