import type { Command } from 'commander';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend compare`. The action imports the comparison code only
 * when the command runs.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * defineCompareCommand(program);
 * program.commands.map((command) => command.name()); // ['compare']
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
    .option('--models <set>', 'classic|extended|id,id,...: model set (see "Model sets" below)', 'classic')
    .option('--composite', 'also merge each trait\'s sections onto one timeline as one lineage and fit it like any lineage, after removing the section offsets estimated under the best-supported shared-offset hypothesis (the output says which)')
    .option('--merge-coeval', 'with --composite: pool horizons of equal age from different sections into one sample (default: keep them separate)')
    .option('--json', 'print one JSON document to stdout instead of the tables')
    .option('--out <folder>', 'write compare.csv, compare-estimates.csv, compare.json and a sections figure per trait (<trait>.sections.png, drawn under the best-supported hypothesis) into this folder')
    .option('--no-figure', 'with --out: do not draw the sections figure')
    .option('--no-intervals', 'skip the 95% intervals (faster)')
    .option('--intervals <method>', 'how the 95% intervals are made, as for "fit": integrated (default: integrated likelihood, best calibrated; models with several process parameters use adjusted), adjusted (restricted profile likelihood), profile (plain profile likelihood, asymptotic) or bootstrap (profile with a parametric-bootstrap cut-off, slower)')
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
Shared is nested in separate: each family gets a likelihood-ratio test (chi-square p-value).
Hypotheses that are the same fit at their estimates (equal K and logL) are marked "same fit as";
when the best is such a tie, the output says the data cannot tell them apart.

Model sets (--models):
  classic   the five models: strict-stasis, stasis, random-walk, directional-walk, ou
  extended  classic plus the shift, mode-shift, covariate and changing-landscape models of "fit --help",
            with these limits: accelerating-walk has no shared hypothesis (its rate is searched
            relative to each section's span); shift models (punctuated-*, FIRST-then-SECOND,
            optimum-shift) are fitted as separate only; a shift shared by several sections is not
            defined here, so shared and shared-offset are left out, and a section too short for a
            shift (segments of at least 5 horizons) leaves the model out;
            covariate models are left out unless every section has a covariate column, and their
            shared-offset is left out (the common timeline carries no covariate)
  id,id,... a comma-separated list of model ids, with the same limits
Left-out models are listed with the reason under each table and in the JSON ("left_out"); they are
never ranked.`)
    .action(async (file: string, options) => {
      const { compareCommand } = await import('../compare-command.js');
      await compareCommand(file, options);
    });
}
