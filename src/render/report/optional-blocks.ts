import { formatNumber, squaredLabel, traitUnitLabel } from '../units.js';
import { escapeHtml, exactValue } from './html.js';

type Json = unknown;

function isRecord(value: Json): value is Record<string, Json> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

function scalarText(value: Json): string {
  if (value === null || value === undefined) return '—';
  if (typeof value === 'number') return formatNumber(value);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'string') return value;
  if (Array.isArray(value) && value.every((entry) => entry === null || typeof entry !== 'object')) return value.map(scalarText).join(', ');
  return JSON.stringify(value);
}

function isScalar(value: Json): boolean {
  return value === null || typeof value !== 'object' || (Array.isArray(value) && value.every((entry) => entry === null || typeof entry !== 'object'));
}

function cell(value: Json, field: string): string {
  if (typeof value === 'number') return `<td class="number" data-field="${escapeHtml(field)}" data-value="${exactValue(value)}">${escapeHtml(scalarText(value))}</td>`;
  return `<td>${escapeHtml(scalarText(value))}</td>`;
}

/**
 * A table of a list of flat records: one column per scalar field, in order of first appearance.
 *
 * @example
 * recordsTable([{ a: 1, b: 'x' }], 't'); // '<table aria-label="t"><thead><tr><th>a</th><th>b</th></tr></thead><tbody>\n<tr><td class="number" data-field="a" data-value="1">1</td><td>x</td></tr>\n</tbody></table>'
 */
export function recordsTable(records: readonly Record<string, Json>[], label: string): string {
  const columns: string[] = [];
  for (const record of records) for (const [key, value] of Object.entries(record)) if (isScalar(value) && !columns.includes(key)) columns.push(key);
  const head = columns.map((column) => `<th>${escapeHtml(column.replace(/_/g, ' '))}</th>`).join('');
  const body = records.map((record) => `<tr>${columns.map((column) => cell(record[column], column)).join('')}</tr>`).join('\n');
  const nested = records.flatMap((record) => Object.entries(record).filter(([, value]) => !isScalar(value)));
  return `<table aria-label="${escapeHtml(label)}"><thead><tr>${head}</tr></thead><tbody>\n${body}\n</tbody></table>`
    + nested.map(([key, value]) => `<details><summary>${escapeHtml(key.replace(/_/g, ' '))}</summary>${jsonBlock(value, 1)}</details>`).join('');
}

/**
 * Any JSON value as readable HTML: scalars as a list of facts, lists of
 * records as tables, nested objects as sub-blocks. Used for results of
 * analyses whose exact layout the report does not know in advance, so a new
 * analysis shows up in the report as soon as its results are in the document.
 *
 * @example
 * jsonBlock({ n: 3, name: 'x' }); // '<dl class="facts"><dt>n</dt><dd data-field="n" data-value="3">3</dd><dt>name</dt><dd>x</dd></dl>'
 * jsonBlock([1, 2]); // '<p>1, 2</p>'
 */
export function jsonBlock(value: Json, depth = 0): string {
  if (isScalar(value)) return `<p>${escapeHtml(scalarText(value))}</p>`;
  if (Array.isArray(value)) {
    if (value.every(isRecord)) return recordsTable(value as Record<string, Json>[], 'results');
    return value.map((entry) => jsonBlock(entry, depth + 1)).join('');
  }
  const record = value as Record<string, Json>;
  const scalars = Object.entries(record).filter(([, entry]) => isScalar(entry));
  const nested = Object.entries(record).filter(([, entry]) => !isScalar(entry));
  const facts = scalars.length > 0
    ? `<dl class="facts">${scalars.map(([key, entry]) => `<dt>${escapeHtml(key.replace(/_/g, ' '))}</dt><dd${typeof entry === 'number' ? ` data-field="${escapeHtml(key)}" data-value="${exactValue(entry)}"` : ''}>${escapeHtml(scalarText(entry))}</dd>`).join('')}</dl>`
    : '';
  const heading = depth < 2 ? 'h4' : 'p';
  return facts + nested.map(([key, entry]) => `<${heading}><strong>${escapeHtml(key.replace(/_/g, ' '))}</strong></${heading}>${jsonBlock(entry, depth + 1)}`).join('');
}

function percent(value: unknown): string {
  return typeof value === 'number' ? `${formatNumber(value * 100, 3)}%` : '—';
}

/**
 * Adequacy checks of one lineage's best model, from the lineage document's
 * `adequacy` (`fit --adequacy`): one row per check with its statistic,
 * bootstrap p-value and verdict.
 *
 * @example
 * adequacyBlock({ model: 'stasis', checks: [] }).startsWith('<p>The best-supported model (<code>stasis</code>) was checked'); // true
 * adequacyBlock(null); // '<p>—</p>' (another layout: shown as plain JSON)
 */
export function adequacyBlock(adequacy: Json): string {
  if (!isRecord(adequacy) || !Array.isArray(adequacy.checks)) return jsonBlock(adequacy);
  const checks = (adequacy.checks as Json[]).filter(isRecord);
  const rows = checks.map((check) => `<tr data-check="${escapeHtml(String(check.name ?? ''))}"><td>${escapeHtml(String(check.label ?? check.name ?? ''))}</td>${cell(check.statistic, 'statistic')}${cell(check.p_value, 'p_value')}<td>${check.adequate === true ? 'adequate' : check.adequate === false ? '<strong>not adequate</strong>' : '—'}</td></tr>`);
  const verdict = adequacy.adequate === true ? 'passes every check' : adequacy.adequate === false ? '<strong>fails at least one check</strong>' : 'was checked';
  return `<p>The best-supported model (<code>${escapeHtml(String(adequacy.model ?? ''))}</code>) ${verdict} at level ${escapeHtml(scalarText(adequacy.level))} (${escapeHtml(scalarText(adequacy.draws))} simulated data sets, seed ${escapeHtml(scalarText(adequacy.seed))}${typeof adequacy.failed_draws === 'number' && adequacy.failed_draws > 0 ? `, ${adequacy.failed_draws} refits failed and were left out` : ''}).</p>
<table aria-label="adequacy"><thead><tr><th>check on the one-step prediction errors</th><th class="number">statistic</th><th class="number">bootstrap p</th><th>verdict</th></tr></thead><tbody>
${rows.join('\n')}
</tbody></table>
${typeof adequacy.note === 'string' && adequacy.note !== '' ? `<p class="note">${escapeHtml(adequacy.note)}</p>` : ''}
<div class="cautions"><ul><li>${escapeHtml('Passing these checks means the data give no clear sign against the model; with few horizons the checks have little power, so "adequate" is weak evidence that the model is right.')}</li></ul></div>`;
}

/** What a rates table needs to know of its lineage to name units. */
export interface RatesUnits {
  readonly time_unit: string;
  readonly trait_unit?: string | null;
  readonly transform: string;
}

function rateCell(value: Json, field: string, digits = 4): string {
  if (typeof value !== 'number') return '<td class="number">—</td>';
  return `<td class="number" data-field="${escapeHtml(field)}" data-value="${exactValue(value)}">${escapeHtml(formatNumber(value, digits))}</td>`;
}

/** Interval rates (whole sequence first) as one table with the unit of every column. */
function intervalRatesTable(rows: readonly Record<string, Json>[], timeUnit: string, label: string): string {
  const body = rows.map((row) => `<tr>${rateCell(row.from, 'from', 6)}${rateCell(row.to, 'to', 6)}${rateCell(row.interval, 'interval')}${rateCell(row.ln_change, 'ln_change')}${rateCell(row.darwins, 'darwins')}${rateCell(row.generations, 'generations')}${rateCell(row.haldanes, 'haldanes')}</tr>`);
  return `<table class="rates" aria-label="${escapeHtml(label)}"><thead><tr><th class="number">from horizon</th><th class="number">to horizon</th><th class="number">interval (${escapeHtml(timeUnit)})</th><th class="number">change in ln trait</th><th class="number">darwins (ln units per Myr)</th><th class="number">generations</th><th class="number">haldanes (sd per generation)</th></tr></thead><tbody>
${body.join('\n')}
</tbody></table>`;
}

/**
 * Rates of one lineage, from the lineage document's `rates` (`fit --rates`):
 * the whole sequence and the model-based rates as tables whose headers carry
 * their units (horizons numbered from 0, oldest first; intervals in the time
 * unit; darwins, haldanes; drift in trait per time unit, step variance in
 * trait² per time unit, Lynch's Delta per generation), the interval rates
 * folded away, and the caution about the time-scale dependence of rates.
 *
 * @example
 * ratesBlock(null); // '<p>—</p>' (another layout: shown as plain JSON)
 */
export function ratesBlock(rates: Json, lineage?: RatesUnits): string {
  if (!isRecord(rates)) return jsonBlock(rates);
  const timeUnit = typeof rates.time_unit === 'string' ? rates.time_unit : lineage?.time_unit ?? 'time unit';
  const logged = lineage?.transform === 'ln';
  const trait = traitUnitLabel(lineage?.trait_unit ?? null, logged, logged ? 'ln units' : 'trait units');
  const parts: string[] = [];
  const facts: string[] = [];
  if (typeof rates.ln_scale === 'string') facts.push(`ln trait: ${rates.ln_scale}`);
  if (typeof rates.generation_time_years === 'number') facts.push(`generation time ${formatNumber(rates.generation_time_years)} years`);
  else facts.push('no generation time given (no haldanes or per-generation rates)');
  if (typeof rates.pooled_within_variance === 'number') facts.push(`pooled within-horizon variance ${formatNumber(rates.pooled_within_variance)} ${squaredLabel(trait)}`);
  parts.push(`<p>${escapeHtml(facts.join('; '))}.</p>`);
  if (isRecord(rates.whole_sequence)) parts.push(`<p><strong>Whole sequence</strong></p>${intervalRatesTable([rates.whole_sequence], timeUnit, 'whole-sequence rate')}`);
  if (Array.isArray(rates.model_based) && rates.model_based.length > 0) {
    const rows = (rates.model_based as Json[]).filter(isRecord).map((row) => {
      const drift = row.kind === 'drift';
      const unit = drift ? `${trait} per ${timeUnit}` : `${squaredLabel(trait)} per ${timeUnit}`;
      const perMyr = drift ? 'darwins' : '(ln units)² per Myr';
      const perGeneration = drift ? 'haldanes' : 'Delta (sd² per generation)';
      return `<tr data-model="${escapeHtml(String(row.model))}"><td>${escapeHtml(String(row.model))}</td><td><code>${escapeHtml(String(row.parameter))}</code></td>${rateCell(row.estimate, 'estimate')}<td>${escapeHtml(unit)}</td>${rateCell(row.per_million_years, 'per_million_years')}<td>${typeof row.per_million_years === 'number' ? escapeHtml(perMyr) : ''}</td>${rateCell(row.per_generation, 'per_generation')}<td>${typeof row.per_generation === 'number' ? escapeHtml(perGeneration) : ''}</td><td>${escapeHtml(row.neutral_range === null || row.neutral_range === undefined ? '' : `${row.neutral_range} the neutral range`)}</td></tr>`;
    });
    parts.push(`<p><strong>From the fitted models</strong></p><table class="rates" aria-label="model-based rates"><thead><tr><th>model</th><th>parameter</th><th class="number">estimate</th><th>unit</th><th class="number">per Myr</th><th>unit</th><th class="number">per generation</th><th>unit</th><th>against neutral drift</th></tr></thead><tbody>
${rows.join('\n')}
</tbody></table>`);
  }
  if (Array.isArray(rates.intervals) && rates.intervals.length > 0) parts.push(`<details><summary>Between consecutive horizons (${rates.intervals.length} intervals)</summary>${intervalRatesTable((rates.intervals as Json[]).filter(isRecord), timeUnit, 'interval rates')}</details>`);
  if (Array.isArray(rates.notes) && rates.notes.length > 0) parts.push(`<ul class="note">${(rates.notes as Json[]).map((note) => `<li>${escapeHtml(scalarText(note))}</li>`).join('')}</ul>`);
  if (typeof rates.caution === 'string') parts.push(`<div class="cautions"><ul><li>${escapeHtml(rates.caution)}</li></ul></div>`);
  return parts.join('\n');
}

/** Lineage documents (composites, per-section fits) inside another analysis's result, shown by a caller-given renderer. */
export type LineageRenderer = (lineage: Record<string, unknown>) => string;

/**
 * The comparison of sections as `compare --json` writes it: per trait the
 * sections, the hypotheses × models ranked by AICc (N = all horizons) with
 * Akaike weights, the likelihood-ratio tests of shared against separate,
 * and the comparison's own caution. Other layouts fall back to
 * {@link jsonBlock}.
 *
 * @example
 * comparisonDocumentBlock(null); // '<p>—</p>' (another layout: shown as plain JSON)
 */
export function comparisonDocumentBlock(comparison: Json, renderLineage?: LineageRenderer): string {
  if (!isRecord(comparison) || !Array.isArray(comparison.traits)) return jsonBlock(comparison);
  const parts: string[] = [];
  // compare --trait-unit: ", trait in mm" ("ln mm" when the comparison was run with --log); nothing without a unit.
  const options = isRecord(comparison.provenance) && isRecord(comparison.provenance.options) ? comparison.provenance.options : {};
  const traitWords = (entry: Record<string, Json>): string =>
    typeof entry.trait_unit === 'string' && entry.trait_unit !== '' ? `, trait in ${traitUnitLabel(entry.trait_unit, options.log === true, '')}` : '';
  for (const entry of (comparison.traits as Json[]).filter(isRecord)) {
    const hypotheses = Array.isArray(entry.hypotheses) ? (entry.hypotheses as Json[]).filter(isRecord) : [];
    const best = isRecord(entry.best) ? entry.best : null;
    const sections = Array.isArray(entry.sections) ? (entry.sections as Json[]).filter(isRecord) : [];
    parts.push(`<h3>${escapeHtml(String(entry.trait || 'trait'))}</h3>`);
    parts.push(`<p>${escapeHtml(`${sections.length} sections (${sections.map((section) => `${section.section}: ${section.horizons} horizons${typeof section.first_age === 'number' ? ` from age ${formatNumber(section.first_age)}` : ''}`).join('; ')}), ${scalarText(entry.horizons)} horizons in all, time in ${scalarText(entry.time_unit)}${traitWords(entry)}.`)}</p>`);
    // compare.json's best_tied: more than one entry means the best is the same fit as others (equal K and logL) and cannot be told apart.
    const tied = Array.isArray(entry.best_tied) ? (entry.best_tied as Json[]).filter(isRecord) : [];
    const inTiedBest = (hypothesis: Record<string, Json>): boolean => tied.length > 1 && tied.some((item) => item.id === hypothesis.id && item.model === hypothesis.model);
    const rows = hypotheses.map((hypothesis) => {
      const isBest = best !== null && best.id === hypothesis.id && best.model === hypothesis.model;
      const sameFit = Array.isArray(hypothesis.same_fit_as) ? (hypothesis.same_fit_as as Json[]).map(String) : [];
      const status = inTiedBest(hypothesis)
        ? '<strong>best supported, tied (same fit)</strong>'
        : isBest ? '<strong>best supported</strong>'
          : hypothesis.compared === false ? escapeHtml(String(hypothesis.message ?? 'not compared'))
            : sameFit.length > 0 ? escapeHtml(`same fit as ${sameFit.join(', ')}`) : '';
      return `<tr data-hypothesis="${escapeHtml(String(hypothesis.id))}" data-model="${escapeHtml(String(hypothesis.model))}" class="${isBest ? 'best' : hypothesis.compared === false ? 'not-compared' : ''}">`
        + `<td>${escapeHtml(String(hypothesis.description ?? hypothesis.id))}</td><td>${escapeHtml(String(hypothesis.label ?? hypothesis.model))}</td>`
        + cell(hypothesis.k, 'k')
        + `<td class="number" data-field="logLik" data-value="${exactValue(hypothesis.logLik as number | null)}">${escapeHtml(typeof hypothesis.logLik === 'number' ? hypothesis.logLik.toFixed(3) : '—')}</td>`
        + `<td class="number" data-field="aicc" data-value="${exactValue(hypothesis.aicc as number | null)}">${escapeHtml(typeof hypothesis.aicc === 'number' ? hypothesis.aicc.toFixed(3) : '—')}</td>`
        + `<td class="number" data-field="delta_aicc" data-value="${exactValue(hypothesis.delta_aicc as number | null)}">${escapeHtml(typeof hypothesis.delta_aicc === 'number' ? hypothesis.delta_aicc.toFixed(3) : '—')}</td>`
        + `<td class="number" data-field="weight" data-value="${exactValue(hypothesis.weight as number | null)}">${escapeHtml(typeof hypothesis.weight === 'number' ? hypothesis.weight.toFixed(3) : '—')}</td>`
        + `<td>${status}</td></tr>`;
    });
    parts.push(`<table class="comparison" aria-label="section comparison"><thead><tr><th>hypothesis</th><th>model</th><th class="number">K</th><th class="number">logL</th><th class="number">AICc</th><th class="number">ΔAICc</th><th class="number">Akaike weight</th><th></th></tr></thead><tbody>\n${rows.join('\n')}\n</tbody></table>`);
    const tiedRows = hypotheses.filter(inTiedBest);
    if (tiedRows.length > 1) {
      const combined = tiedRows.reduce((sum, hypothesis) => sum + (typeof hypothesis.weight === 'number' ? hypothesis.weight : 0), 0);
      const names = tiedRows.map((hypothesis) => `${hypothesis.description ?? hypothesis.id}, ${hypothesis.label ?? hypothesis.model}`);
      const logL = typeof tiedRows[0].logLik === 'number' ? tiedRows[0].logLik.toFixed(3) : '—';
      parts.push(`<div class="conclusion"><p><strong>Best supported: cannot be told apart here.</strong> ${escapeHtml(`${names.join('; ')} are the same fit at their estimates (K = ${scalarText(tiedRows[0].k)}, logL ${logL} in each), so the data do not favour one over the other; together they carry Akaike weight ${combined.toFixed(3)}.`)}</p></div>`);
    } else if (best) {
      const winner = hypotheses.find((hypothesis) => hypothesis.id === best.id && hypothesis.model === best.model);
      if (winner) parts.push(`<div class="conclusion"><p><strong>Best supported:</strong> ${escapeHtml(String(winner.description ?? winner.id))}, ${escapeHtml(String(winner.label ?? winner.model))} (Akaike weight ${typeof winner.weight === 'number' ? winner.weight.toFixed(3) : '—'}).</p></div>`);
    }
    // Hypotheses never ranked (e.g. a shared shift, which is not defined here), with compare's reason.
    const leftOut = Array.isArray(entry.left_out) ? (entry.left_out as Json[]).filter(isRecord) : [];
    if (leftOut.length > 0) {
      parts.push(`<p><strong>Left out, never ranked</strong></p><ul class="note">${leftOut.map((item) => `<li>${escapeHtml(`${item.id === 'every' ? 'every hypothesis' : String(item.id)} of ${String(item.model)}: ${String(item.reason)}`)}</li>`).join('')}</ul>`);
    }
    if (Array.isArray(entry.tests) && entry.tests.length > 0) {
      const tests = (entry.tests as Json[]).filter(isRecord);
      parts.push(`<p><strong>Likelihood-ratio tests of a shared against a separate process</strong> (χ² reference distribution)</p>
<table aria-label="likelihood-ratio tests"><thead><tr><th>model</th><th>restricted</th><th>full</th><th class="number">statistic</th><th class="number">df</th><th class="number">p-value</th></tr></thead><tbody>
${tests.map((test) => `<tr><td>${escapeHtml(String(test.model))}</td><td>${escapeHtml(String(test.restricted))}</td><td>${escapeHtml(String(test.full))}</td>${cell(test.statistic, 'statistic')}${cell(test.df, 'df')}${cell(test.p_value, 'p_value')}</tr>`).join('\n')}
</tbody></table>`);
    }
    if (entry.age_uncertainty !== null && entry.age_uncertainty !== undefined) parts.push(`<p><strong>Dating uncertainty</strong></p>${jsonBlock(entry.age_uncertainty)}`);
  }
  if (Array.isArray(comparison.skipped) && comparison.skipped.length > 0) parts.push(`<p><strong>Not compared</strong></p>${jsonBlock(comparison.skipped)}`);
  if (Array.isArray(comparison.composite) && comparison.composite.length > 0 && renderLineage) {
    parts.push(`<h3>Composite lineages (sections merged on one timeline)</h3>${(comparison.composite as Json[]).filter(isRecord).map(renderLineage).join('\n')}`);
  }
  if (isRecord(comparison.age_model)) parts.push(`<details><summary>Age model</summary>${jsonBlock(comparison.age_model)}</details>`);
  if (typeof comparison.caution === 'string') parts.push(`<div class="cautions"><ul><li>${escapeHtml(comparison.caution.replace(/^Caution:\s*(.)/, (_, first: string) => first.toUpperCase()))}</li></ul></div>`);
  return parts.join('\n');
}

/**
 * One power analysis as `power --json` writes it: the design and the
 * simulated generator, the power grid, the false-trend rate, the smallest
 * drift reaching the target power, interval coverage on the design, notes
 * and the analysis's own caution.
 *
 * @example
 * const grid = [{ drift: 0, drift_sd: 0, p_best: 0.1, p_weight: 0.05, p_lrt: 0.05 }];
 * powerDocumentBlock({ grid, input: { lineage: 'A / length' }, settings: { replicates: 99 } }).split('\n')[0]; // '<h3>A / length</h3>'
 */
export function powerDocumentBlock(power: Json): string {
  if (!isRecord(power) || !Array.isArray(power.grid)) return jsonBlock(power);
  const input = isRecord(power.input) ? power.input : {};
  const settings = isRecord(power.settings) ? power.settings : {};
  const generator = isRecord(power.generator) ? power.generator : {};
  const parts: string[] = [];
  // input.trait_unit (power --trait-unit): drifts in "mm per Myr"; without it the words are as before ("per Myr").
  const traitUnit = typeof input.trait_unit === 'string' && input.trait_unit !== '' ? traitUnitLabel(input.trait_unit, input.transform === 'ln', '') : null;
  const perTime = `${traitUnit ? `${traitUnit} ` : ''}per ${scalarText(settings.time_unit)}`;
  const stepUnit = traitUnit ? ` ${squaredLabel(traitUnit)} per ${scalarText(settings.time_unit)}` : '';
  parts.push(`<h3>${escapeHtml(String(input.lineage ?? 'lineage'))}</h3>`);
  parts.push(`<p>${escapeHtml(`${scalarText(settings.replicates)} simulated directional walks per drift value on this lineage's own design (${scalarText(settings.horizons)} horizons over ${scalarText(settings.span)} ${scalarText(settings.time_unit)}; its times, sample sizes and within-horizon variances), step variance ${scalarText(generator.step_variance)}${stepUnit} (${scalarText(generator.step_variance_source)}), seed ${scalarText(settings.seed)}. Fitted drift ${scalarText(generator.fitted_drift)} ± ${scalarText(generator.drift_standard_error)} (standard error) ${perTime}.`)}</p>`);
  const rows = (power.grid as Json[]).filter(isRecord).map((row) => `<tr>${cell(row.drift, 'drift')}${cell(row.drift_sd, 'drift_sd')}<td class="number" data-field="p_best" data-value="${exactValue(row.p_best as number)}">${percent(row.p_best)}</td><td class="number" data-field="p_weight" data-value="${exactValue(row.p_weight as number)}">${percent(row.p_weight)}</td><td class="number" data-field="p_lrt" data-value="${exactValue(row.p_lrt as number)}">${percent(row.p_lrt)}</td></tr>`);
  parts.push(`<table class="power" aria-label="power"><thead><tr><th class="number">${escapeHtml(traitUnit ? `drift (${perTime})` : `drift ${perTime}`)}</th><th class="number">in within-horizon sd</th><th class="number">directional walk best</th><th class="number">its weight &gt; ${escapeHtml(scalarText(settings.weight_threshold))}</th><th class="number">bootstrap LRT rejects the random walk</th></tr></thead><tbody>\n${rows.join('\n')}\n</tbody></table>`);
  if (isRecord(power.false_trend)) parts.push(`<p><strong>False-trend rate</strong> (drift 0): directional walk best in ${percent(power.false_trend.p_best)}, weight above threshold in ${percent(power.false_trend.p_weight)}, bootstrap test rejecting in ${percent(power.false_trend.p_lrt)} of replicates.</p>`);
  if (isRecord(power.smallest_drift)) parts.push(`<p><strong>Smallest drift reaching ${percent(power.smallest_drift.power)} power</strong>: ${escapeHtml(`${scalarText(power.smallest_drift.p_best)} (directional walk best), ${scalarText(power.smallest_drift.p_weight)} (weight rule), ${scalarText(power.smallest_drift.p_lrt)} (bootstrap test)`)} ${escapeHtml(perTime)}.</p>`);
  if (power.horizons_needed !== null && power.horizons_needed !== undefined) parts.push(`<p><strong>Horizons needed</strong></p>${jsonBlock(power.horizons_needed)}`);
  if (power.coverage !== null && power.coverage !== undefined) parts.push(`<details><summary>Coverage of the 95% intervals on this design</summary>${jsonBlock(power.coverage)}</details>`);
  if (isRecord(power.lrt)) parts.push(`<details><summary>Bootstrap likelihood-ratio test</summary>${jsonBlock(power.lrt)}</details>`);
  if (Array.isArray(power.notes) && power.notes.length > 0) parts.push(`<ul class="note">${(power.notes as Json[]).map((note) => `<li>${escapeHtml(scalarText(note))}</li>`).join('')}</ul>`);
  if (typeof power.caution === 'string') parts.push(`<div class="cautions"><ul><li>${escapeHtml(power.caution)}</li></ul></div>`);
  return parts.join('\n');
}

/**
 * The age model as fit.json holds it (`age_model`): per section its ties
 * (position, age, age_sd, input line) and the sedimentation rate of each
 * stretch between consecutive ties, in m per time unit. Another layout falls
 * back to {@link jsonBlock}.
 *
 * @example
 * const ties = [{ height: 0, age: 10, age_sd: 0, line: 2 }, { height: 50, age: 8, age_sd: 0, line: 3 }];
 * const html = ageModelBlock({ file: 'ties.csv', position_kind: 'height', sections: [{ section: 'A', ties, sedimentation_rates: [{ rate: 25 }] }] }, 'Myr');
 * html.includes('<td class="number" data-field="rate" data-value="25">25</td>'); // true
 * html.includes('age (Ma)'); // true
 */
export function ageModelBlock(ageModel: Json, timeUnit: string): string {
  if (!isRecord(ageModel) || !Array.isArray(ageModel.sections)) return jsonBlock(ageModel);
  const kind = ageModel.position_kind === 'depth' ? 'depth' : 'height';
  const ageUnit = timeUnit === 'Myr' ? 'Ma' : timeUnit === 'kyr' ? 'ka' : timeUnit;
  const rows: string[] = [];
  for (const section of (ageModel.sections as Json[]).filter(isRecord)) {
    const ties = Array.isArray(section.ties) ? (section.ties as Json[]).filter(isRecord) : [];
    const rates = Array.isArray(section.sedimentation_rates) ? (section.sedimentation_rates as Json[]).filter(isRecord) : [];
    ties.forEach((tie, k) => {
      // Ties are stored by height (depth d as -d); shown as the file gives them.
      const position = typeof tie.height === 'number' ? (kind === 'depth' ? -tie.height : tie.height) : null;
      const rate = k < rates.length ? rates[k].rate : null;
      rows.push(`<tr>${k === 0 ? `<td rowspan="${ties.length}">${escapeHtml(String(section.section || 'every section'))}</td>` : ''}${cell(position, kind)}${cell(tie.age, 'age')}${cell(tie.age_sd, 'age_sd')}${cell(tie.line, 'line')}${k < ties.length - 1 ? cell(rate, 'rate') : '<td></td>'}</tr>`);
    });
  }
  return `<p>${escapeHtml(`Ties of ${scalarText(ageModel.file)}; ages between ties by linear interpolation (a constant sedimentation rate between consecutive ties).`)}</p>
<table class="age-model" aria-label="age model"><thead><tr><th>section</th><th class="number">${kind} (m)</th><th class="number">age (${escapeHtml(ageUnit)})</th><th class="number">age sd</th><th class="number">line</th><th class="number">rate to the next tie (m per ${escapeHtml(timeUnit)})</th></tr></thead><tbody>
${rows.join('\n')}
</tbody></table>`;
}
