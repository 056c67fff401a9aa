import { escapeHtml } from './html.js';

/** The part of a joint.json document the report reads. */
interface JointDocumentView {
  readonly groups?: readonly {
    readonly section?: string;
    readonly traits?: readonly string[];
    readonly horizons?: number;
    readonly observations?: number;
    readonly sampling_covariance?: string;
    readonly best_model?: string | null;
    readonly models?: readonly {
      readonly id?: string;
      readonly k?: number;
      readonly logLik?: number | null;
      readonly aicc?: number | null;
      readonly delta_aicc?: number | null;
      readonly weight?: number | null;
      readonly params?: { readonly step_correlation?: readonly (readonly (number | null)[])[] | null } | null;
      readonly intervals?: { readonly step_correlation?: readonly (readonly ([number | null, number | null] | null)[])[] | null; readonly coverage_note?: string | null } | null;
      readonly flags?: readonly string[];
    }[];
  }[];
}

const shown = (value: number | null | undefined, digits = 4): string => (typeof value === 'number' && Number.isFinite(value) ? String(Number(value.toPrecision(digits))) : '—');

/**
 * The "Traits together" block of the report (`report --joint`): per
 * section with two or more traits, the joint models' table (K, logL, AICc,
 * ΔAICc, Akaike weight), the best model and, when it is a correlated model
 * with step correlations, each correlation in words with its 95% interval.
 * `figures` is the HTML of the group's figures, placed after its table.
 *
 * @example
 * jointBlock({ groups: [] }, () => '').startsWith('<p class="methods" data-block="joint-methods">Traits measured in the same section'); // true
 */
export function jointBlock(document: unknown, figures: (group: number) => string): string {
  const view = document as JointDocumentView;
  const intervals = (view as { provenance?: { options?: { intervals?: string } } }).provenance?.options?.intervals === 'profile';
  const methods = `<p class="methods" data-block="joint-methods">Traits measured in the same section were also fitted together: independent and correlated multivariate random walks, directional walks, stasis and Ornstein–Uhlenbeck models (Voje 2023, Paleobiology 49:747–764), by maximum likelihood with the exact likelihood of a vector Kalman filter over the trait means with their sampling covariances (missing trait values left out, none imputed); locations were estimated by generalised least squares and covariance matrices through a Cholesky factor with a log diagonal. Models were compared by AICc (Hurvich & Tsai 1989) with N the number of observed trait values, and Akaike weights (Burnham & Anderson 2002)${intervals ? '; 95% intervals are profile-likelihood intervals, evolutionary correlations R_jl / √(R_jj R_ll) included' : ''}.</p>`;
  return methods + '\n' + (view.groups ?? []).map((group, index) => {
    const traits = group.traits ?? [];
    const rows = (group.models ?? []).map((model) => `<tr${model.id === group.best_model ? ' class="best"' : ''}><td><code>${escapeHtml(model.id)}</code></td><td>${escapeHtml(model.k)}</td><td>${shown(model.logLik, 6)}</td><td>${shown(model.aicc, 6)}</td><td>${shown(model.delta_aicc, 3)}</td><td>${typeof model.weight === 'number' ? model.weight.toFixed(3) : '—'}</td></tr>`).join('');
    const best = (group.models ?? []).find((model) => model.id === group.best_model);
    const words: string[] = [];
    const correlation = best?.params?.step_correlation;
    if (best && correlation && best.id?.startsWith('correlated')) {
      for (let j = 0; j < traits.length; j++) {
        for (let l = j + 1; l < traits.length; l++) {
          const value = correlation[j]?.[l];
          if (typeof value !== 'number') continue;
          const interval = best.intervals?.step_correlation?.[j]?.[l];
          words.push(`Steps of ${traits[j]} and ${traits[l]} are ${Math.abs(value) < 0.1 ? 'nearly uncorrelated' : value > 0 ? 'correlated' : 'negatively correlated'}: ${shown(value, 2)}${interval ? ` [${shown(interval[0], 2)}, ${shown(interval[1], 2)}]` : ''}.`);
        }
      }
    }
    const sampling = group.sampling_covariance === 'estimated'
      ? 'The sampling covariance between traits within a horizon was estimated from specimens measured for several traits.'
      : 'Summary rows give no covariance between traits within a horizon; it was taken as 0 (diagonal), which can make correlated sampling error look like correlated evolution.';
    return `<h3>${escapeHtml(group.section || 'Traits')}: ${escapeHtml(traits.join(', '))}</h3>
<p>${escapeHtml(group.horizons)} horizons, ${escapeHtml(group.observations)} observed trait values (N of AICc). ${escapeHtml(sampling)}</p>
<table class="support"><thead><tr><th>model</th><th>K</th><th>logL</th><th>AICc</th><th>ΔAICc</th><th>weight</th></tr></thead><tbody>${rows}</tbody></table>
<p>${best ? `Best supported: <code>${escapeHtml(best.id)}</code>. ${words.map(escapeHtml).join(' ')}` : 'No model could be compared.'}</p>
${(best?.flags ?? []).map((flag) => `<p class="note">${escapeHtml(flag)}</p>`).join('\n')}
${best?.intervals?.coverage_note ? `<p class="note" data-note="interval-coverage">Measured coverage: ${escapeHtml(best.intervals.coverage_note)}.</p>` : ''}
${figures(index)}`;
  }).join('\n');
}
