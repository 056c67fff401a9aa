import { ageModelWords, hypothesisCaption, runCompare, sectionDocuments, type CompareCommandOptions, type CompareRun } from '../analyses/compare-run.js';
import { inputPaths, OutputSet, prepareOutputFolder, releaseOutputLocks } from '../io/write-output.js';
import { stageProgress } from '../io/progress.js';
import { comparisonCsv, comparisonTable, estimatesCsv } from '../render/comparison-output.js';
import { modelsCsv } from '../render/models-csv.js';
import { lineageTable } from '../render/text-table.js';

// `stratotrend compare`: the comparison run is src/analyses/compare-run.ts;
// this file prints its tables (or JSON) and writes the --out files.

/**
 * `stratotrend compare FILE`: print the comparison tables (or JSON) and write outputs with --out.
 *
 * @example
 * // A real run prints one ranked table per trait (seconds); the file is read first:
 * await compareCommand('no-such.csv', {});
 * // throws: no-such.csv: no such file
 */
export async function compareCommand(file: string, options: CompareCommandOptions): Promise<void> {
  try {
    await compareAndWrite(file, options);
  } finally {
    releaseOutputLocks();
  }
}

async function compareAndWrite(file: string, options: CompareCommandOptions): Promise<void> {
  // A progress bar for the age draws, on a terminal only (stderr), not with --quiet.
  const reporter = stageProgress(options.quiet);
  let result: CompareRun;
  try {
    result = await runCompare(file, options, undefined, reporter.progress);
  } finally {
    reporter.stop();
  }
  const written: string[] = [];
  if (options.out) {
    const inputs = inputPaths(file, options);
    const drawFigures = options.figure !== false && result.run.comparisons.length > 0;
    const { models } = result.selection;
    const documents = drawFigures ? result.run.comparisons.map((comparison) => sectionDocuments(comparison, models)) : [];
    // The file names of fit and redraw (`figureJobs`: <trait>.sections, numbered when traits coincide after cleaning).
    const { figureJobs } = await import('../render/figures/figure-set.js');
    const jobs = figureJobs(documents.flat(), ['sections']);
    const figureNames = jobs.map((job) => `${job.stem}.png`);
    const names = ['compare.csv', 'compare-estimates.csv', 'compare.json', ...(result.composites.length > 0 ? ['composite-models.csv'] : []), ...figureNames];
    const folder = prepareOutputFolder(options.out, inputs, names);
    // Written as one set, put in place at the end (a full disk leaves the previous set whole).
    const set = new OutputSet(folder, options.out);
    try {
      set.add('compare.csv', comparisonCsv(result.run.comparisons, result.spreads));
      set.add('compare-estimates.csv', estimatesCsv(result.run.comparisons));
      set.add('compare.json', JSON.stringify(result.document, null, 2) + '\n');
      if (result.composites.length > 0) set.add('composite-models.csv', modelsCsv(result.composites));
      if (drawFigures) {
        const { renderSectionsTogether } = await import('../render/figures/index.js');
        for (const [index, comparison] of result.run.comparisons.entries()) {
          const label = models.find((model) => model.id === comparison.best?.model)?.label ?? comparison.best?.model ?? '';
          const short = label.includes(' (') ? label.slice(0, label.indexOf(' (')) : label;
          const figure = renderSectionsTogether(documents[index], { model: comparison.best?.model, linesCaption: comparison.best ? hypothesisCaption(comparison, short) : undefined });
          set.add(figureNames[index], figure.bytes);
        }
      }
    } catch (error) {
      set.abandon();
      throw error;
    }
    written.push(...set.commit());
  }
  if (options.json) {
    process.stdout.write(JSON.stringify(result.document, null, 2) + '\n');
  } else if (!options.quiet) {
    const unit = result.run.comparisons[0]?.sections[0].timeUnit.label ?? 'Myr';
    const parts: string[] = [];
    if (result.ageModel) parts.push(ageModelWords(result.ageModel, unit));
    for (const comparison of result.run.comparisons) {
      parts.push(comparisonTable(comparison, result.draws ? { ...result.draws, spreads: result.spreads.get(comparison.trait) ?? [], tiedDraws: result.tiedDraws.get(comparison.trait) ?? 0 } : null));
    }
    result.composites.forEach((composite, index) => parts.push(`${result.compositeNotes[index]}\n${lineageTable(composite)}`));
    if (result.run.comparisons.length === 0) parts.push('No trait is measured in two or more sections: nothing to compare.');
    process.stdout.write(parts.join('\n\n') + '\n');
    if (written.length > 0) process.stdout.write(`\nWrote ${written.join(', ')} to ${options.out}\n`);
  }
  for (const warning of result.warnings.list()) {
    if (warning.category === 'long-run') continue; // printed before the run
    process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
  }
}
