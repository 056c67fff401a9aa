import { join } from 'node:path';
import { usageError } from '../data/errors.js';
import { WarningLog } from '../data/warnings.js';
import { fitLineage, type LineageFit } from '../fit/fit-lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { findModel, modelSets } from '../models/registry.js';
import { fitDocument, type Provenance } from '../render/fit-document.js';
import { modelsCsv } from '../render/models-csv.js';
import { lineageTable } from '../render/text-table.js';
import { loadLineages, loadLineagesStreamed, readInput, terminalProgress, type InputText, type SampleFileOptions } from './input.js';
import type { Lineage } from '../lineage.js';
import { fitLineages } from '../parallel/fit-lineages.js';
import { fittingProgress } from './fit-progress.js';
import type { AgeModelOptions } from './compare-command.js';
import { intervalOptions } from '../fit/intervals.js';
import { toolVersion } from './version.js';
import { prepareOutputFolder, writeAtomically } from './write-output.js';

/** Options of `stratotrend fit`. */
export interface FitCommandOptions extends AgeModelOptions, SampleFileOptions {
  json?: boolean;
  out?: string;
  models?: string;
  /** false for --no-intervals, a method name for --intervals METHOD. */
  intervals?: boolean | string;
  quiet?: boolean;
  /** Also write the HTML report to this file (`stratotrend report`). */
  report?: string;
  /** Worker threads for many lineages (1 = fit in the main thread); default: all cores when the batch is large enough. */
  threads?: number;
  /** Print (and add to the JSON, and draw with --out) the cross-lineage summary instead of one table per lineage. */
  summary?: boolean;
}

/** Resolve `--models`: a named set or a comma-separated list of model ids. */
export function resolveModels(request: string | undefined): { name: string; models: readonly EvolutionModel[] } {
  const name = request ?? 'classic';
  const set = modelSets[name];
  if (set) return { name, models: set() };
  const ids = name.split(',').map((id) => id.trim()).filter((id) => id !== '');
  const models = ids.map((id) => {
    const model = findModel(id);
    if (!model) throw usageError(`--models: unknown model "${id}"; use a set (${Object.keys(modelSets).join(', ')}) or model ids`);
    return model;
  });
  if (models.length === 0) throw usageError('--models: no model named');
  return { name: 'custom', models };
}

/** Everything `fit` computed, before it is printed or written. */
export interface FitRun {
  readonly fits: LineageFit[];
  readonly document: Record<string, unknown>;
  readonly warnings: WarningLog;
}

/** Read the file, fit every lineage, and build the result document (no output). */
export function runFit(file: string, options: FitCommandOptions): FitRun {
  const warnings = new WarningLog();
  const input = readInput(file);
  const lineages = loadLineages(input, options, warnings);
  return fitLoaded(input, lineages, options, warnings);
}

/**
 * {@link runFit} reading the file as a stream (bounded memory for specimen
 * files of millions of rows, progress bar on a terminal); same result.
 */
export async function runFitStreamed(file: string, options: FitCommandOptions): Promise<FitRun> {
  const warnings = new WarningLog();
  const { ageModelHook } = await import('./compare-command.js');
  const { extra } = ageModelHook(file, options);
  const { input, lineages } = await loadLineagesStreamed(file, options, warnings, extra, terminalProgress(file));
  // Many lineages are fitted on worker threads (same numbers, input order; see src/parallel/fit-lineages.ts).
  const { models } = resolveModels(options.models);
  const fits = await fitLineages(lineages, models, intervalOptions(options.intervals), {
    threads: options.threads,
    onProgress: fittingProgress(lineages.length, options),
  });
  return fitLoaded(input, lineages, options, warnings, fits);
}

/** Fit read lineages and build the result document (no output). */
export function fitLoaded(input: Omit<InputText, 'text'>, lineages: readonly Lineage[], options: FitCommandOptions, warnings: WarningLog, fitted?: LineageFit[]): FitRun {
  const { name, models } = resolveModels(options.models);
  const fits = fitted ?? lineages.map((lineage) => fitLineage(lineage, models, intervalOptions(options.intervals)));
  for (const fit of fits) {
    for (const model of fit.models) {
      for (const flag of model.flags) warnings.add('at-bound', `${fit.lineage.section || 'lineage'}${fit.lineage.trait ? ' / ' + fit.lineage.trait : ''}, ${model.id}: ${flag}`);
      if (model.notCompared) warnings.add('not-compared', `${fit.lineage.section || 'lineage'}${fit.lineage.trait ? ' / ' + fit.lineage.trait : ''}, ${model.id}: ${model.notCompared}`);
    }
  }
  const provenance: Provenance = {
    tool: 'stratotrend',
    version: toolVersion(),
    inputs: [{ file: input.name, sha256: input.sha256 }],
    options: {
      log: options.log === true,
      pool: options.pool === true,
      time_unit: options.timeUnit ?? 'Myr',
      models: name,
      intervals: options.intervals === false ? 'none' : intervalOptions(options.intervals).intervalMethod,
      likelihood: 'exact (joint) with known sampling variances, Kalman filter',
      criterion: 'AICc',
    },
  };
  return { fits, document: fitDocument(fits, provenance, warnings.list(), name), warnings };
}

/** `stratotrend fit FILE`: print the model table (or JSON) and write outputs with --out. */
export async function fitCommand(file: string, options: FitCommandOptions): Promise<void> {
  const run = await runFitStreamed(file, options);
  // Age model: extrapolated horizons in words, and the Monte Carlo over tie ages (--age-draws).
  const { fitAgeDraws } = await import('./compare-command.js');
  const ageText = fitAgeDraws(file, options, run.fits, run.document);
  const compilation = options.summary ? await import('./compilation-output.js') : null;
  const summary = compilation ? compilation.addCompilation(run) : null;
  if (options.out) {
    const folder = prepareOutputFolder(options.out, [file], ['models.csv', 'fit.json', ...(summary ? ['compilation.png'] : [])]);
    writeAtomically(join(folder, 'models.csv'), modelsCsv(run.fits));
    writeAtomically(join(folder, 'fit.json'), JSON.stringify(run.document, null, 2) + '\n');
    if (compilation && summary) await compilation.writeCompilationFigure(summary, folder);
  }
  if (options.json) {
    process.stdout.write(JSON.stringify(run.document, null, 2) + '\n');
  } else if (!options.quiet) {
    process.stdout.write((compilation && summary ? compilation.compilationText(summary) : run.fits.map(lineageTable).join('\n\n')) + '\n');
    if (options.out) process.stdout.write(`\nWrote models.csv${summary ? ', compilation.png' : ''} and fit.json to ${options.out}\n`);
  }
  if (ageText && !options.json && !options.quiet) process.stdout.write('\n' + ageText + '\n');
  if (options.report) {
    const { writeReportForRun } = await import('./report-command.js');
    await writeReportForRun(run, options.report, [file]);
    if (!options.quiet && !options.json) process.stdout.write(`Wrote the report to ${options.report}\n`);
  }
  for (const warning of run.warnings.list()) {
    if (warning.category === 'at-bound' || warning.category === 'not-compared') continue;
    process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
  }
}
