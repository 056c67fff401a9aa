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
  const spec = findModel(modelId)?.parameters.find((parameter) => parameter.name === name);
  const logged = lineage.transform === 'ln';
  // Without a trait unit: "ln units" / "trait units", as before --trait-unit existed.
  const traitLabel = traitUnitLabel(lineage.trait_unit, logged, logged ? 'ln units' : 'trait units');
  if (!spec) return name === 'half_life' ? lineage.time_unit : '';
  return unitLabel(spec.unit, lineage.time_unit, traitLabel);
}

function extraText(model: ModelView): string {
  const known = new Set(['id', 'label', 'k', 'logLik', 'aicc', 'delta_aicc', 'weight', 'converged', 'compared', 'not_compared_reason', 'interval_method', 'params', 'derived', 'flags']);
  const extras = Object.entries(model).filter(([key]) => !known.has(key));
  return extras.map(([key, value]) => `${key}: ${typeof value === 'string' ? value : JSON.stringify(value)}`).join('; ');
}

/** The estimates of every fitted model with their 95% intervals, units and bound flags. */
export function estimatesTable(lineage: LineageView): string {
  const rows: string[] = [];
  for (const model of lineage.models) {
    if (!model.converged) {
      rows.push(`<tr data-model="${escapeHtml(model.id)}"><td>${escapeHtml(model.label)}</td><td colspan="5">${escapeHtml(model.not_compared_reason ?? 'not fitted')}</td></tr>`);
      continue;
    }
    const entries = [...Object.entries(model.params), ...Object.entries(model.derived)];
    entries.forEach(([name, estimate], index) => {
      rows.push(`<tr data-model="${escapeHtml(model.id)}" data-parameter="${escapeHtml(name)}">`
        + (index === 0 ? `<td rowspan="${entries.length}">${escapeHtml(model.label)}</td>` : '')
        + `<td><code>${escapeHtml(name)}</code></td>`
        + numberCell('estimate', estimate.estimate, formatNumber(estimate.estimate))
        + `<td class="number">${escapeHtml(intervalText(estimate))}</td>`
        + `<td>${escapeHtml(unitOf(model.id, name, lineage))}</td>`
        + `<td>${escapeHtml(boundText(estimate))}</td></tr>`);
    });
    const extra = extraText(model);
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
