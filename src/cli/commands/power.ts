import type { Command } from 'commander';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend power`; the action loads the simulation code only when run.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * definePowerCommand(program);
 * program.commands[0].options.some((option) => option.long === '--no-coverage'); // true
 */
export function definePowerCommand(program: Command): void {
  addAgeModelOptions(addSampleOptions(
    program
      .command('power')
      .description('how large a trend this file\'s sampling design could detect: simulate directional walks on its own times and sample sizes, refit every model, and report power and the false-trend rate')
      .argument('<file>', 'samples CSV (as for fit); its design (times, n, within-horizon variances) is kept'),
  ), { draws: false })
    .option('--lineage <name>', 'which lineage ("section / trait", or a section or trait name); default the first')
    .option('--replicates <R>', 'simulated lineages per drift value and in the null set', '200')
    .option('--seed <s>', 'seed of the simulations (same seed, same results on any number of threads)', '1')
    .option('--drifts <list>', 'drift values per time unit, comma-separated (default: 0 to 5 standard errors of the fitted drift)')
    .option('--drifts-sd <list>', 'drift values in pooled within-horizon standard deviations per time unit')
    .option('--step-variance <list>', 'step variance(s) of the simulated walks, comma-separated; each gets its own table and curves (default: the fitted directional walk\'s estimate, and also the upper end of its 95% interval when the estimate is 0 or poorly determined — upper end at least 4 times the estimate)')
    .option('--weight-threshold <w>', 'Akaike weight the directional walk must exceed for P(weight) (its weight cannot pass about 0.8 when ou is fitted too, because ou contains it as a limit)', '0.5')
    .option('--models <set>', 'models fitted to every replicate: classic (default), extended, or a comma-separated list of model ids (see "stratotrend fit --help") that includes random-walk and directional-walk', 'classic')
    .option('--target-drift <d>', 'also find how many horizons at the same spacing and sample sizes give 80% power for this drift')
    .option('--no-coverage', 'skip the check of interval coverage on this design')
    .option('--threads <k>', 'threads: this one and k − 1 workers (default: every core; results do not depend on it)')
    .option('--figure <file>', 'write the power curve (png, or svg/pdf by extension)')
    .option('--correlations <list>', 'instead: the power to detect a correlation between the steps of the first two traits of a section (--lineage SECTION; default the first with two or more traits) on this design, for these true correlations (0 is added: the false-correlation rate); see "stratotrend joint"')
    .option('--json', 'print one JSON document instead of the table')
    .option('--quiet', 'no table and no progress bar')
    .action(async (file: string, options) => {
      const { powerCommand } = await import('../power-command.js');
      await powerCommand(file, options);
    });
}
