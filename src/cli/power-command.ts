import { powerTable, runPower, sourceWords, traitUnitOf, type PowerCommandOptions, type PowerRun } from '../analyses/power-run.js';
import { seedOption, wholeOption } from '../analyses/option-values.js';
import { stageProgress } from '../io/progress.js';
import { refuseInputPath, writeAtomically } from '../io/write-output.js';
import { lineageName } from '../lineage.js';

// `stratotrend power`: the power run is src/analyses/power-run.ts; this file
// prints its table (or JSON) and writes the power curve.

/**
 * `stratotrend power FILE`.
 *
 * @example
 * // A real run prints the power table (seconds); the options are checked first:
 * await powerCommand('sample-data/shell-length.csv', { replicates: '9' });
 * // throws: --replicates must be a whole number from 20 to 100000, got "9"
 */
export async function powerCommand(file: string, options: PowerCommandOptions): Promise<void> {
  if (options.correlations !== undefined) {
    // Power to detect an evolutionary correlation between two traits (issue 17, the joint models).
    const { runJointPower } = await import('../analyses/joint-simulate.js');
    const { threads: _threads, ...rest } = options;
    process.stdout.write(await runJointPower(file, { ...rest, correlations: options.correlations }, { replicates: (text) => wholeOption(text, '--replicates', 200, 1, 100000), seed: seedOption }));
    return;
  }
  if (options.figure) refuseInputPath(options.figure, [file]);
  const reporter = stageProgress(options.quiet);
  let run: PowerRun;
  try {
    run = await runPower(file, options, reporter.progress);
  } finally {
    reporter.stop();
  }
  if (options.figure) {
    const { renderPowerCurve } = await import('../render/figures/power-curve.js');
    const figure = renderPowerCurve({
      grid: run.report.grid,
      lineage: lineageName(run.lineage),
      horizons: run.report.settings.horizons,
      replicates: run.report.settings.replicates,
      timeUnit: run.lineage.timeUnit.label,
      traitUnit: traitUnitOf(run.lineage),
      weightThreshold: run.report.settings.weight_threshold,
      targetPower: run.report.smallest_drift.power,
      level: run.report.lrt.level,
      withinSd: run.report.settings.pooled_within_sd,
      stepVariance: run.report.settings.step_variance,
      assumptions: run.assumptions.map((entry) => ({ stepVariance: entry.stepVariance, source: sourceWords(entry.source), grid: entry.report.grid })),
    }, { format: options.figure.toLowerCase().endsWith('.svg') ? 'svg' : options.figure.toLowerCase().endsWith('.pdf') ? 'pdf' : 'png' });
    writeAtomically(options.figure, figure.bytes);
  }
  if (options.json) process.stdout.write(JSON.stringify(run.document, null, 2) + '\n');
  else if (!options.quiet) process.stdout.write(powerTable(run) + '\n' + (options.figure ? `\nWrote the power curve to ${options.figure}\n` : ''));
  for (const note of run.notes) process.stderr.write(`note: ${note}\n`);
  for (const warning of run.warnings) process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
}
