import { findModel } from '../../models/registry.js';
import { formatNumber, traitUnitLabel } from '../units.js';
import { formatPValue, trendCaution } from '../trend-text.js';
import { boundCaution, closeSupportCaution, directionalCaution, stasisCaution } from './cautions.js';
import { summariseData, type DataSummary } from './data-summary.js';
import { lineageTitle, type FitDocumentView, type LineageView } from './document-view.js';
import { escapeHtml, exactValue, slug } from './html.js';
import { adequacyBlock, jsonBlock, ratesBlock } from './optional-blocks.js';
import { estimatesTable, supportTable } from './support-table.js';
import { listWords } from '../words.js';

/** One figure ready for the page: already-rendered bytes of an image. */
export interface ReportFigure {
  /** Index of the lineage in the document the figure belongs to, or null for a figure of several lineages. */
  readonly lineage: number | null;
  /** Figure kind, e.g. "trajectory" or "support". */
  readonly kind: string;
  readonly caption: string;
  /** "image/svg+xml" or "image/png". */
  readonly mime: string;
  readonly bytes: Uint8Array;
  readonly width: number;
  readonly height: number;
  /** Block of the page the figure belongs to when it is not a lineage's ("power", "comparison"); default the lineage or the sections block. */
  readonly place?: string;
}

/**
 * A figure for the page from a drawn figure (its mime type, bytes and size)
 * and what the page says about it.
 *
 * @example
 * reportFigure({ lineage: 0, kind: 'trajectory', caption: 'Means.' }, { mime: 'image/png', bytes: new Uint8Array(0), width: 10, height: 5 }).width; // 10
 */
export function reportFigure(about: Omit<ReportFigure, 'mime' | 'bytes' | 'width' | 'height'>, drawn: Pick<ReportFigure, 'mime' | 'bytes' | 'width' | 'height'>): ReportFigure {
  return { ...about, mime: drawn.mime, bytes: drawn.bytes, width: drawn.width, height: drawn.height };
}

/** Lineage-document keys the report shows in its own blocks; anything else appears under "further results". */
const shownKeys = new Set(['section', 'trait', 'horizons', 'time_unit', 'position_kind', 'transform', 'sampling_variance', 'best_model', 'models', 'data', 'smoothed', 'trait_unit', 'adequacy', 'rates', 'models_left_out', 'extrapolated_horizons', 'first_age', 'trend_test']);

/**
 * An image element holding the figure's bytes as a data URL (no file or network access when opened).
 *
 * @example
 * const figure = reportFigure({ lineage: 0, kind: 'trajectory', caption: 'Means.' }, { mime: 'image/png', bytes: Uint8Array.of(1, 2, 3), width: 10, height: 5 });
 * figureHtml(figure); // '<figure data-kind="trajectory"><img src="data:image/png;base64,AQID" width="10" height="5" style="width:min(100%, 40rem)" alt="Means."><figcaption>Means.</figcaption></figure>'
 */
export function figureHtml(figure: ReportFigure): string {
  const source = `data:${figure.mime};base64,${Buffer.from(figure.bytes).toString('base64')}`;
  // Shown at most 40rem wide: a print-resolution PNG is far wider than the screen.
  return `<figure data-kind="${escapeHtml(figure.kind)}"><img src="${source}" width="${figure.width}" height="${figure.height}" style="width:min(100%, 40rem)" alt="${escapeHtml(figure.caption)}"><figcaption>${escapeHtml(figure.caption)}</figcaption></figure>`;
}

/** The unit of an age as read: Ma for Myr, ka for kyr, else "<unit> before present". */
function ageUnit(timeUnit: string): string {
  return timeUnit === 'Myr' ? 'Ma' : timeUnit === 'kyr' ? 'ka' : `${timeUnit} before present`;
}

/**
 * The positions of the oldest and youngest horizons in words, each in its
 * own unit: ages in Ma (ka, …), heights and depths in metres with the ages the
 * age model gave them beside them, elapsed times in the time unit.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * positionWords(document.lineages[0], summariseData(document.lineages[0])); // 'time 0 to 2 Myr'
 */
export function positionWords(lineage: LineageView, summary: DataSummary): string {
  const first = summary.firstPosition;
  const last = summary.lastPosition;
  if (first === null || last === null) return '';
  const unit = lineage.time_unit;
  if (lineage.position_kind === 'height' || lineage.position_kind === 'depth') {
    const ages = lineage.data.age;
    const firstAge = ages?.[0] ?? null;
    const lastAge = ages?.[ages.length - 1] ?? null;
    const agePart = firstAge !== null && lastAge !== null ? `; age ${formatNumber(firstAge)} to ${formatNumber(lastAge)} ${ageUnit(unit)}` : '';
    return `${lineage.position_kind} ${formatNumber(first)} to ${formatNumber(last)} m${agePart}`;
  }
  if (lineage.position_kind === 'age') return `age ${formatNumber(first)} to ${formatNumber(last)} ${ageUnit(unit)}`;
  return `${lineage.position_kind} ${formatNumber(first)} to ${formatNumber(last)} ${unit}`;
}

/**
 * One row per horizon, oldest first: position as read, age (heights and
 * depths: from the age model), n, mean, sd (root of the within-horizon
 * variance), and whether the age was extrapolated beyond the ties.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * horizonTable(document.lineages[0]).startsWith('<details class="horizons"><summary>Horizons (3, oldest first)</summary>'); // true
 */
export function horizonTable(lineage: LineageView): string {
  const { data } = lineage;
  const placed = lineage.position_kind === 'height' || lineage.position_kind === 'depth';
  const positionHead = placed ? `${lineage.position_kind} (m)` : lineage.position_kind === 'age' ? `age (${ageUnit(lineage.time_unit)})` : `${lineage.position_kind} (${lineage.time_unit})`;
  const showAge = placed && Array.isArray(data.age);
  const anyExtrapolated = data.extrapolated.some(Boolean);
  const number = (field: string, value: number | null | undefined, digits = 4): string =>
    `<td class="number" data-field="${field}" data-value="${exactValue(value ?? null)}">${escapeHtml(value === null || value === undefined ? '—' : formatNumber(value, digits))}</td>`;
  const rows = data.mean.map((mean, i) => {
    const within = data.within_variance[i];
    const sd = within === null ? null : Math.sqrt(within);
    return `<tr data-horizon="${i}"><td class="number">${i + 1}</td>${number('position', data.position[i])}${showAge ? number('age', data.age?.[i]) : ''}${number('n', data.n[i])}${number('mean', mean, 5)}${number('sd', sd)}${anyExtrapolated ? `<td>${data.extrapolated[i] ? 'extrapolated' : ''}</td>` : ''}</tr>`;
  });
  return `<details class="horizons"><summary>Horizons (${data.mean.length}, oldest first)</summary><table class="horizons" aria-label="horizons"><thead><tr><th class="number">#</th><th class="number">${escapeHtml(positionHead)}</th>${showAge ? `<th class="number">age (${escapeHtml(ageUnit(lineage.time_unit))})</th>` : ''}<th class="number">n</th><th class="number">mean</th><th class="number">sd</th>${anyExtrapolated ? '<th>age</th>' : ''}</tr></thead><tbody>
${rows.join('\n')}
</tbody></table></details>`;
}

/**
 * A few plain sentences on one lineage for a reader who is not a
 * statistician: which description the data favour and how clearly, what the
 * best model says in words, and how large sampling error is. Written from the
 * document only; it interprets nothing beyond the numbers (the cautions say
 * what support does not show).
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * plainSummary(document.lineages[0], summariseData(document.lineages[0])); // 'Of the models fitted, the data clearly favour strict stasis (Akaike weight 1.00): in plain words, the trait mean did not change at all: the horizon means differ by sampling error alone.'
 */
export function plainSummary(lineage: LineageView, summary: DataSummary): string {
  const best = lineage.models.find((model) => model.id === lineage.best_model);
  if (!best || best.weight === null) return 'No model could be compared for this lineage, so the data say nothing here about how the trait changed.';
  // Each model says it in words (`EvolutionModel.plainWords`).
  const pattern = findModel(best.id)?.plainWords ?? `the data follow ${best.label}`;
  const strength = best.weight >= 0.9 ? 'clearly' : best.weight >= 0.7 ? 'moderately' : 'only weakly';
  const sentences = [`Of the models fitted, the data ${strength} favour ${best.label} (Akaike weight ${best.weight.toFixed(2)}): in plain words, ${pattern}.`];
  const close = lineage.models.filter((model) => model.id !== best.id && model.compared && model.delta_aicc !== null && model.delta_aicc < 2);
  if (close.length > 0) sentences.push(`${listWords(close.map((model) => model.label))} ${close.length === 1 ? 'fits' : 'fit'} almost as well, so the data do not decide between them.`);
  if (summary.samplingShare !== null && summary.samplingShare >= 0.5) sentences.push('Sampling error is large against the differences between horizons, so smaller changes would not be visible in these data.');
  if (summary.extrapolatedHorizons > 0) sentences.push(`${summary.extrapolatedHorizons} horizon ages rest on extrapolation beyond the age model.`);
  return sentences.join(' ');
}

function fact(term: string, value: string, field?: string, exact?: number | null): string {
  const data = field ? ` data-field="${field}" data-value="${exactValue(exact)}"` : '';
  return `<dt>${escapeHtml(term)}</dt><dd${data}>${escapeHtml(value)}</dd>`;
}

function samplingWords(summary: DataSummary): string {
  if (summary.samplingShare === null) return 'the horizon means do not vary.';
  const share = summary.samplingShare;
  const judgement = share >= 1
    ? 'sampling error alone could produce all of the spread among the horizon means, so little of the observed change is resolved'
    : share >= 0.5
      ? 'sampling error is a large part of the spread among the horizon means; small differences between horizons are not resolved'
      : share >= 0.1
        ? 'sampling error is a modest part of the spread among the horizon means'
        : 'sampling error is small against the spread among the horizon means';
  return `Average sampling variance is ${formatNumber(share * 100, 3)}% of the variance among horizon means: ${judgement}.`;
}

/**
 * Per-lineage warnings: estimates at bounds, models not compared, extrapolated ages, exact horizons.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * lineageWarnings(document.lineages[0], summariseData(document.lineages[0]), document); // ['unbiased random walk: not compared: N - K - 1 = 0 <= 0 (too few horizons for K = 2)']
 */
export function lineageWarnings(lineage: LineageView, summary: DataSummary, document: FitDocumentView): string[] {
  const warnings: string[] = [];
  for (const model of lineage.models) {
    for (const flag of model.flags) warnings.push(`${model.label}: ${flag}`);
    if (!model.compared) warnings.push(`${model.label}: ${model.not_compared_reason ?? 'not compared'}`);
  }
  if (summary.extrapolatedHorizons > 0) {
    warnings.push(`${summary.extrapolatedHorizons} of ${summary.horizons} horizons have ages extrapolated beyond the age model's tie points; their spacing, and so every rate, rests on an assumed constant sedimentation rate.`);
  }
  if (summary.exactHorizons > 0) warnings.push(`${summary.exactHorizons} horizons have zero sampling variance: their means are treated as exact.`);
  // Warnings of the run that name this lineage and are not already listed above.
  const name = lineageTitle(lineage);
  for (const warning of document.warnings) {
    if (warning.category === 'at-bound' || warning.category === 'not-compared') continue;
    if (warning.message.includes(name)) warnings.push(`${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}`);
  }
  return warnings;
}

/** The trend verdict of a lineage (fit.json `trend_test`), in words; empty when the fit made none. */
function trendBlock(lineage: LineageView): string {
  const test = lineage.trend_test as { p_value?: number | null; supported?: boolean; direction?: string | null; level?: number; replicates?: number; aicc_false_trend_rate?: number | null; note?: string | null } | null | undefined;
  if (!test) return '';
  if (typeof test.p_value !== 'number') return `<div class="conclusion" data-block="trend-test"><p><strong>Trend test:</strong> ${escapeHtml(test.note ?? 'not made')}.</p></div>`;
  const level = `${Number(((test.level ?? 0.05) * 100).toPrecision(3))}%`;
  const verdict = test.supported ? `a directional trend (${test.direction ?? 'no direction'}) is supported at the ${level} level` : `no directional trend is supported at the ${level} level`;
  const rate = typeof test.aicc_false_trend_rate === 'number'
    ? ` On this lineage's design, AICc alone ranks the directional walk first in ${Math.round(test.aicc_false_trend_rate * 100)}% of sequences simulated from the fitted non-directional model.`
    : '';
  return `<div class="conclusion" data-block="trend-test"><p><strong>Trend test:</strong> p <span data-field="trend_p_value" data-value="${exactValue(test.p_value)}">${escapeHtml(formatPValue(test.p_value))}</span> (parametric bootstrap, ${test.replicates ?? 0} replicates); ${escapeHtml(verdict)}.${escapeHtml(rate)}</p>${test.supported ? `<p class="note">${escapeHtml(trendCaution)}</p>` : ''}</div>`;
}

function conclusion(lineage: LineageView): string {
  const compared = lineage.models.filter((model) => model.compared && model.weight !== null);
  const best = lineage.models.find((model) => model.id === lineage.best_model);
  // The general cautions (supportCautions) are printed once, with the overview; here only those this result calls for.
  const cautions: string[] = [];
  if (!best) {
    return `<div class="conclusion"><p>No model could be compared for this lineage.</p></div>`;
  }
  const close = compared.filter((model) => model.id !== best.id && model.delta_aicc !== null && model.delta_aicc < 2);
  if (close.length > 0) cautions.push(closeSupportCaution);
  const reading = findModel(best.id)?.caution;
  if (reading === 'directional') cautions.push(directionalCaution);
  if (reading === 'stasis') cautions.push(stasisCaution);
  if (lineage.models.some((model) => model.flags.length > 0)) cautions.push(boundCaution);
  const closeWords = close.length > 0
    ? ` ${close.map((model) => `${model.label} (weight ${model.weight?.toFixed(3)}, ΔAICc ${model.delta_aicc?.toFixed(2)})`).join(' and ')} ${close.length === 1 ? 'is' : 'are'} within 2 AICc units.`
    : '';
  return `<div class="conclusion"><p><strong>Best supported among the models fitted:</strong> ${escapeHtml(best.label)}, Akaike weight <span data-field="best_weight" data-value="${exactValue(best.weight)}">${best.weight?.toFixed(3)}</span>.${escapeHtml(closeWords)}</p></div>
${cautions.length > 0 ? `<div class="cautions"><p><strong>Reading this result</strong> (besides the general cautions in the overview)</p><ul>${cautions.map((caution) => `<li>${escapeHtml(caution)}</li>`).join('')}</ul></div>` : ''}`;
}

/**
 * The report block of one lineage: data summary with warnings, the
 * model-support table, the conclusion with its cautions, the figures, the
 * estimates, and any further results the document carries for it (rates,
 * adequacy checks, … added by later analyses).
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * lineageSection(document.lineages[0], 0, document, []).split('\n').slice(0, 2); // ['<section class="lineage" id="lineage-1-a-length" data-lineage="0">', '<h2>A / length</h2>']
 */
export function lineageSection(lineage: LineageView, index: number, document: FitDocumentView, figures: readonly ReportFigure[]): string {
  const summary = summariseData(lineage);
  const title = lineageTitle(lineage);
  const unit = lineage.time_unit;
  // With a trait unit the changes read "0.82 mm" ("0.17 ln mm" with --log); without, as before.
  const scale = lineage.trait_unit ? ` ${traitUnitLabel(lineage.trait_unit, lineage.transform === 'ln', '')}` : lineage.transform === 'ln' ? ' (ln units)' : '';
  const warnings = lineageWarnings(lineage, summary, document);
  const facts = [
    fact('horizons', String(summary.horizons), 'horizons', summary.horizons),
    fact('time span', `${formatNumber(summary.span)} ${unit}${positionWords(lineage, summary) ? ` (${positionWords(lineage, summary)})` : ''}`, 'span', summary.span),
    fact('spacing', `${formatNumber(summary.shortestInterval)} to ${formatNumber(summary.longestInterval)} ${unit} between horizons`),
    fact('specimens per horizon', `${formatNumber(summary.specimens.smallest)} to ${formatNumber(summary.specimens.largest)} (median ${formatNumber(summary.specimens.median)}; ${formatNumber(summary.specimens.total)} in all)`, 'specimens', summary.specimens.total),
    fact('net change, oldest to youngest', `${formatNumber(summary.netChange)}${scale}`, 'net_change', summary.netChange),
    fact('typical standard error of a mean', `${formatNumber(summary.typicalStandardError)}${scale} (root of the average sampling variance)`, 'typical_standard_error', summary.typicalStandardError),
    fact('net change / standard error', summary.changeToError === null ? '—' : formatNumber(summary.changeToError, 3), 'change_to_error', summary.changeToError),
    fact('treatment', `${lineage.transform === 'ln' ? 'natural-log trait' : 'untransformed trait'}${lineage.trait_unit ? ` in ${traitUnitLabel(lineage.trait_unit, lineage.transform === 'ln', '')}` : ''}, ${lineage.sampling_variance === 'pooled' ? 'pooled within-horizon variance' : 'per-horizon sampling variance'}`),
  ];
  const own = figures.filter((figure) => figure.lineage === index && figure.place === undefined);
  const leftOut = Array.isArray(lineage.models_left_out) ? (lineage.models_left_out as string[]) : [];
  const further = Object.entries(lineage).filter(([key]) => !shownKeys.has(key));
  const isObject = (value: unknown): boolean => value !== null && typeof value === 'object' && !(Array.isArray(value) && value.every((entry) => entry === null || typeof entry !== 'object'));
  const furtherFacts = further.filter(([, value]) => !isObject(value));
  const furtherBlocks = further.filter(([, value]) => isObject(value));
  const anchor = `lineage-${index + 1}-${slug(title)}`;
  return `<section class="lineage" id="${anchor}" data-lineage="${index}">
<h2>${escapeHtml(title)}</h2>
<p class="summary" data-block="plain-summary">${escapeHtml(plainSummary(lineage, summary))}</p>
<h3>Data</h3>
<dl class="facts">${facts.join('')}</dl>
<p>${escapeHtml(samplingWords(summary))}</p>
${horizonTable(lineage)}
${warnings.length > 0 ? `<div class="warnings" role="note"><strong>Warnings</strong><ul>${warnings.map((warning) => `<li>${escapeHtml(warning)}</li>`).join('')}</ul></div>` : ''}
<h3>Model support</h3>
${supportTable(lineage)}
${leftOut.length > 0 ? `<p class="note">Not fitted to this lineage (its data do not allow them): ${escapeHtml(leftOut.join(', '))}.</p>` : ''}
${conclusion(lineage)}
${trendBlock(lineage)}
${own.length > 0 ? `<h3>Figures</h3>\n${own.map(figureHtml).join('\n')}` : ''}
<h3>Estimates</h3>
${estimatesTable(lineage)}
${lineage.adequacy !== undefined && lineage.adequacy !== null ? `<h3>Adequacy of the best-supported model</h3>\n${adequacyBlock(lineage.adequacy)}` : ''}
${lineage.rates !== undefined && lineage.rates !== null ? `<h3>Rates</h3>\n${ratesBlock(lineage.rates, lineage)}` : ''}
${furtherFacts.length > 0 ? `<h3>Further results</h3>\n${jsonBlock(Object.fromEntries(furtherFacts))}` : ''}
${furtherBlocks.map(([key, value]) => `<h3>${escapeHtml(key.replace(/_/g, ' '))}</h3>\n${jsonBlock(value)}`).join('\n')}
</section>`;
}
