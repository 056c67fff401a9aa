import type { Command } from 'commander';
import { addSampleOptions } from './shared.js';

/**
 * Options for heights/depths and their age model, shared by `fit` and
 * `compare`: the tie-point file, extrapolation beyond the ties, and the
 * Monte Carlo over tie-point ages.
 */
export function addAgeModelOptions(command: Command): Command {
  return command
    .option('--age-model <file>', 'tie points (section, height or depth, age, optional age_sd) that turn sample heights/depths into ages')
    .option('--extrapolate', 'allow ages beyond the outermost ties (constant rate of the nearest stretch); such horizons are flagged in every output')
    .option('--age-draws <count>', 'redraw the tie-point ages from their age_sd this many times (kept in stratigraphic order), refit, and report the spread')
    .option('--seed <integer>', 'seed of the age redraws (same seed, same draws)', '1');
}

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
    .option('--out <folder>', 'write compare.csv, compare-estimates.csv, compare.json and a sections figure per trait (<trait>.sections.png, drawn under the best-supported hypothesis) into this folder')
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
