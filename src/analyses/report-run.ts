import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { checkComparisonDocument, checkFitDocument, checkPowerDocument, readJsonFile } from '../data/documents.js';
import { InputError, usageError } from '../data/errors.js';
import { asFitDocument, lineageTitle, type FitDocumentView } from '../render/report/document-view.js';
import { reportPage, type ReportFigure, type ReportInput } from '../render/report/report-page.js';
import { reportFigure } from '../render/report/lineage-section.js';
import { sketchTrajectory } from '../render/report/sketch-figure.js';
import { traitUnitLabel } from '../render/units.js';
import { capitalised } from '../render/words.js';
import { runFitStreamed, type FitCommandOptions, type FitRun } from './fit-run.js';
import type { StreamedInput } from './input.js';
import type { ModelSelection } from './model-selection.js';
import { stageProgress } from '../io/progress.js';
import { checkOutputFile, prepareOutputFile, writeAtomically } from '../io/write-output.js';

/** Options of `stratotrend report` (the fit options plus where and how to write the page). */
export interface ReportCommandOptions extends FitCommandOptions {
  /** The HTML file to write (default: stratotrend-report.html). */
  out?: string;
  /** Figure format inside the page: "svg" (default, vector, prints sharply) or "png". */
  figureFormat?: string;
  /** Saved results of other analyses (compare --json, power --json) to show in the report. */
  attach?: string[];
  /** Also fit the joint models of several traits (`stratotrend joint`) and show them. */
  joint?: boolean;
  /** Figure layout: "stratigraphic" (default) or "horizontal". */
  orientation?: string;
  /** Model whose expected trajectory is drawn (default: each lineage's best). */
  drawModel?: string;
  /** Also draw the smoothed lineage mean with its band. */
  smoothedBand?: boolean;
  /** Also compare the sections of every trait measured in two or more (as `compare`). */
  compare?: boolean;
  /** Also run the power analysis on every lineage's design (as `power`). */
  power?: boolean;
  /** Replicates per drift value for --power (commander hands a string). */
  powerReplicates?: string;
  /** Step variance(s) the power simulations assume (comma-separated), as `power --step-variance`. */
  powerStepVariance?: string;
  /** Seed of the simulations (--power). */
  seed?: string;
  /** Age model (tie points) for height/depth samples. */
  ageModel?: string;
  extrapolate?: boolean;
}

/** Default name of the report file. */
export const defaultReportFile = 'stratotrend-report.html';

/** Results of another analysis read from a saved JSON file, sorted into the report's blocks by their layout. */
interface Attachments {
  comparison?: unknown;
  power: unknown[];
  adequacy?: unknown;
  files: { file: string; sha256: string; kind: string }[];
}

function readAttachments(files: readonly string[]): Attachments {
  const attachments: Attachments = { power: [], files: [] };
  for (const file of files) {
    const { value, sha256 } = readJsonFile(file, 'the JSON of "compare --json", "power --json" or adequacy checks', { role: 'given with --attach', missingKind: 'usage' });
    const record = (value ?? {}) as Record<string, unknown>;
    const kind = Array.isArray(record.traits) ? 'comparison' : Array.isArray(record.grid) ? 'power' : record.adequacy !== undefined || /adequa/i.test(file) ? 'adequacy' : null;
    if (!kind) throw new InputError('is neither a section comparison (compare --json: "traits") nor a power result (power --json: "grid") nor adequacy checks', { file });
    // Checked on reading, so a hand-edited field is one message naming it, not an internal error or a wrong page.
    if (kind === 'power') checkPowerDocument(value, file);
    if (kind === 'comparison') checkComparisonDocument(value, file);
    if (kind === 'power') attachments.power.push(value);
    else if (kind === 'comparison') attachments.comparison = value;
    else attachments.adequacy = record.adequacy !== undefined ? record.adequacy : value;
    attachments.files.push({ file, sha256, kind });
  }
  return attachments;
}

/**
 * Read a saved fit.json as the document to report on (no refitting), checked
 * field by field first.
 *
 * @throws InputError naming the file and the first field that does not fit (e.g. `lineages[0].models[0].weight: expected a number or null, got "bad"`)
 *
 * @example
 * readFitJson('sample-data/shell-length.csv');
 * // throws: sample-data/shell-length.csv
 */
export function readFitJson(file: string): { document: FitDocumentView; sha256: string } {
  const { value, sha256 } = readJsonFile(file, 'the fit.json written by "fit --out"');
  checkFitDocument(value, file);
  return { document: asFitDocument(value as Record<string, unknown>), sha256 };
}

/** Most figures one page embeds (each SVG is a few hundred kB); a note says when more were left out. */
export const maximumFigures = 60;

/** Figure choices of the report, passed on to the figure module. */
export interface ReportFigureChoices {
  readonly format: 'svg' | 'png';
  readonly orientation?: string;
  readonly drawModel?: string;
  readonly smoothedBand?: boolean;
}

function sketchFigures(document: FitDocumentView, smoothedBand = false): ReportFigure[] {
  return document.lineages.map((lineage, index) => {
    // As the real figures: the smoothed mean only with --smoothed-band (the methods text says so only then).
    const sketch = sketchTrajectory(smoothedBand ? lineage : { ...lineage, smoothed: null });
    return {
      lineage: index,
      kind: 'trajectory',
      caption: `${lineageTitle(lineage)}: horizon means with 95% sampling intervals (±1.96 √eᵢ)${smoothedBand && lineage.smoothed ? ' and the lineage mean smoothed under the best-supported model with its 95% band' : ''}; time runs up the page, oldest horizon at the bottom.`,
      mime: 'image/svg+xml',
      bytes: new TextEncoder().encode(sketch.svg),
      width: sketch.width,
      height: sketch.height,
    };
  });
}

function modelWords(lineage: FitDocumentView['lineages'][number], requested: string | undefined): string {
  const id = requested ?? lineage.best_model;
  const model = lineage.models.find((entry) => entry.id === id);
  if (!model) return 'no model';
  return requested ? model.label : `the best-supported model, ${model.label},`;
}

/**
 * Draw the figures of the page with the figure module (src/render/figures:
 * chart.js on @napi-rs/canvas, loaded only now): per lineage its trajectory
 * with the chosen model's expected trajectory and 95% envelope, and per
 * trait with two or more sections the sections-together figure. If the
 * chart stack cannot be loaded, plain SVG sketches drawn from the document
 * stand in, and the page says so.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis], { intervals: false })], provenance, [], 'classic'));
 * const { figures } = await reportFigures(document, { format: 'svg' });
 * figures.map((figure) => [figure.kind, figure.mime]); // [['trajectory', 'image/svg+xml']]
 */
export async function reportFigures(document: FitDocumentView, choices: ReportFigureChoices): Promise<{ figures: ReportFigure[]; note?: string }> {
  let figuresModule: typeof import('../render/figures/index.js');
  try {
    figuresModule = await import('../render/figures/index.js');
  } catch (error) {
    return { figures: sketchFigures(document, choices.smoothedBand), note: `Figures are plain sketches: the chart module could not be loaded (${(error as Error).message}).` };
  }
  const { renderTrajectory, renderSectionsTogether, figureJobs } = figuresModule;
  const { withSmootherOf } = await import('./figure-files.js');
  const options = {
    format: choices.format,
    width: 'double' as const,
    dpi: 200,
    orientation: choices.orientation === 'horizontal' ? ('horizontal' as const) : ('stratigraphic' as const),
    model: choices.drawModel,
    smoothed: choices.smoothedBand === true,
  };
  const direction = options.orientation === 'horizontal' ? 'time runs left to right' : 'time runs up the page, oldest horizon at the bottom';
  const figures: ReportFigure[] = [];
  try {
    const jobs = figureJobs(document.lineages, ['trajectory', 'sections']);
    for (const job of jobs.slice(0, maximumFigures)) {
      const lineages = job.lineages.map((index) => document.lineages[index]);
      // The band is the smoother of the model drawn (fit.json holds the best model's).
      const single = options.smoothed && options.model ? withSmootherOf(lineages[0], options.model) : lineages[0];
      const drawn = job.kind === 'trajectory' ? renderTrajectory(single, options) : renderSectionsTogether(lineages, options);
      const caption = job.kind === 'trajectory'
        ? `${lineageTitle(lineages[0])}: horizon means with 95% sampling intervals (±1.96 √eᵢ), the expected trajectory of ${modelWords(lineages[0], choices.drawModel)} with its 95% envelope${options.smoothed ? ', and the smoothed lineage mean with its 95% band' : ''}; ${direction}.`
        : `${lineages[0].trait || 'trait'}: ${lineages.map((lineage) => lineage.section || 'lineage').join(', ')} on one time axis, each with the expected trajectory of its ${choices.drawModel ? 'chosen' : 'best-supported'} model and its 95% envelope shaded (none where the model's variance is 0); ${direction}.`;
      figures.push(reportFigure({ lineage: job.kind === 'trajectory' ? job.lineages[0] : null, kind: job.kind, caption: capitalised(caption) }, drawn));
    }
  } catch (error) {
    if ((error as { name?: string }).name === 'InputError') throw error;
    return { figures: sketchFigures(document, choices.smoothedBand), note: `Figures are plain sketches: the chart module failed (${(error as Error).message}).` };
  }
  const left = Math.max(0, figureJobs(document.lineages, ['trajectory', 'sections']).length - maximumFigures);
  return { figures, note: left > 0 ? `The first ${maximumFigures} figures are drawn; ${left} more are left out to keep the page small (draw them all with "stratotrend fit … --out DIR" or "stratotrend redraw").` : undefined };
}

/** The power-curve figure of each power result, drawn by the figure module from the `power --json` layout. */
async function powerFigures(powers: readonly unknown[], format: 'svg' | 'png'): Promise<ReportFigure[]> {
  if (powers.length === 0) return [];
  const { renderPowerCurve, powerCurveAssumptions, powerAssumptionCaption } = await import('../render/figures/power-curve.js');
  const figures: ReportFigure[] = [];
  for (const [index, power] of powers.entries()) {
    const doc = power as { grid: never[]; input?: { lineage?: string; trait_unit?: string | null; transform?: string }; settings?: Record<string, number | string>; smallest_drift?: { power?: number }; lrt?: { level?: number }; assumptions?: unknown };
    const settings = doc.settings ?? {};
    try {
      const drawn = renderPowerCurve({
        grid: doc.grid,
        lineage: doc.input?.lineage ?? 'lineage',
        horizons: Number(settings.horizons),
        replicates: Number(settings.replicates),
        timeUnit: String(settings.time_unit ?? ''),
        traitUnit: typeof doc.input?.trait_unit === 'string' ? traitUnitLabel(doc.input.trait_unit, doc.input.transform === 'ln', '') : null,
        weightThreshold: Number(settings.weight_threshold),
        targetPower: doc.smallest_drift?.power ?? 0.8,
        level: doc.lrt?.level ?? 0.05,
        withinSd: Number(settings.pooled_within_sd),
        stepVariance: typeof settings.step_variance === 'number' ? settings.step_variance : undefined,
        assumptions: powerCurveAssumptions(doc),
      }, { format, width: 'double', dpi: 200 });
      figures.push(reportFigure({
        lineage: null,
        place: `power:${index}`,
        kind: 'power-curve',
        caption: `${doc.input?.lineage ?? 'lineage'}: probability of each decision rule against the true drift, from simulations on this design. ${powerAssumptionCaption(doc)}`.trimEnd(),
      }, drawn));
    } catch (error) {
      if ((error as { name?: string }).name === 'InputError') throw error;
      // A power result without a drawable grid keeps its table; the figure is left out.
    }
  }
  return figures;
}

/** Run the optional analyses asked for on the samples file: section comparison and power. */
async function runAnalyses(
  file: string,
  document: FitDocumentView,
  options: ReportCommandOptions,
  read?: StreamedInput,
  selection?: ModelSelection,
): Promise<{ comparison?: unknown; power: unknown[]; seeds: Record<string, unknown>; joint?: unknown }> {
  const sampleOptions = { log: options.log, pool: options.pool, timeUnit: options.timeUnit, traitUnit: options.traitUnit, delimiter: options.delimiter, decimalComma: options.decimalComma };
  const seeds: Record<string, unknown> = {};
  let comparison: unknown;
  if (options.compare) {
    const { runCompare } = await import('./compare-run.js');
    comparison = (await runCompare(file, { ...sampleOptions, models: selection ?? options.models, intervals: options.intervals, ageModel: options.ageModel, extrapolate: options.extrapolate }, read)).document;
  }
  const power: unknown[] = [];
  if (options.power) {
    const { runPower } = await import('./power-run.js');
    const seed = options.seed ?? '1';
    seeds.power = seed;
    // One progress bar per stage and lineage (stderr, terminal only, not with --quiet): the power runs take a while.
    const reporter = stageProgress(options.quiet);
    try {
    for (const [index, lineage] of document.lineages.entries()) {
      const progress = reporter.progress
        ? { stage: (label: string, total: number) => reporter.progress!.stage(`power ${index + 1}/${document.lineages.length}: ${label}`.slice(0, 40), total) }
        : undefined;
      try {
        // The same age-model options as the fit, so lineages given by height or depth are placed in time as in the fit.
        const result = await runPower(file, { ...sampleOptions, ageModel: options.ageModel, extrapolate: options.extrapolate, lineage: lineageTitle(lineage), replicates: options.powerReplicates, stepVariance: options.powerStepVariance, seed, coverage: false, quiet: true }, progress, read);
        power.push(result.document);
      } catch (error) {
        // A lineage whose design cannot be simulated (e.g. the directional walk does not fit) keeps the rest of the report.
        if (!(error instanceof InputError)) throw error;
        power.push({ lineage: lineageTitle(lineage), power_not_run: error.message });
      }
    }
    } finally {
      reporter.stop();
    }
  }
  let joint: unknown;
  if (options.joint) {
    if (file === '-') throw usageError('--joint reads the samples file again for the joint models; give a file name, not "-" (stdin)');
    // The joint models of several traits (issue 17), with the fit's intervals choice.
    const { runJoint } = await import('./joint-run.js');
    joint = (await runJoint(file, { ...sampleOptions, ageModel: options.ageModel, extrapolate: options.extrapolate, intervals: options.intervals !== false })).document;
  }
  return { comparison, power, seeds, joint };
}

/** The figures of `report --joint`: per group its panels and one trajectory per pair of traits, placed in the "Traits together" block. */
async function jointFigures(document: unknown, format: 'svg' | 'png'): Promise<ReportFigure[]> {
  const { renderJointPanels, renderJointTrajectory } = await import('../render/figures/joint.js');
  const groups = (document as { groups: import('../render/figures/joint.js').JointFigureGroup[] }).groups;
  const figures: ReportFigure[] = [];
  groups.forEach((group, index) => {
    const place = `joint:${index}`;
    const panels = renderJointPanels(group, { format });
    figures.push(reportFigure({ lineage: null, kind: 'joint-panels', caption: `${group.section ? `${group.section}: ` : ''}${group.traits.join(', ')} on one time axis (horizon means, 95% sampling intervals).`, place }, panels));
    for (let j = 0; j < group.traits.length; j++) {
      for (let l = j + 1; l < group.traits.length; l++) {
        const trajectory = renderJointTrajectory(group, j, l, { format });
        figures.push(reportFigure({ lineage: null, kind: 'joint-trajectory', caption: `${group.traits[l]} against ${group.traits[j]}: horizon means in time order (light to dark), 95% sampling ellipses.`, place }, trajectory));
      }
    }
  });
  return figures;
}

/** The provenance entry of --power: on which lineages it ran (and which it could not), with the replicates. */
function powerOptionWords(results: readonly unknown[], replicates: string | undefined, stepVariance: string | undefined): string {
  const failed = results.filter((entry) => (entry as { power_not_run?: unknown }).power_not_run !== undefined).length;
  const ran = results.length - failed;
  const where = failed === 0 ? 'every lineage' : `${ran} of ${results.length} lineages (not run on ${failed}; see the power block)`;
  return `${where}, ${replicates ?? '200'} replicates per drift value${stepVariance ? `, step variance ${stepVariance}` : ''}`;
}

function parseFormat(value: string | undefined): 'svg' | 'png' {
  const format = (value ?? 'svg').toLowerCase();
  if (format !== 'svg' && format !== 'png') throw usageError(`--figure-format: expected "svg" or "png", got "${value}"`);
  return format;
}

/**
 * Build the report page of a document: figures, attached analyses and the
 * run record (date, command, runtime, report options). Nothing is written.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis], { intervals: false })], provenance, [], 'classic'));
 * (await buildReport(document, {})).startsWith('<!DOCTYPE html>'); // true
 * await buildReport(document, { figureFormat: 'gif' });
 * // throws: --figure-format: expected "svg" or "png", got "gif"
 */
export async function buildReport(
  document: FitDocumentView,
  options: ReportCommandOptions,
  extra: { source?: { file: string; sha256: string }; analyses?: { comparison?: unknown; power: unknown[]; seeds: Record<string, unknown>; joint?: unknown } } = {},
): Promise<string> {
  const format = parseFormat(options.figureFormat);
  const attachments = readAttachments(options.attach ?? []);
  const { figures, note } = await reportFigures(document, { format, orientation: options.orientation, drawModel: options.drawModel, smoothedBand: options.smoothedBand });
  const power = [...(extra.analyses?.power ?? []), ...attachments.power];
  figures.push(...(await powerFigures(power, format)));
  if (extra.analyses?.joint !== undefined) figures.push(...(await jointFigures(extra.analyses.joint, format)));
  const reportOptions: Record<string, unknown> = {
    figure_format: format,
    orientation: options.orientation ?? 'stratigraphic',
    draw_model: options.drawModel ?? 'best supported',
    smoothed_band: options.smoothedBand === true,
    compare: options.compare === true,
    ...(options.joint ? { joint: true } : {}),
    power: options.power === true ? powerOptionWords(extra.analyses?.power ?? [], options.powerReplicates, options.powerStepVariance) : false,
  };
  if (extra.source) reportOptions.source = `${extra.source.file} (saved fit document, SHA-256 ${extra.source.sha256}; not refitted)`;
  const extraInputs = attachments.files.map((entry) => ({ role: `attached ${entry.kind}`, file: entry.file, sha256: entry.sha256 }));
  for (const [role, file] of [['age model', options.ageModel], ['covariate file', options.covariateFile]] as const) {
    if (file) extraInputs.push({ role, file, sha256: createHash('sha256').update(readFileSync(file)).digest('hex') });
  }
  const seeds: Record<string, unknown> = { ...(extra.analyses?.seeds ?? {}) };
  for (const [key, value] of Object.entries(document.provenance.options)) if (/seed/.test(key) && value !== null && value !== undefined) seeds[key] = value;
  const input: ReportInput = {
    document,
    figures,
    // The methods text describes the smoothed mean only when the figures draw it.
    analyses: { smoothedBand: options.smoothedBand === true && figures.some((figure) => figure.kind === 'trajectory') },
    comparison: extra.analyses?.comparison ?? attachments.comparison,
    power: power.length > 0 ? power : undefined,
    adequacy: attachments.adequacy,
    ...(extra.analyses?.joint !== undefined ? { joint: extra.analyses.joint } : {}),
    run: {
      date: new Date().toISOString(),
      command: ['stratotrend', ...process.argv.slice(2)].map((part) => (/^[\w@%+=:,./-]+$/.test(part) ? part : `'${part.replace(/'/g, "'\\''")}'`)).join(' '),
      runtime: `Node.js ${process.version} on ${process.platform} ${process.arch}`,
      reportOptions,
      seeds,
      extraInputs,
      figureNote: note,
    },
  };
  return reportPage(input);
}

/**
 * Write a report for a finished fit (used by `fit --report FILE`).
 *
 * @example
 * // Refused before anything is drawn or written: the report would overwrite the input.
 * await writeReportForRun({ document: {} }, 'sample-data/shell-length.csv', ['sample-data/shell-length.csv']);
 * // throws: refusing to write "sample-data/shell-length.csv": it is an input file
 */
export async function writeReportForRun(
  run: FitRun,
  path: string,
  inputs: readonly string[],
  fitOptions: { orientation?: string; drawModel?: string; smoothedBand?: boolean; ageModel?: string; covariateFile?: string } = {},
): Promise<void> {
  checkOutputFile(path, inputs, '--report file');
  // The layout choices and the extra input files carry over from fit; fit's --figure-format names files, the page takes SVG.
  const { orientation, drawModel, smoothedBand, ageModel, covariateFile } = fitOptions;
  const html = await buildReport(run.document, { orientation, drawModel, smoothedBand, ageModel, covariateFile });
  // Like every output name: never over an input, nor over a file stratotrend did not write.
  writeAtomically(prepareOutputFile(path, inputs, '--report file'), html);
}

/** The report page and the fit's warnings (as lines for stderr) made by {@link runReport}. */
export interface ReportRun {
  readonly html: string;
  readonly warningLines: readonly string[];
}

/**
 * The report of FILE (a samples file, fitted as `fit` does, with the comparison and power
 * analyses asked for; or a saved fit.json, drawn as saved): the page, not yet written.
 *
 * @example
 * // A run fits the file first (see buildReport for the page itself); a missing file is named.
 * await runReport('no-such-file.csv', { quiet: true });
 * // throws: no-such-file.csv
 */
export async function runReport(file: string, options: ReportCommandOptions): Promise<ReportRun> {
  let html: string;
  let warningLines: string[] = [];
  if (/\.json$/i.test(file)) {
    // The units are those the fit was made with (fit.json trait_unit); a label here would contradict the saved numbers.
    if (options.traitUnit !== undefined) throw usageError('--trait-unit applies to a samples file; a fit.json keeps the unit it was fitted with (its "trait_unit"); give --trait-unit to "fit" instead');
    const saved = readFitJson(file);
    try {
      html = await buildReport(saved.document, options, { source: { file, sha256: saved.sha256 } });
    } catch (error) {
      // A figure that cannot be drawn from the document's numbers (its InputError knows no file) names the fit.json.
      if (error instanceof InputError && error.kind === 'data' && error.file === undefined) throw new InputError(error.message, { file });
      throw error;
    }
  } else {
    if (options.power) {
      // Checked before the fit, so a bad value fails at once and names the report's own option.
      const { wholeOption, seedOption } = await import('./option-values.js');
      wholeOption(options.powerReplicates, '--power-replicates', 200, 20, 100000);
      seedOption(options.seed);
    }
    // The fit options pass through unchanged, so the page shows exactly what `fit` with the same options computes.
    const { out: _out, figureFormat: _format, attach: _attach, compare: _compare, joint: _joint, power: _power, powerReplicates: _replicates, seed: _seed, ...fitOptions } = options;
    // --seed also seeds the trend verdict (the report has no age draws, the other use of fit's --seed).
    const run = await runFitStreamed(file, { ...fitOptions, seed: _seed, quiet: true });
    const document = run.document;
    // The comparison and power analyses reuse the horizons the fit read (the file, or stdin, is read once).
    const analyses = await runAnalyses(file, document, options, run.read, run.selection);
    html = await buildReport(document, options, { analyses });
    warningLines = run.warnings.list()
      .filter((warning) => warning.category !== 'at-bound' && warning.category !== 'not-compared' && warning.category !== 'long-run')
      .map((warning) => `warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}`);
  }
  return { html, warningLines };
}
