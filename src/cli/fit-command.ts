import { usageError } from '../data/errors.js';
import { WarningLog } from '../data/warnings.js';
import { fitLineage, type LineageFit } from '../fit/fit-lineage.js';
import { intervalFallbackPrefix, type FitOptions } from '../fit/fit-model.js';
import { defaultMinimumSegment, type EvolutionModel } from '../models/model.js';
import { fitDocument, type Provenance } from '../render/fit-document.js';
import { modelsCsv } from '../render/models-csv.js';
import { adequacyText, ratesText } from '../render/extensions-text.js';
import { lineageTable } from '../render/text-table.js';
import { lineagesOf, loadLineages, loadSamplesStreamed, readInput, type InputText, type SampleFileOptions, type StreamedInput } from './input.js';
import type { Lineage } from '../lineage.js';
import { fitLineages } from '../parallel/fit-lineages.js';
import { modelSetLine, resolveModels, type ModelSelection, type ModelsOption } from './model-selection.js';
import { fittingProgress, readingProgress, searchProgress, stageProgress } from './progress.js';
import type { AgeModelOptions, LoadedAgeModel } from './age-model-options.js';
import { intervalOptions } from '../fit/intervals.js';
import { attachCovariates, extensionSettings, extrasDocument, lineageExtras, modelsForLineage, type ExtensionOptions, type LineageExtras } from './fit-extensions.js';
import type { FigureCommandOptions } from './render-command.js';
import { toolVersion } from './version.js';
import { trendTests } from '../trend/run-trend-tests.js';
import type { TrendTest, TrendTestOptions } from '../trend/trend-test.js';
import { summariseTrends, trendSummaryText, trendText, weakOuWin } from '../render/trend-text.js';
import { parseSeed } from '../simulate/seeds.js';
import { checkOutputFile, inputPaths, OutputSet, prepareOutputFolder, releaseOutputLocks } from './write-output.js';

/** Options of `stratotrend fit`. */
export interface FitCommandOptions extends AgeModelOptions, SampleFileOptions, FigureCommandOptions, ExtensionOptions {
  json?: boolean;
  out?: string;
  models?: ModelsOption;
  /** false for --no-intervals, a method name for --intervals METHOD. */
  intervals?: boolean | string;
  quiet?: boolean;
  /** Also write the HTML report to this file (`stratotrend report`). */
  report?: string;
  /** Worker threads for many lineages (1 = fit in the main thread); default: all cores when the batch is large enough. */
  threads?: number;
  /** Print (and add to the JSON, and draw with --out) the cross-lineage summary instead of one table per lineage. */
  summary?: boolean;
  /** false for --no-trend-test. */
  trendTest?: boolean;
  /** --trend-level (default 0.05). */
  trendLevel?: string | number;
}


/** Everything `fit` computed, before it is printed or written. */
export interface FitRun {
  readonly fits: LineageFit[];
  readonly document: Record<string, unknown>;
  readonly warnings: WarningLog;
  /** Rates, adequacy and left-out models per lineage (shift/covariate options), in `fits` order. */
  readonly extras?: readonly LineageExtras[];
  /**
   * The samples file as read (its horizons before the age model places them),
   * set by {@link runFitStreamed}: `--age-draws` and the report's comparison
   * and power analyses reuse it instead of reading the file (or stdin) again.
   */
  readonly read?: StreamedInput;
  /** The `--age-model` file as read by {@link runFitStreamed} (null without one), for `--age-draws`. */
  readonly age?: LoadedAgeModel | null;
  /** `--models`, resolved once at the start of the run. */
  readonly selection: ModelSelection;
  /** The trend verdict per lineage, in `fits` order (null with --no-trend-test). */
  readonly trends?: readonly TrendTest[] | null;
}

/**
 * Read the file, fit every lineage, and build the result document (no output).
 *
 * @example
 * runFit('sample-data/shell-length.csv', { intervals: false }).document.model_set; // 'classic'
 */
export function runFit(file: string, options: FitCommandOptions): FitRun {
  const warnings = new WarningLog();
  const input = readInput(file);
  const read = loadLineages(input, options, warnings);
  const lineages = options.covariateFile ? attachCovariates(read, options.covariateFile) : read;
  return fitLoaded(input, lineages, options, resolveModels(options.models), warnings);
}

/**
 * {@link runFit} reading the file as a stream (bounded memory for specimen
 * files of millions of rows, progress bar on a terminal); same result.
 *
 * @example
 * (await runFitStreamed('sample-data/shell-length.csv', { quiet: true })).selection.name; // 'classic'
 */
export async function runFitStreamed(file: string, options: FitCommandOptions): Promise<FitRun> {
  const warnings = new WarningLog();
  const { ageModelHook, checkAgeModelUsage } = await import('./age-model-options.js');
  checkAgeModelUsage(options);
  // The samples first: the tie file must use their position column (height or depth).
  const { input, samples } = await loadSamplesStreamed(file, options, readingProgress(file, options));
  const { extra, age } = ageModelHook(file, options, samples.timeKind, warnings);
  const read = lineagesOf(samples, options, warnings, extra);
  const lineages = options.covariateFile ? attachCovariates(read, options.covariateFile) : read;
  // Many lineages are fitted on worker threads (same numbers, input order; see src/parallel/fit-lineages.ts).
  const selection = resolveModels(options.models);
  const { models } = selection;
  // Shift searches grow with the square of the horizons: refuse what cannot be held, announce a long run with its estimate.
  const { checkShiftSearchCost } = await import('./run-cost.js');
  checkShiftSearchCost(lineages, models, { minimumSegment: extensionSettings(options).minimumSegment, threads: options.threads, warnings });
  // Checked before fitting: a bad --trend-level or --seed should not cost a fit.
  const trendOptions = options.trendTest === false ? null : trendOptionsOf(options, models);
  const fits = await fitLineages(lineages, models, fitOptionsOf(options, lineages.length), {
    threads: options.threads,
    onProgress: fittingProgress(lineages.length, options),
  });
  const trends = trendOptions === null ? null : await trendTests(fits, trendOptions, { threads: options.threads, onProgress: fittingProgress(fits.length, options, process.stderr, 'trend tests') });
  const run = fitLoaded(input, lineages, options, selection, warnings, fits, trends);
  if (age) {
    // The age model is part of the result (fit, and the report made from the same run): its file, its options, its ties and rates.
    const { parseDrawOptions, ageModelDocument } = await import('./compare-command.js');
    const { draws, seed } = parseDrawOptions(options);
    const provenance = run.document.provenance as { inputs: { file: string; sha256: string }[]; options: Record<string, unknown> };
    provenance.inputs.push({ file: age.input.name, sha256: age.input.sha256 });
    Object.assign(provenance.options, { age_model: options.ageModel, extrapolate: options.extrapolate === true, age_draws: draws, seed: draws > 0 ? seed : null });
    run.document.age_model = ageModelDocument(age.model);
  }
  return { ...run, read: { input, samples }, age };
}

/**
 * Fit read lineages and build the result document (no output).
 *
 * @example
 * fitLoaded(input, lineages, options, resolveModels('random-walk,ou'), new WarningLog()).fits[0].models.length; // 2
 */
export function fitLoaded(input: Omit<InputText, 'text'>, lineages: readonly Lineage[], options: FitCommandOptions, selection: ModelSelection, warnings: WarningLog, given?: LineageFit[], trends?: readonly TrendTest[] | null): FitRun {
  const { name, models } = selection;
  const settings = extensionSettings(options);
  const fitted = given ?? lineages.map((lineage) => fitLineage(lineage, models, fitOptionsOf(options, lineages.length)));
  // A named set (e.g. extended) leaves out models a lineage does not allow (no covariate): their rows are not fitted and carry no weight.
  const kept = fitted.map((fit) => modelsForLineage(fit.lineage, models, name));
  const fits = fitted.map((fit, j) => (kept[j].leftOut.length === 0 ? fit : { ...fit, models: fit.models.filter((model) => !kept[j].leftOut.includes(model.id)) }));
  for (const fit of fits) {
    for (const model of fit.models) {
      for (const flag of model.flags) warnings.add(flag.startsWith(intervalFallbackPrefix) ? 'interval-fallback' : 'at-bound', `${fit.lineage.section || 'lineage'}${fit.lineage.trait ? ' / ' + fit.lineage.trait : ''}, ${model.id}: ${flag}`);
      if (model.notCompared) warnings.add('not-compared', `${fit.lineage.section || 'lineage'}${fit.lineage.trait ? ' / ' + fit.lineage.trait : ''}, ${model.id}: ${model.notCompared}`);
    }
  }
  if (trends) addTrendWarnings(fits, trends, warnings);
  const provenance: Provenance = {
    tool: 'stratotrend',
    version: toolVersion(),
    inputs: [{ file: input.name, sha256: input.sha256 }],
    options: {
      log: options.log === true,
      pool: options.pool === true,
      time_unit: options.timeUnit ?? 'Myr',
      // As given (a label, or TRAIT=LABEL entries); each lineage's own unit is its trait_unit.
      trait_unit: options.traitUnit === undefined ? null : options.traitUnit,
      models: name,
      intervals: options.intervals === false ? 'none' : intervalOptions(options.intervals).intervalMethod,
      likelihood: 'exact (joint) with known sampling variances, Kalman filter',
      criterion: 'AICc',
      min_segment: settings.minimumSegment ?? defaultMinimumSegment,
      generation_time_years: settings.generationTime,
      ...(options.covariateFile ? { covariate_file: options.covariateFile } : {}),
      ...(settings.adequacy ? { adequacy_draws: settings.adequacyDraws, adequacy_seed: settings.adequacySeed } : {}),
      trend_test: trends ? { level: trends[0]?.level ?? trendLevelOf(options), seed: trends[0]?.seed ?? trendSeedOf(options) } : null,
    },
  };
  const extras = fits.map((fit, j) => lineageExtras(fit, settings, kept[j].leftOut));
  const document = fitDocument(fits, provenance, warnings.list(), name);
  (document as { lineages: Record<string, unknown>[] }).lineages.forEach((lineage, j) => Object.assign(lineage, extrasDocument(extras[j]), trends ? { trend_test: trends[j] } : {}));
  return { fits, document, warnings, extras, selection, trends: trends ?? null };
}

/** --trend-level as a number in (0, 1). @throws InputError (usage) otherwise. */
function trendLevelOf(options: FitCommandOptions): number {
  if (options.trendLevel === undefined) return 0.05;
  const level = Number(options.trendLevel);
  if (!(level > 0 && level < 1)) throw usageError(`--trend-level must be a number between 0 and 1, e.g. 0.05, got "${options.trendLevel}"`);
  return level;
}

/** --seed as the trend test's seed. @throws InputError (usage) when it is not a whole number from 0 to 2^32 - 1. */
function trendSeedOf(options: FitCommandOptions): number {
  if (options.seed === undefined) return 1;
  const seed = parseSeed(String(options.seed));
  if (seed === null) throw usageError(`--seed must be a whole number from 0 to 4294967295, got "${options.seed}"`);
  return seed;
}

/** The trend test's options from the command's. */
function trendOptionsOf(options: FitCommandOptions, models: readonly EvolutionModel[]): TrendTestOptions {
  return { level: trendLevelOf(options), seed: trendSeedOf(options), models: models.map((model) => model.id) };
}

/** Warnings where AICc's first place and the trend verdict disagree (category trend-check). */
function addTrendWarnings(fits: readonly LineageFit[], trends: readonly TrendTest[], warnings: WarningLog): void {
  fits.forEach((fit, j) => {
    const test = trends[j];
    const name = `${fit.lineage.section || 'lineage'}${fit.lineage.trait ? ' / ' + fit.lineage.trait : ''}`;
    if (fit.best === 'directional-walk' && test.p_value !== null && !test.supported && test.aicc_false_trend_rate !== null) {
      warnings.add('trend-check', `${name}: AICc ranks the directional walk first but the trend test does not support a trend (p = ${Number(test.p_value.toPrecision(2))}); AICc alone picks it in ${Math.round(test.aicc_false_trend_rate * 100)}% of trendless sequences on this design`);
    }
    const ouReason = weakOuWin(fit);
    if (ouReason && test.aicc_ou_rate !== null) {
      warnings.add('trend-check', `${name}: ou ranks first but ${ouReason}; ou often wins on short unbiased walks (AICc picks it in ${Math.round(test.aicc_ou_rate * 100)}% of trendless sequences on this design)`);
    }
  });
}

/** Fit options from the command's options: interval method, minimum segment, and a search progress bar for a single lineage (fitted in this thread). */
function fitOptionsOf(options: FitCommandOptions, lineageCount: number): FitOptions {
  const settings = extensionSettings(options);
  return {
    ...intervalOptions(options.intervals),
    minimumSegment: settings.minimumSegment,
    ...(lineageCount === 1 ? { onProgress: searchProgress(options) } : {}),
  };
}

/**
 * `stratotrend fit FILE`: print the model table (or JSON) and write outputs with --out.
 *
 * @example
 * await fitCommand('sample-data/shell-length.csv', { models: 'classic' }); // prints 'Model set: classic (the five classic models)' and one table per lineage
 */
export async function fitCommand(file: string, options: FitCommandOptions): Promise<void> {
  try {
    await fitAndWrite(file, options);
  } finally {
    releaseOutputLocks();
  }
}

async function fitAndWrite(file: string, options: FitCommandOptions): Promise<void> {
  // A report name that would overwrite an input or a file stratotrend did not write is refused before fitting.
  if (options.report) checkOutputFile(options.report, inputPaths(file, options), '--report file');
  const run = await runFitStreamed(file, options);
  // Age model: extrapolated horizons in words, and the Monte Carlo over tie ages (--age-draws).
  const { fitAgeDraws } = await import('./compare-command.js');
  // A progress bar for the age draws (stderr, terminal only, not with --quiet).
  const reporter = options.ageDraws !== undefined ? stageProgress(options.quiet) : null;
  let ageText: string;
  try {
    ageText = run.read ? fitAgeDraws(file, options, run, run.document, run.read.samples, run.age ?? null, reporter?.progress) : '';
  } finally {
    reporter?.stop();
  }
  const compilation = options.summary ? await import('./compilation-output.js') : null;
  const summary = compilation ? compilation.addCompilation(run) : null;
  const trendSummary = summary && run.trends ? summariseTrends(run.fits, run.trends) : null;
  if (trendSummary) (run.document.compilation as Record<string, unknown>).trend_tests = trendSummary;
  // Figures load their module (and, when drawing, the chart stack) only with --out.
  const figures = options.out && options.figures !== false ? await import('./render-command.js') : null;
  const lineageDocuments = (run.document as { lineages: unknown[] }).lineages;
  const figurePlan = figures ? figures.planFigureFiles(lineageDocuments, options) : null;
  const longDrawing = figures && figurePlan ? figures.figureTimeWarning(figurePlan, 'to skip them, run with --no-figures and draw the ones you need later with "stratotrend redraw fit.json --lineage NAME"') : null;
  if (longDrawing && options.out) {
    run.warnings.add('long-run', longDrawing);
    process.stderr.write(`warning (long-run): ${longDrawing}\n`);
  }
  if (options.out) {
    const folder = prepareOutputFolder(options.out, inputPaths(file, options), ['models.csv', 'fit.json', ...(summary ? ['compilation.png'] : []), ...(figurePlan?.names ?? [])]);
    // The whole set is written first and put in place at the end: a full disk leaves the previous run's set whole.
    const set = new OutputSet(folder, options.out);
    try {
      set.add('models.csv', modelsCsv(run.fits, run.trends));
      set.add('fit.json', JSON.stringify(run.document, null, 2) + '\n');
      if (compilation && summary) await compilation.writeCompilationFigure(summary, set);
      if (figures && figurePlan) figures.writeFigureFiles(lineageDocuments, figurePlan, set, { quiet: options.quiet });
    } catch (error) {
      set.abandon();
      throw error;
    }
    set.commit();
  }
  if (options.json) {
    process.stdout.write(JSON.stringify(run.document, null, 2) + '\n');
  } else if (!options.quiet) {
    const tables = run.fits.map((fit, j) => [lineageTable(fit), ...extrasText(fit, run.extras?.[j]), ...(run.trends ? trendText(fit, run.trends[j]) : [])].join('\n'));
    process.stdout.write(modelSetLine(run.selection) + (compilation && summary ? compilation.compilationText(summary) + (trendSummary ? '\n\n' + trendSummaryText(trendSummary) : '') : tables.join('\n\n')) + '\n');
    if (options.out) process.stdout.write(`\nWrote models.csv${summary ? ', compilation.png' : ''} and fit.json${figurePlan ? ` and ${figurePlan.names.length} figure files` : ''} to ${options.out}\n`);
  }
  if (ageText && !options.json && !options.quiet) process.stdout.write('\n' + ageText + '\n');
  if (options.report) {
    const { writeReportForRun } = await import('./report-command.js');
    await writeReportForRun(run, options.report, inputPaths(file, options), options as { orientation?: string; drawModel?: string; smoothedBand?: boolean });
    if (!options.quiet && !options.json) process.stdout.write(`Wrote the report to ${options.report}\n`);
  }
  for (const warning of run.warnings.list()) {
    // at-bound and not-compared are in the tables (trend-check too, unless only the summary was printed); long-run was printed before fitting.
    if (warning.category === 'at-bound' || warning.category === 'not-compared' || warning.category === 'long-run') continue;
    if (warning.category === 'trend-check' && !options.summary && !options.json && !options.quiet) continue;
    process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
  }
}


/** Rates and adequacy text of one lineage, when asked for. */
function extrasText(fit: LineageFit, extras: LineageExtras | undefined): string[] {
  if (!extras) return [];
  const parts: string[] = [];
  if (extras.leftOut.length > 0) parts.push(`  Left out (the data do not allow them): ${extras.leftOut.join(', ')}.`);
  if (extras.rates) parts.push(ratesText(fit, extras.rates));
  if (extras.adequacy) parts.push(adequacyText(extras.adequacy));
  return parts;
}
