import { runFitStreamed, type FitCommandOptions, type FitRun } from '../analyses/fit-run.js';
import type { LineageExtras } from '../analyses/fit-extensions.js';
import { modelSetLine } from '../analyses/model-selection.js';
import type { LineageFit } from '../fit/fit-lineage.js';
import { stageProgress } from '../io/progress.js';
import { checkOutputFile, inputPaths, OutputSet, prepareOutputFolder, releaseOutputLocks } from '../io/write-output.js';
import { adequacyText, ratesText } from '../render/extensions-text.js';
import { modelsCsv } from '../render/models-csv.js';
import { lineageTable } from '../render/text-table.js';
import { trendSummaryText, trendText } from '../render/trend-text.js';

// `stratotrend fit`: the fit run is src/analyses/fit-run.ts; this file prints
// its tables (or JSON) and writes models.csv, fit.json, the figures and the
// report.

/**
 * `stratotrend fit FILE`: print the model table (or JSON) and write outputs with --out.
 *
 * @example
 * // A real run prints 'Model set: classic (the five classic models)' and one table per lineage; the file is read first:
 * await fitCommand('no-such.csv', {});
 * // throws: no-such.csv: no such file
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
  // A progress bar for the age draws (stderr, terminal only, not with --quiet); the run draws them before it builds its document.
  const reporter = options.ageDraws !== undefined ? stageProgress(options.quiet) : null;
  let run: FitRun;
  try {
    run = await runFitStreamed(file, options, { ageDraws: reporter?.progress });
  } finally {
    reporter?.stop();
  }
  // Age model: extrapolated horizons in words, and the Monte Carlo over tie ages (--age-draws).
  const ageText = run.ageText ?? '';
  // --summary: the summary module (and, with --out, the chart stack) is loaded only then.
  const compilation = options.summary ? await import('../analyses/compilation-output.js') : null;
  const summary = run.compilation?.summary ?? null;
  const trendSummary = run.compilation?.trends ?? null;
  // Figures load their module (and, when drawing, the chart stack) only with --out.
  const figures = options.out && options.figures !== false ? await import('../analyses/figure-files.js') : null;
  const lineageDocuments = run.document.lineages;
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
    const { writeReportForRun } = await import('../analyses/report-run.js');
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
