import type { Command } from 'commander';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend compare`. The action imports the comparison code only
 * when the command runs.
 */
export function defineCompareCommand(program: Command): void {
  addAgeModelOptions(
    addSampleOptions(
      program
        .command('compare')
        .description('for each trait measured in two or more sections, rank separate, shared and shared-offset processes of every model by AICc')
        .argument('<file>', 'samples CSV with a section column (age, time, height or depth per horizon); "-" reads stdin'),
    ),
  )
    .option('--models <set>', 'model set: "classic" (the five models) or a comma-separated list of model ids', 'classic')
    .option('--composite', 'also merge each trait\'s sections onto one timeline as one lineage and fit it like any lineage')
    .option('--merge-coeval', 'with --composite: pool horizons of equal age from different sections into one sample (default: keep them separate)')
    .option('--json', 'print one JSON document to stdout instead of the tables')
    .option('--out <folder>', 'write compare.csv, compare-estimates.csv, compare.json and a sections figure per trait into this folder')
    .option('--no-figure', 'with --out: do not draw the sections figure')
    .option('--no-intervals', 'skip the profile-likelihood intervals (faster)')
    .option('--quiet', 'print nothing but errors and warnings')
    .addHelpText('after', `
Hypotheses (ids as in the JSON), fitted for each model family and ranked together (N = all horizons):
  separate       every section its own parameters; logL and K are the sums of the single-section fits
  shared         one process (drift, step variance, stasis variance, alpha, optimum) for all sections,
                 each section starting from its own value; the sections' paths are independent
                 (stasis and strict stasis: one mean and one variance for all sections)
  shared-offset  the sections record one lineage on the common timescale (one path from the oldest
                 horizon), each section shifted by a constant offset from the first section;
                 K = K of the model + (sections - 1); not fitted for strict stasis (it equals separate)
Shared is nested in separate: each family gets a likelihood-ratio test (chi-square p-value).`)
    .action(async (file: string, options) => {
      const { compareCommand } = await import('../compare-command.js');
      await compareCommand(file, options);
    });
}
