import { WarningLog } from '../data/warnings.js';
import { fitLineage, type LineageFit } from '../fit/fit-lineage.js';
import { intervalFallbackPrefix, type FitOptions } from '../fit/fit-model.js';
import { defaultMinimumSegment } from '../models/model.js';
import { fitDocument, type AgeModelDocument, type AgeUncertaintyDocument, type FitDocument, type Provenance } from '../render/fit-document.js';
import { lineagesOf, loadLineages, loadSamplesStreamed, readInput, type InputText, type SampleFileOptions, type StreamedInput } from './input.js';
import type { Lineage } from '../lineage.js';
import { fitLineages } from '../parallel/fit-lineages.js';
import { resolveModels, type ModelSelection, type ModelsOption } from './model-selection.js';
import { fittingProgress, readingProgress, searchProgress, type StageProgress } from '../io/progress.js';
import type { AgeModelOptions, LoadedAgeModel } from './age-model-options.js';
import { intervalOptions } from '../fit/intervals.js';
import { attachCovariates, extensionSettings, extrasDocument, lineageExtras, modelsForLineage, type ExtensionOptions, type LineageExtras } from './fit-extensions.js';
import type { FigureCommandOptions } from './figure-files.js';
import { toolVersion } from '../io/version.js';
import { usageError } from '../data/errors.js';
import type { EvolutionModel } from '../models/model.js';
import { trendTests } from '../trend/run-trend-tests.js';
import type { TrendTest, TrendTestOptions } from '../trend/trend-test.js';
import { weakOuWin } from '../render/trend-text.js';
import { seedOption } from './option-values.js';
import type { Compilation } from './compilation-output.js';

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
  readonly document: FitDocument;
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
  /** The age model and `--age-draws` in words for the terminal, set by {@link runFitStreamed} (empty without `--age-model`). */
  readonly ageText?: string;
  /** `fit --summary`: the cross-lineage summary, set by {@link runFitStreamed} (null without `--summary`). */
  readonly compilation?: Compilation | null;
}

/** Progress of the stages {@link runFitStreamed} runs after fitting. */
export interface FitRunProgress {
  /** `--age-draws`: one stage, ticked once per draw. */
  readonly ageDraws?: StageProgress;
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
 * (await runFitStreamed('sample-data/shell-length.csv', { quiet: true, intervals: false, trendTest: false })).selection.name; // 'classic'
 */
export async function runFitStreamed(file: string, options: FitCommandOptions, progress: FitRunProgress = {}): Promise<FitRun> {
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
  const fitted = await fitLineages(lineages, models, fitOptionsOf(options, lineages.length), {
    threads: options.threads,
    onProgress: fittingProgress(lineages.length, options),
  });
  const trends = trendOptions === null ? null : await trendTests(fitted, trendOptions, { threads: options.threads, onProgress: fittingProgress(fitted.length, options, process.stderr, 'trend tests') });
  const results = fitResults(input, lineages, options, selection, warnings, fitted, trends);
  let { provenance } = results;
  let ageModel: AgeModelDocument | undefined;
  let ageUncertainty: AgeUncertaintyDocument | undefined;
  let ageText = '';
  if (age) {
    // The age model is part of the result (fit, and the report made from the same run): its file, its options, its ties and rates,
    // and with --age-draws the spread over redrawn tie ages (the horizons read above are placed again, not read again).
    const { parseDrawOptions, ageModelDocument, fitAgeDraws } = await import('./compare-run.js');
    const { draws, seed } = parseDrawOptions(options);
    provenance = {
      ...provenance,
      inputs: [...provenance.inputs, { file: age.input.name, sha256: age.input.sha256 }],
      options: { ...provenance.options, age_model: options.ageModel, extrapolate: options.extrapolate === true, age_draws: draws, seed: draws > 0 ? seed : null },
    };
    ageModel = ageModelDocument(age.model);
    const drawn = fitAgeDraws(file, options, results, samples, age, progress.ageDraws);
    ageText = drawn.text;
    ageUncertainty = drawn.document ?? undefined;
  }
  const compilation = options.summary ? (await import('./compilation-output.js')).compileFits(results.fits, trends) : null;
  const document = fitDocument(results.fits, provenance, warnings.list(), selection.name, {
    lineageBlocks: results.lineageBlocks,
    ageModel,
    ageUncertainty,
    compilation: compilation?.document,
  });
  const { lineageBlocks: _blocks, provenance: _provenance, ...run } = results;
  return { ...run, document, read: { input, samples }, age, ageText, compilation };
}

/**
 * Fit read lineages and build the result document (no output).
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const run = fitLoaded({ name: 'a.csv', sha256: '0' }, [lineage], { intervals: false }, resolveModels('random-walk,strict-stasis'), new WarningLog());
 * run.fits[0].models.map((model) => model.id); // ['random-walk', 'strict-stasis']
 * run.document.model_set; // 'custom'
 */
export function fitLoaded(input: Omit<InputText, 'text'>, lineages: readonly Lineage[], options: FitCommandOptions, selection: ModelSelection, warnings: WarningLog, given?: LineageFit[], trends?: readonly TrendTest[] | null): FitRun {
  const { lineageBlocks, provenance, ...run } = fitResults(input, lineages, options, selection, warnings, given, trends);
  return { ...run, document: fitDocument(run.fits, provenance, warnings.list(), selection.name, { lineageBlocks }) };
}

/** A fit run before its document is built: the run's parts, the provenance and each lineage's added blocks. */
interface FitResults extends Omit<FitRun, 'document'> {
  readonly extras: readonly LineageExtras[];
  readonly provenance: Provenance;
  readonly lineageBlocks: readonly Readonly<Record<string, unknown>>[];
}

/** Fit read lineages (unless given), add the fits' warnings, and gather what the document is built from. */
function fitResults(input: Omit<InputText, 'text'>, lineages: readonly Lineage[], options: FitCommandOptions, selection: ModelSelection, warnings: WarningLog, given?: LineageFit[], trends?: readonly TrendTest[] | null): FitResults {
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
  const lineageBlocks = extras.map((extra, j) => ({ ...extrasDocument(extra), ...(trends ? { trend_test: trends[j] } : {}) }));
  return { fits, warnings, extras, selection, trends: trends ?? null, provenance, lineageBlocks };
}

/** --trend-level as a number in (0, 1). @throws InputError (usage) otherwise. */
function trendLevelOf(options: FitCommandOptions): number {
  if (options.trendLevel === undefined) return 0.05;
  const level = Number(options.trendLevel);
  if (!(level > 0 && level < 1)) throw usageError(`--trend-level must be a number between 0 and 1, e.g. 0.05, got "${options.trendLevel}"`);
  return level;
}

/** --seed as the trend test's seed (the shared seed option). @throws InputError (usage) when it is not a whole number from 0 to 2^32 - 1. */
function trendSeedOf(options: FitCommandOptions): number {
  return seedOption(options.seed === undefined ? undefined : String(options.seed));
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
