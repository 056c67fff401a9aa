import { formatNumber } from '../units.js';
import { formatPValue } from '../trend-text.js';
import { lineageTitle, type FitDocumentView } from './document-view.js';
import { jointBlock } from './joint-block.js';
import { escapeHtml, exactValue, slug } from './html.js';
import { figureHtml, lineageSection, type ReportFigure } from './lineage-section.js';
import { methodsParagraphs, methodsPlainText, methodsText, renderSentence, type AnalysesRun, type MethodsText, type PowerRun } from './methods.js';
import { ageModelBlock, comparisonDocumentBlock, jsonBlock, powerDocumentBlock } from './optional-blocks.js';
import { supportTable } from './support-table.js';
import type { LineageView } from './document-view.js';
import { findReference } from './references.js';
import { reportStyles } from './styles.js';
import { supportCautions } from './cautions.js';

export type { ReportFigure } from './lineage-section.js';

/** What only the report records about a run (never written into fit.json, which must stay byte-identical). */
export interface RunRecord {
  /** When the report was made, ISO 8601. */
  readonly date: string;
  /** The command line as typed, when known. */
  readonly command?: string;
  /** Runtime, e.g. "Node.js v20.20.2 on linux x64". */
  readonly runtime?: string;
  /** Options of the report itself (figure format, …), beside the fit options of the document. */
  readonly reportOptions?: Readonly<Record<string, unknown>>;
  /** Random seeds used by any part of the run, by analysis. */
  readonly seeds?: Readonly<Record<string, unknown>>;
  /** Further input files of the run (age model, covariate file, attached results) with their SHA-256. */
  readonly extraInputs?: readonly { readonly role: string; readonly file: string; readonly sha256: string }[];
  /** A sentence about the figures when some could not be drawn. */
  readonly figureNote?: string;
}

/** Everything a report shows. Optional analyses appear only when given (or present in the document). */
export interface ReportInput {
  readonly document: FitDocumentView;
  readonly figures?: readonly ReportFigure[];
  /** `compare --json` result. */
  readonly comparison?: unknown;
  /** `power --json` result, or one per lineage. */
  readonly power?: unknown;
  /** Adequacy checks of the whole run (per-lineage checks may also sit in each lineage document). */
  readonly adequacy?: unknown;
  /** `joint --json` result (`report --joint`), shown as "Traits together". */
  readonly joint?: unknown;
  readonly analyses?: AnalysesRun;
  readonly run: RunRecord;
}

/** Top-level document keys the report shows in blocks of their own. */
const topKeys = new Set(['provenance', 'model_set', 'lineages', 'warnings', 'comparison', 'comparisons', 'power', 'adequacy', 'age_model']);

function citationLinks(keys: readonly string[]): string {
  return keys.map((key) => `<a href="#ref-${slug(key)}" class="cite">${escapeHtml(findReference(key).cite)}</a>`).join('; ');
}

/**
 * The methods text as HTML paragraphs, citations linked to the reference list.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * methodsHtml(methodsText(document)).startsWith('<p data-block="methods-paragraph">Trait means of 1 lineage'); // true
 */
export function methodsHtml(methods: MethodsText): string {
  return methodsParagraphs(methods)
    .map((sentences) => `<p data-block="methods-paragraph">${sentences.map((sentence) => renderSentence(sentence, escapeHtml, citationLinks)).join(' ')}</p>`)
    .join('\n');
}

/** The overview's trend-test cell: verdict and p-value (fit.json `trend_test`). */
function trendCell(lineage: FitDocumentView['lineages'][number]): string {
  const test = lineage.trend_test as { p_value?: number | null; supported?: boolean; direction?: string | null } | null | undefined;
  if (!test || typeof test.p_value !== 'number') return '<td>not made</td>';
  const verdict = test.supported ? `trend (${test.direction ?? 'no direction'})` : 'no trend supported';
  return `<td data-field="trend_p_value" data-value="${exactValue(test.p_value)}">${escapeHtml(verdict)}, p ${escapeHtml(formatPValue(test.p_value))}</td>`;
}

function overview(document: FitDocumentView): string {
  const tested = document.lineages.some((lineage) => lineage.trend_test !== undefined && lineage.trend_test !== null);
  const rows = document.lineages.map((lineage, index) => {
    const best = lineage.models.find((model) => model.id === lineage.best_model);
    const span = (lineage.data.time[lineage.data.time.length - 1] ?? 0) - (lineage.data.time[0] ?? 0);
    return `<tr data-lineage="${index}"><td><a href="#lineage-${index + 1}-${slug(lineageTitle(lineage))}">${escapeHtml(lineageTitle(lineage))}</a></td>`
      + `<td class="number" data-field="horizons" data-value="${lineage.horizons}">${lineage.horizons}</td>`
      + `<td class="number">${escapeHtml(formatNumber(span))} ${escapeHtml(lineage.time_unit)}</td>`
      + `<td>${best ? escapeHtml(best.label) : 'none compared'}</td>`
      + `<td class="number" data-field="weight" data-value="${exactValue(best?.weight ?? null)}">${best?.weight === null || best === undefined ? '—' : best.weight.toFixed(3)}</td>`
      + (tested ? trendCell(lineage) : '') + '</tr>';
  });
  return `<table aria-label="overview"><thead><tr><th>lineage</th><th class="number">horizons</th><th class="number">time span</th><th>best supported</th><th class="number">Akaike weight</th>${tested ? '<th>trend test</th>' : ''}</tr></thead><tbody>
${rows.join('\n')}
</tbody></table>
<div class="cautions"><p><strong>Reading these results</strong></p><ul>${supportCautions.map((caution) => `<li>${escapeHtml(caution)}</li>`).join('')}</ul></div>`;
}

function provenanceBlock(document: FitDocumentView, run: RunRecord): string {
  const { provenance } = document;
  const rows: [string, string][] = [
    ['tool', `${provenance.tool} ${provenance.version}`],
    ...provenance.inputs.map((input, index): [string, string] => [`input ${index + 1}`, `${input.file} — SHA-256 ${input.sha256}`]),
    ...(run.extraInputs ?? []).filter((extra) => !provenance.inputs.some((input) => input.file === extra.file)).map((extra): [string, string] => [extra.role, `${extra.file} — SHA-256 ${extra.sha256}`]),
    ...Object.entries(provenance.options).map(([key, value]): [string, string] => [`fit option: ${key}`, typeof value === 'string' ? value : JSON.stringify(value)]),
    ['model set', document.model_set],
    ...Object.entries(run.reportOptions ?? {}).map(([key, value]): [string, string] => [`report option: ${key}`, typeof value === 'string' ? value : JSON.stringify(value)]),
    ['random seeds', run.seeds && Object.keys(run.seeds).length > 0 ? Object.entries(run.seeds).map(([key, value]) => `${key}: ${String(value)}`).join('; ') : 'none (the fit uses no random numbers)'],
    ...(run.command ? [['command', run.command] as [string, string]] : []),
    ...(run.runtime ? [['runtime', run.runtime] as [string, string]] : []),
    ['report made', run.date],
  ];
  return `<table class="provenance" aria-label="provenance"><tbody>
${rows.map(([term, value]) => `<tr><td>${escapeHtml(term)}</td><td><code>${escapeHtml(value)}</code></td></tr>`).join('\n')}
</tbody></table>
<p class="note">The numbers in this report are those of the run's fit.json (the same options give a byte-identical fit.json; the date is recorded only here).</p>`;
}

/**
 * What the power documents say was done (`power --json` layout; an entry
 * with `power_not_run` is a lineage whose analysis failed): which lineages
 * ran, replicates, seed, drift grid, where the step variance came from.
 *
 * @example
 * powerRunOf([{ lineage: 'A', grid: [{ drift: 0 }], settings: { replicates: 99, seed: 1 } }]).drifts; // { lowest: 0, highest: 0, count: 1, unit: 'time unit' }
 */
export function powerRunOf(documents: readonly unknown[]): PowerRun {
  type PowerView = { power_not_run?: string; lineage?: string; input?: { lineage?: string }; grid?: { drift?: number }[]; settings?: { replicates?: number; seed?: number; time_unit?: string; weight_threshold?: number }; generator?: { step_variance_source?: string }; lrt?: { level?: number } };
  const views = documents.filter((entry): entry is PowerView => entry !== null && typeof entry === 'object');
  const ran = views.filter((view) => view.power_not_run === undefined && Array.isArray(view.grid) && view.grid.length > 0);
  const notRun = views.filter((view) => !ran.includes(view));
  const drifts = ran.flatMap((view) => (view.grid ?? []).map((point) => point.drift)).filter((value): value is number => typeof value === 'number');
  const first = ran[0];
  const sources = new Set(ran.map((view) => view.generator?.step_variance_source));
  return {
    replicates: first?.settings?.replicates,
    seed: first?.settings?.seed,
    lineages: ran.map((view) => view.input?.lineage ?? view.lineage ?? 'lineage'),
    notRun: notRun.map((view) => view.lineage ?? view.input?.lineage ?? 'lineage'),
    // One grid per lineage, in that lineage's units: the range over all of them, counted per lineage.
    drifts: first && drifts.length > 0 ? { lowest: Math.min(...drifts), highest: Math.max(...drifts), count: first.grid?.length ?? 0, unit: first.settings?.time_unit ?? 'time unit' } : undefined,
    stepVariance: sources.size > 1 ? 'mixed' : sources.has('given') ? 'given' : 'fitted',
    weightThreshold: first?.settings?.weight_threshold,
    level: first?.lrt?.level,
  };
}

/**
 * Build the whole report: one self-contained HTML page (styles inline,
 * figures as data URLs, no scripts, nothing fetched when opened) with an
 * overview, one section per lineage, the optional analyses that were run,
 * the run's warnings, the methods text with its references, and provenance.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * const html = reportPage({ document, run: { date: '2026-01-01T00:00:00Z' } });
 * html.startsWith('<!DOCTYPE html>'); // true
 */
export function reportPage(input: ReportInput): string {
  const { document, run } = input;
  const figures = input.figures ?? [];
  const comparison = input.comparison ?? document.comparison ?? document.comparisons;
  const power = input.power ?? document.power;
  const adequacy = input.adequacy ?? document.adequacy;
  const lineageAdequacy = document.lineages.some((lineage) => lineage.adequacy !== undefined);
  const powerList = power === undefined ? [] : Array.isArray(power) ? power : [power];
  const adequacyOf = document.lineages.map((lineage) => lineage.adequacy as { draws?: number; seed?: number } | undefined).find((entry) => entry);
  const comparisonTraits = (comparison as { traits?: { tests?: unknown[]; hypotheses?: { id?: string }[] }[] } | undefined)?.traits ?? [];
  const hasTests = comparisonTraits.some((trait) => (trait.tests ?? []).length > 0);
  const hypotheses = [...new Set(comparisonTraits.flatMap((trait) => (trait.hypotheses ?? []).map((hypothesis) => hypothesis.id)).filter((id): id is string => typeof id === 'string'))];
  const analyses: AnalysesRun = {
    comparison: comparison !== undefined,
    comparisonHypotheses: hypotheses.length > 0 ? hypotheses : undefined,
    comparisonTests: hasTests,
    power: powerList.length > 0 ? { ...powerRunOf(powerList), ...(input.analyses?.power ?? {}) } : null,
    adequacy: adequacy !== undefined || lineageAdequacy ? (input.analyses?.adequacy ?? { replicates: adequacyOf?.draws, seed: adequacyOf?.seed }) : null,
    rates: document.lineages.some((lineage) => lineage.rates !== undefined && lineage.rates !== null),
    smoothedBand: input.analyses?.smoothedBand === true,
  };
  const methods = methodsText(document, analyses);
  const inputNames = document.provenance.inputs.map((entry) => entry.file.split(/[\\/]/).pop() ?? entry.file).join(', ');
  const shared = figures.filter((figure) => figure.lineage === null && figure.place === undefined);
  const placed = (place: string): string => figures.filter((figure) => figure.place === place).map(figureHtml).join('\n');
  const further = Object.entries(document).filter(([key]) => !topKeys.has(key));

  const blocks: { id: string; title: string; html: string }[] = [];
  blocks.push({ id: 'overview', title: 'Overview', html: overview(document) });
  if (document.age_model !== undefined && document.age_model !== null) {
    blocks.push({ id: 'age-model', title: 'Age model', html: ageModelBlock(document.age_model, document.lineages[0]?.time_unit ?? 'Myr') });
  }
  document.lineages.forEach((lineage, index) => {
    blocks.push({ id: `lineage-${index + 1}-${slug(lineageTitle(lineage))}`, title: lineageTitle(lineage), html: lineageSection(lineage, index, document, figures) });
  });
  if (shared.length > 0) blocks.push({ id: 'figures-by-trait', title: 'Sections together', html: shared.map(figureHtml).join('\n') });
  if (comparison !== undefined) {
    const composite = (lineage: Record<string, unknown>): string => `<p><strong>${escapeHtml(lineageTitle(lineage as unknown as LineageView))}</strong></p>${supportTable(lineage as unknown as LineageView)}`;
    blocks.push({ id: 'comparison', title: 'Comparison of sections', html: `${comparisonDocumentBlock(comparison, composite)}\n${placed('comparison')}` });
  }
  if (input.joint !== undefined) blocks.push({ id: 'joint', title: 'Traits together', html: jointBlock(input.joint, (group) => placed(`joint:${group}`)) });
  if (powerList.length > 0) {
    blocks.push({ id: 'power', title: 'Power of this design', html: powerList.map((entry, index) => `${powerDocumentBlock(entry)}\n${placed(`power:${index}`)}`).join('\n') });
  }
  if (adequacy !== undefined) blocks.push({ id: 'adequacy', title: 'Adequacy checks', html: jsonBlock(adequacy) });
  for (const [key, value] of further) blocks.push({ id: slug(key), title: key.replace(/_/g, ' '), html: jsonBlock(value) });
  if (document.warnings.length > 0) {
    blocks.push({
      id: 'warnings',
      title: 'All warnings of the run',
      html: `<div class="warnings"><ul>${document.warnings.map((warning) => `<li><code>${escapeHtml(warning.category)}</code> ${escapeHtml(warning.message)}${warning.count > 1 ? ` (${warning.count} times)` : ''}</li>`).join('')}</ul></div>`,
    });
  }
  blocks.push({
    id: 'methods',
    title: 'Methods',
    html: `<div class="methods">${methodsHtml(methods)}</div>
<p class="note">Written from the options of this run; adapt it to your paper. Check every reference against the journal before submitting.</p>
<details class="copy"><summary>Plain text for copying</summary><div class="plain-text" data-block="methods-plain">${escapeHtml(methodsPlainText(methods))}</div></details>
<h3>References</h3>
<ol class="references">${methods.references.map((reference) => `<li id="ref-${slug(reference.key)}">${escapeHtml(reference.entry)}</li>`).join('')}</ol>`,
  });
  blocks.push({ id: 'provenance', title: 'Provenance', html: provenanceBlock(document, run) });

  const contents = blocks.map((block) => `<li><a href="#${block.id}">${escapeHtml(block.title)}</a></li>`).join('');
  const body = blocks.map((block) => (block.html.startsWith('<section') ? block.html : `<section id="${block.id}">\n<h2>${escapeHtml(block.title)}</h2>\n${block.html}\n</section>`)).join('\n');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src data:; style-src 'unsafe-inline'">
<meta name="generator" content="${escapeHtml(`${document.provenance.tool} ${document.provenance.version}`)}">
<title>${escapeHtml(`Evolutionary models: ${inputNames}`)}</title>
<style>${reportStyles}</style>
</head>
<body>
<main>
<header>
<h1>Models of phyletic evolution: ${escapeHtml(inputNames)}</h1>
<p class="subtitle">${escapeHtml(`${document.lineages.length} lineage${document.lineages.length === 1 ? '' : 's'}, ${document.provenance.tool} ${document.provenance.version}, report made ${run.date}`)}</p>
${run.figureNote ? `<p class="note">${escapeHtml(run.figureNote)}</p>` : ''}
</header>
<nav class="contents" aria-label="contents"><strong>Contents</strong><ol>${contents}</ol></nav>
${body}
</main>
</body>
</html>
`;
}
